/**
 * Small seeded pseudo-random generator for reproducible noise and dither.
 *
 * Generator: xoshiro128** (Blackman & Vigna, "Scrambled linear pseudorandom number generators",
 * ACM Trans. Math. Softw. 47(4), 2021): 128-bit state, period 2^128 − 1, passes BigCrush.
 * Seeding: the four state words are successive outputs of the MurmurHash3 32-bit finaliser (fmix32,
 * Appleby 2011) applied to a Weyl sequence seed + k·0x9E3779B9, so nearby seeds give unrelated streams
 * and the state is never all zero.
 */

/** A generator of uniform numbers in [0, 1) with 32-bit resolution. */
export type Rng = () => number;

const fmix32 = (h: number): number => {
  h = Math.imul(h ^ (h >>> 16), 0x85ebca6b);
  h = Math.imul(h ^ (h >>> 13), 0xc2b2ae35);
  return (h ^ (h >>> 16)) >>> 0;
};

/**
 * The four 32-bit state words createRng(seed) starts from (module comment for the seeding), as
 * int32, for a hot loop that steps xoshiro128** inline (the step is createRng's; bitwise operations
 * read int32 and uint32 alike).
 * @example rngSeedState(1).length // 4
 */
export function rngSeedState(seed: number): Int32Array {
  let w = seed >>> 0;
  const s = new Int32Array(4);
  for (let k = 0; k < 4; k++) s[k] = fmix32((w = (w + 0x9e3779b9) >>> 0));
  if ((s[0] | s[1] | s[2] | s[3]) === 0) s[0] = 1;
  return s;
}

/**
 * Creates a generator from an integer seed (taken modulo 2^32). Same seed, same sequence.
 * Output: u/2^32 for the 32-bit word u, so values lie on a grid of 2^-32 in [0, 1).
 * @example const rnd = createRng(42); rnd() // a number in [0, 1)
 */
export function createRng(seed: number): Rng {
  let [s0, s1, s2, s3] = rngSeedState(seed);
  return () => {
    const m = Math.imul(s1, 5);
    const result = Math.imul((m << 7) | (m >>> 25), 9) >>> 0;
    const t = s1 << 9;
    s2 ^= s0;
    s3 ^= s1;
    s1 ^= s2;
    s0 ^= s3;
    s2 ^= t;
    s3 = (s3 << 11) | (s3 >>> 21);
    return result / 4294967296;
  };
}
