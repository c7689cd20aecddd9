/**
 * The discrete Fourier transform for all of coilcue: the one module that owns it, wrapping `fft.js`
 * (a radix-4 Cooley–Tukey FFT on typed arrays). Nothing else imports `fft.js`.
 *
 * Convention (everywhere in coilcue): unnormalised forward transform, 1/N on the inverse,
 *
 *   X[k] = Σₙ x[n]·e^(−j2πkn/N),   x[n] = (1/N)·Σₖ X[k]·e^(+j2πkn/N),
 *
 * so Parseval reads Σₙ x[n]² = (1/N)·Σₖ |X[k]|² over all N bins (Oppenheim & Schafer,
 * *Discrete-Time Signal Processing*, 3rd ed., ch. 8, properties of the DFT). Real input gives a
 * Hermitian spectrum, X[N−k] = conj X[k], so only the one-sided bins 0…N/2 are stored.
 *
 * Design figure measured on the project machine: fft-js (the independent oracle in the tests, a
 * recursive teaching implementation) takes 1.6–7.5 ms per 4096-point transform, fft.js about 45 µs.
 */
import FFT from 'fft.js';

/**
 * True when n is an integer power of two ≥ 1.
 *
 * @example isPowerOfTwo(512) // → true; isPowerOfTwo(441) // → false
 */
export const isPowerOfTwo = (n: number): boolean => Number.isInteger(n) && n >= 1 && (n & (n - 1)) === 0;

/**
 * The smallest power of two ≥ n (n ≥ 1; returns 1 for n ≤ 1).
 *
 * @example nextPowerOfTwo(441) // → 512
 */
export function nextPowerOfTwo(n: number): number {
  let p = 1;
  while (p < n) p *= 2;
  return p;
}

/** One-sided spectrum: real and imaginary parts of bins 0…N/2 (length N/2 + 1 each). */
export interface OneSidedSpectrum {
  re: Float64Array;
  im: Float64Array;
}

/**
 * A real-input FFT of fixed size N (a power of two ≥ 4), with its work buffers allocated once
 * (`inverse`'s on its first call): `forward`, `forwardPair`, `powerSpectrum` and `inverse` allocate
 * nothing else when given `out` arrays.
 *
 * - `forward(x)`: X[k] = Σₙ x[n]·e^(−j2πkn/N), k = 0…N/2 (input shorter than N is zero-padded).
 * - `powerSpectrum(x)`: |X[k]|², k = 0…N/2, unnormalised (callers apply their own scaling).
 * - `inverse(X)`: x[n] = (1/N)·Σ X[k]·e^(+j2πkn/N) for a Hermitian spectrum given by bins 0…N/2;
 *   done as one complex FFT of size N/2 (even samples in the real part, odd in the imaginary part),
 *   the standard packing for real sequences (Press et al., *Numerical Recipes*, 3rd ed., 2007, §12.3).
 *
 * Not re-entrant: one instance must not be used by two computations at once (there are no threads in
 * shared code, so this only matters for callbacks).
 *
 * @example
 *   const f = new RealFft(8);
 *   f.powerSpectrum([1, 0, 0, 0, 0, 0, 0, 0]); // → five ones: an impulse has a flat spectrum
 */
export class RealFft {
  /** Transform size N. */
  readonly size: number;
  /** Number of one-sided bins, N/2 + 1. */
  readonly bins: number;
  private readonly full: FFT;
  private readonly inBuf: Float64Array;
  private readonly outBuf: Float64Array;
  private pairIn: Float64Array | null = null;
  /** How many real (usedA) and imaginary (usedB) parts of pairIn the last pair call wrote; the rest are 0. */
  private usedA = 0;
  private usedB = 0;
  /** What only `inverse` uses, made on its first call (Welch's spectra never need it). */
  private inv: InverseParts | null = null;

  constructor(size: number) {
    if (!isPowerOfTwo(size) || size < 4) {
      throw new RangeError(`RealFft: size must be a power of two ≥ 4, got ${size}`);
    }
    this.size = size;
    this.bins = size / 2 + 1;
    this.full = new FFT(size);
    this.inBuf = new Float64Array(size);
    this.outBuf = new Float64Array(2 * size);
  }

