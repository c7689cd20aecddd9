/**
 * Deterministic uniform noise in [−amp, amp): a 32-bit linear congruential generator with the
 * Numerical Recipes constants 1664525 and 1013904223 (Press et al., *Numerical Recipes in C*, 2nd ed.,
 * §7.1, the "quick and dirty" generator [recalled]), for tests that want a broadband signal that is
 * the same on every run.
 *
 * @example uniformNoise(4096, 0.5, 7) // 4096 samples in [−0.5, 0.5)
 */
export function uniformNoise(n: number, amp: number, seed: number): Float32Array {
  let s = seed >>> 0;
  const out = new Float32Array(n);
  for (let i = 0; i < n; i++) {
    s = (Math.imul(s, 1664525) + 1013904223) >>> 0;
    out[i] = amp * (s / 2 ** 31 - 1);
  }
  return out;
}