  /** Runs fft.js on `input` (zero-padded to N) into outBuf (interleaved bins 0…N/2). */
  private transformInto(input: ArrayLike<number>): void {
    const n = this.size;
    const len = input.length;
    if (len > n) throw new RangeError(`RealFft: input has ${len} values, more than size ${n}`);
    const buf = this.inBuf;
    for (let i = 0; i < len; i++) buf[i] = input[i];
    buf.fill(0, len);
    this.full.realTransform(this.outBuf, buf);
  }

  /**
   * One-sided forward transform X[k] = Σₙ x[n]·e^(−j2πkn/N), k = 0…N/2.
   *
   * @param input up to N samples (any unit); fewer are zero-padded at the end
   * @param outRe real parts, N/2 + 1 values (allocated when absent)
   * @param outIm imaginary parts, N/2 + 1 values (allocated when absent)
   * @returns `{ re: outRe, im: outIm }`
   * @example new RealFft(4).forward([1, 1, 1, 1]).re // → [4, 0, 0]
   */
  forward(
    input: ArrayLike<number>,
    outRe: Float64Array = new Float64Array(this.bins),
    outIm: Float64Array = new Float64Array(this.bins),
  ): OneSidedSpectrum {
    this.transformInto(input);
    const o = this.outBuf;
    for (let k = 0; k < this.bins; k++) {
      outRe[k] = o[2 * k];
      outIm[k] = o[2 * k + 1];
    }
    outIm[0] = 0;
    outIm[this.bins - 1] = 0;
    return { re: outRe, im: outIm };
  }

  /**
   * Unnormalised power spectrum |X[k]|², k = 0…N/2 (for a one-sided density multiply bins
   * 1…N/2−1 by 2 and divide by fs·Σw², see welch.ts).
   *
   * @param input up to N samples; fewer are zero-padded
   * @param out N/2 + 1 values (allocated when absent)
   * @example new RealFft(4).powerSpectrum([1, -1, 1, -1]) // → [0, 0, 16]
   */
  powerSpectrum(input: ArrayLike<number>, out: Float64Array = new Float64Array(this.bins)): Float64Array {
    this.transformInto(input);
    const o = this.outBuf;
    for (let k = 0; k < this.bins; k++) {
      const re = o[2 * k];
      const im = o[2 * k + 1];
      out[k] = re * re + im * im;
    }
    return out;
  }

  /**
   * Inverse of a Hermitian spectrum given by its one-sided bins: x[n] = (1/N)·Σₖ X[k]·e^(+j2πkn/N)
   * over all N bins with X[N−k] = conj X[k]. The imaginary parts of bins 0 and N/2 are taken as 0.
   *
   * Packing (Numerical Recipes §12.3): with M = N/2, A[k] = (X[k] + conj X[M−k])/2 is the DFT of the even
   * samples and B[k] = (X[k] − conj X[M−k])·e^(+j2πk/N)/2 that of the odd ones; z = IDFT_M(A + jB)
   * gives x[2n] = Re z[n], x[2n+1] = Im z[n].
   *
   * @param re real parts of bins 0…N/2
   * @param im imaginary parts of bins 0…N/2
   * @param out N real samples (allocated when absent)
   * @example new RealFft(4).inverse(Float64Array.of(4, 0, 0), new Float64Array(3)) // → [1, 1, 1, 1]
   */
  inverse(re: ArrayLike<number>, im: ArrayLike<number>, out: Float64Array = new Float64Array(this.size)): Float64Array {
    const m = this.size / 2;
    const p = (this.inv ??= inverseParts(this.size));
    packHermitian(p.zin, re, im, m, p.cosTw, p.sinTw);
    if (out.length === this.size) {
      // fft.js writes (and scales) exactly `out`'s N values: no copy through zout needed
      p.half.inverseTransform(out, p.zin);
      return out;
    }
    p.half.inverseTransform(p.zout, p.zin);
    const z = p.zout;
    for (let i = 0; i < this.size; i++) out[i] = z[i];
    return out;
  }

  /**
   * Summed power of two real sequences' spectra, |A[k]|² + |B[k]|², k = 0…N/2, from one complex FFT
   * of z = a + j·b: with A[k] = (Z[k] + conj Z[N−k])/2 and B[k] = (Z[k] − conj Z[N−k])/(2j)
   * (Press et al., *Numerical Recipes*, 3rd ed., §12.3), |A|² + |B|² = (|Z[k]|² + |Z[N−k]|²)/2
   * (the cross terms cancel), indices mod N. Averaged periodograms (Welch, spectrograms) need only
   * this sum, so the two spectra are never separated.
   *
   * @param interleaved the pair as one complex sequence: a[0], b[0], a[1], b[1], … (2N values; the
   *   caller writes it, windowed and zero-padded as it needs)
   * @param out N/2 + 1 values (allocated when absent), unnormalised like {@link RealFft.powerSpectrum}
   * @example f.pairedPower(z, p) // p[k] = powerSpectrum(a)[k] + powerSpectrum(b)[k]
   */
  pairedPower(interleaved: Float64Array, out: Float64Array = new Float64Array(this.bins)): Float64Array {
    const n = this.size;
    if (interleaved.length !== 2 * n) {
      throw new RangeError(`RealFft.pairedPower: interleaved must hold 2·N = ${2 * n} values, got ${interleaved.length}`);
    }
    const o = this.outBuf;
    this.full.transform(o, interleaved);
    out[0] = o[0] * o[0] + o[1] * o[1];
    for (let k = 1; k < this.bins; k++) {
      const j = 2 * (n - k);
      const zr = o[2 * k];
      const zi = o[2 * k + 1];
      const yr = o[j];
      const yi = o[j + 1];
      out[k] = 0.5 * (zr * zr + zi * zi + yr * yr + yi * yi);
    }
    return out;
  }

  /**
   * {@link RealFft.pairedPower} added into accumulators instead of written out: acc[k] += p[k] and,
   * when given, also[k] += p[k], with p[k] = |A[k]|² + |B[k]|² computed exactly as pairedPower does
   * (so the sums are those of pairedPower followed by an adding loop, bit for bit), in one pass.
   *
   * @param interleaved a[0], b[0], a[1], b[1], … (2N values), as for pairedPower
   * @param acc N/2 + 1 running sums, added to
   * @param also optionally a second set of N/2 + 1 running sums, added to as well
   * @example f.accumulatePairedPower(z, welchSum, columnSum)
   */
  accumulatePairedPower(interleaved: Float64Array, acc: Float64Array, also?: Float64Array): void {
    const n = this.size;
    if (interleaved.length !== 2 * n) {
      throw new RangeError(
        `RealFft.accumulatePairedPower: interleaved must hold 2·N = ${2 * n} values, got ${interleaved.length}`,
      );
    }
    const o = this.outBuf;
    this.full.transform(o, interleaved);
    if (also === undefined) addPairedPower(o, n, acc);
    else addPairedPower2(o, n, acc, also);
  }

  /**
   * One-sided transforms of two real sequences with one complex FFT of size N ("FFT of two real
   * functions simultaneously", Press et al., *Numerical Recipes*, 3rd ed., §12.3): with z = a + j·b,
   * A[k] = (Z[k] + conj Z[N−k])/2 and B[k] = (Z[k] − conj Z[N−k])/(2j). Same results as two calls
   * of {@link RealFft.forward}, for about two thirds of the work.
   *
   * @param a, b up to N samples each; shorter ones are zero-padded
   * @param aRe, aIm, bRe, bIm N/2 + 1 values each, written
   * @example f.forwardPair(block0, block1, r0, i0, r1, i1)
   */
  forwardPair(
    a: ArrayLike<number>,
    b: ArrayLike<number>,
    aRe: Float64Array,
    aIm: Float64Array,
    bRe: Float64Array,
    bIm: Float64Array,
  ): void {
    const n = this.size;
    if (a.length > n || b.length > n) {
      throw new RangeError(`RealFft.forwardPair: inputs of ${a.length} and ${b.length} values, more than size ${n}`);
    }
    const z = this.pairBuffer();
    for (let i = 0; i < a.length; i++) z[2 * i] = a[i];
    for (let i = 0; i < b.length; i++) z[2 * i + 1] = b[i];
    this.transformPair(a.length, b.length, aRe, aIm, bRe, bIm);
  }

  /**
   * {@link RealFft.forwardPair} of two adjacent stretches of one array, a = src[from…mid−1] and
   * b = src[mid…to−1] (each up to N values, zero-padded), with the same results bit for bit but no
   * views to make: only the values the previous call wrote are cleared.
   *
   * @param src the samples (any unit)
   * @param from, mid, to offsets into src, from ≤ mid ≤ to, mid − from ≤ N and to − mid ≤ N
   * @param aRe, aIm, bRe, bIm N/2 + 1 values each, written
   * @example f.forwardPairAdjacent(xs, 0, hop, 2 * hop, r0, i0, r1, i1)
   */
  forwardPairAdjacent(
    src: Float32Array,
    from: number,
    mid: number,
    to: number,
    aRe: Float64Array,
    aIm: Float64Array,
    bRe: Float64Array,
    bIm: Float64Array,
  ): void {
    const n = this.size;
    const lenA = mid - from;
    const lenB = to - mid;
    if (!(lenA >= 0 && lenB >= 0 && lenA <= n && lenB <= n && from >= 0 && to <= src.length)) {
      throw new RangeError(`RealFft.forwardPairAdjacent: ${from}…${mid}…${to} is not two stretches of ≤ ${n} values in 0…${src.length}`);
    }
    interleavePair(this.pairBuffer(), src, from, lenA, mid, lenB);
    this.transformPair(lenA, lenB, aRe, aIm, bRe, bIm);
  }

  /** The interleaved buffer of the pair methods (made on first use); beyond what the last one wrote, zeros. */
  private pairBuffer(): Float64Array {
    return (this.pairIn ??= new Float64Array(2 * this.size));
  }

  /**
   * The rest of a pair call once a (lenA values) and b (lenB values) are written into pairBuffer():
   * clears what a longer previous call left beyond them (zero padding), transforms, and separates
   * the two one-sided spectra.
   */
  private transformPair(lenA: number, lenB: number, aRe: Float64Array, aIm: Float64Array, bRe: Float64Array, bIm: Float64Array): void {
    const z = this.pairBuffer();
    for (let i = lenA; i < this.usedA; i++) z[2 * i] = 0;
    for (let i = lenB; i < this.usedB; i++) z[2 * i + 1] = 0;
    this.usedA = lenA;
    this.usedB = lenB;
    this.full.transform(this.outBuf, z);
    splitPair(this.outBuf, this.size, aRe, aIm, bRe, bIm);
  }
}

/** The complex FFT of size N/2, its buffers and the twiddles e^(+j2πk/N), k < N/2, of {@link RealFft.inverse}. */
interface InverseParts {
  half: FFT;
  zin: Float64Array;
  zout: Float64Array;
  cosTw: Float64Array;
  sinTw: Float64Array;
}

function inverseParts(size: number): InverseParts {
  const m = size / 2;
  const cosTw = new Float64Array(m);
  const sinTw = new Float64Array(m);
  for (let k = 0; k < m; k++) {
    cosTw[k] = Math.cos((2 * Math.PI * k) / size);
    sinTw[k] = Math.sin((2 * Math.PI * k) / size);
  }
  return { half: new FFT(m), zin: new Float64Array(size), zout: new Float64Array(size), cosTw, sinTw };
}

/**
 * The packing of {@link RealFft.inverse}: zin[2k] + j·zin[2k+1] = A[k] + j·B[k], k = 0…M−1, from the
 * one-sided bins X[0…M] (M = N/2; imaginary parts of bins 0 and M taken as 0). Bin 0 is done on its
 * own so the loop carries no test; every value sees the same operations as in one general loop.
 */
function packHermitian(
  zin: Float64Array,
  re: ArrayLike<number>,
  im: ArrayLike<number>,
  m: number,
  cosTw: Float64Array,
  sinTw: Float64Array,
): void {
  {
    const xr = re[0];
    const xi = 0;
    const yr = re[m];
    const yi = 0;
    const ar = 0.5 * (xr + yr);
    const ai = 0.5 * (xi + yi);
    const dr = 0.5 * (xr - yr);
    const di = 0.5 * (xi - yi);
    const c = cosTw[0];
    const s = sinTw[0];
    const br = dr * c - di * s;
    const bi = dr * s + di * c;
    zin[0] = ar - bi;
    zin[1] = ai + br;
  }
  for (let k = 1, j = m - 1, o = 2; k < m; k++, j--, o += 2) {
    const xr = re[k];
    const xi = im[k];
    const yr = re[j];
    const yi = -im[j]; // conj X[M−k]
    const ar = 0.5 * (xr + yr);
    const ai = 0.5 * (xi + yi);
    const dr = 0.5 * (xr - yr);
    const di = 0.5 * (xi - yi);
    // B = D·e^(+jθ), θ = 2πk/N
    const c = cosTw[k];
    const s = sinTw[k];
    const br = dr * c - di * s;
    const bi = dr * s + di * c;
    // Z = A + jB
    zin[o] = ar - bi;
    zin[o + 1] = ai + br;
  }
}

/**
 * p[k] = (|Z[k]|² + |Z[N−k]|²)/2 added into acc, k = 0…N/2 ({@link RealFft.pairedPower}); `o` holds
 * Z interleaved (2N values).
 */
function addPairedPower(o: Float64Array, n: number, acc: Float64Array): void {
  acc[0] += o[0] * o[0] + o[1] * o[1];
  for (let k = 1, i = 2, j = 2 * n - 2; i <= j; k++, i += 2, j -= 2) {
    const zr = o[i];
    const zi = o[i + 1];
    const yr = o[j];
    const yi = o[j + 1];
    acc[k] += 0.5 * (zr * zr + zi * zi + yr * yr + yi * yi);
  }
}

/** {@link addPairedPower} into two sets of sums at once. */
function addPairedPower2(o: Float64Array, n: number, acc: Float64Array, also: Float64Array): void {
  const p0 = o[0] * o[0] + o[1] * o[1];
  acc[0] += p0;
  also[0] += p0;
  for (let k = 1, i = 2, j = 2 * n - 2; i <= j; k++, i += 2, j -= 2) {
    const zr = o[i];
    const zi = o[i + 1];
    const yr = o[j];
    const yi = o[j + 1];
    const p = 0.5 * (zr * zr + zi * zi + yr * yr + yi * yi);
    acc[k] += p;
    also[k] += p;
  }
}

/** z[2i] = src[a + i] (i < lenA), z[2i + 1] = src[b + i] (i < lenB); other values untouched. */
function interleavePair(z: Float64Array, src: Float32Array, a: number, lenA: number, b: number, lenB: number): void {
  for (let i = 0, o = 0; i < lenA; i++, o += 2) z[o] = src[a + i];
  for (let i = 0, o = 1; i < lenB; i++, o += 2) z[o] = src[b + i];
}

/**
 * Separates the transform Z of z = a + j·b (interleaved in `o`, 2N values) into the one-sided
 * spectra of a and b ({@link RealFft.forwardPair}): A[k] = (Z[k] + conj Z[N−k])/2,
 * B[k] = (Z[k] − conj Z[N−k])/(2j), k = 0…N/2, imaginary parts of bins 0 and N/2 set to 0.
 */
function splitPair(
  o: Float64Array,
  n: number,
  aRe: Float64Array,
  aIm: Float64Array,
  bRe: Float64Array,
  bIm: Float64Array,
): void {
  // bin 0: Z[N−0] is Z[0]
  const z0r = o[0];
  const z0i = o[1];
  aRe[0] = 0.5 * (z0r + z0r);
  bRe[0] = 0.5 * (z0i - -z0i);
  aIm[0] = 0;
  bIm[0] = 0;
  const last = n / 2;
  for (let k = 1, i = 2, j = 2 * n - 2; k <= last; k++, i += 2, j -= 2) {
    const zr = o[i];
    const zi = o[i + 1];
    const yr = o[j];
    const yi = -o[j + 1]; // conj Z[N−k]
    aRe[k] = 0.5 * (zr + yr);
    aIm[k] = 0.5 * (zi + yi);
    bRe[k] = 0.5 * (zi - yi);
    bIm[k] = -0.5 * (zr - yr);
  }
  aIm[last] = 0;
  bIm[last] = 0;
}
