/**
 * Average power spectral density by Welch's method: P. D. Welch, "The use of fast Fourier transform
 * for the estimation of power spectra: a method based on time averaging over short, modified
 * periodograms", IEEE Trans. Audio Electroacoust. AU-15(2), 1967, pp. 70–73.
 *
 * coilcue's spectrum convention (the same in welch.ts, spectrogram.ts and spectral-features.ts):
 * periodic Hann window, one-sided **power spectral density** in FS²/Hz (FS = digital full scale, so a
 * ±1 sine has mean square ½), scaled so that the density integrates to the mean square:
 *
 *   psd[k] = cₖ · mean over segments of |Σₙ w[n]·x[n]·e^(−j2πkn/N)|² / (fs · Σₙ w[n]²),
 *   cₖ = 1 for k = 0 and k = N/2, 2 otherwise (the negative frequencies folded in),
 *
 *   Σₖ psd[k] · binHz ≈ mean(x²)      (Parseval in density form; binHz = fs/N).
 *
 * A sine of amplitude A on a bin centre therefore shows a peak of (A²/2)/(binHz·ENBW) with
 * ENBW = 1.5 bins for Hann (Harris, Proc. IEEE 66(1), 1978), and its power A²/2 is the sum of the
 * bins under the peak times binHz. No detrending (unlike scipy.signal.welch's default): a DC offset
 * is part of what a modulated coil sees and shows in bin 0.
 */
import { RealFft, isPowerOfTwo } from './fft.ts';
import { hannWindow } from './window.ts';

/** A one-sided power spectral density (units FS²/Hz) on a uniform frequency grid. */
export interface PowerSpectrum {
  /** Bin centre frequencies k·binHz, k = 0…size/2, in Hz. */
  frequencyHz: Float64Array;
  /** One-sided power spectral density per bin, in FS²/Hz (see the module comment for the scaling). */
  psd: Float64Array;
  /** Bin spacing fs/size, in Hz. */
  binHz: number;
}

/** Options of {@link welchPsd}. */
export interface WelchOptions {
  /** FFT size, a power of two ≥ 4 (default 4096). */
  size?: number;
  /** Sees each pair (or lone segment) of periodograms as it is made; see {@link welchPsd}. */
  onSegments?: (first: number, count: 1 | 2, power: Float64Array) => void;
}

/** Welch's estimate: the spectrum plus how it was made. */
export interface WelchSpectrum extends PowerSpectrum {
  /** Number of segments averaged (1 when the signal is shorter than one segment). */
  segments: number;
  /** FFT size in samples (the segment length, unless the signal was shorter: then it was zero-padded). */
  size: number;
}

/**
 * One-sided PSD by Welch's method: periodic Hann segments of `size` samples with 50 % overlap
 * (hop size/2), periodograms averaged, density scaling as in the module comment (Welch 1967).
 * Segments go through the FFT in pairs (two real segments as one complex sequence, their summed
 * periodogram read off its transform: RealFft.accumulatePairedPower, or RealFft.pairedPower when
 * `onSegments` is given); the sums are added in segment order, with the same result either way.
 * `opts.onSegments` sees each pair's (or lone segment's) summed periodogram as it is made, so a
 * caller can group segments in time (welchSpectrogram in spectrogram.ts) without another FFT.
 *
 * Segments start at 0, size/2, size, …; trailing samples that do not fill a whole segment are not
 * used (at most size/2 − 1 of them, as scipy.signal.welch does). A signal shorter than `size` (but
 * not empty) is analysed as one segment: a Hann window of the signal's own length, zero-padded to
 * `size`; the density scaling uses that window, so Parseval still holds, but the frequency resolution
 * is that of the short signal (the extra bins interpolate). Signals of 1–3 samples use a rectangular
 * window (a Hann window that short is mostly zeros).
 *
 * @param signal samples, full scale ±1
 * @param sampleRate in Hz (> 0)
 * @param opts.size FFT size, a power of two ≥ 4 (default 4096: 10.8 Hz bins at 44.1 kHz)
 * @param opts.onSegments called for segments first…first+count−1 (count 1 or 2, in order) with their
 *   summed unnormalised periodogram Σ|X[k]|², k = 0…N/2 (the array is reused: copy what you keep)
 * @returns frequencyHz, psd (FS²/Hz), binHz, segments, size
 * @throws RangeError for an empty signal, a bad sample rate or size
 * @example
 *   // 1 s of a 1 kHz sine, amplitude 0.5, at 48 kHz: Σ psd·binHz ≈ 0.125; peak near 1000 Hz
 *   const s = welchPsd(sine, 48000); // s.binHz = 11.72, s.segments = 22
 */
export function welchPsd(
  signal: Float32Array,
  sampleRate: number,
  opts: WelchOptions = {},
): WelchSpectrum {
  return welchCore('welchPsd', signal, sampleRate, opts.size ?? 4096, opts.onSegments, undefined);
}

/**
 * {@link welchPsd} (default options) that also adds each pair's (or lone segment's) summed
 * periodogram Σ|X[k]|², k = 0…N/2, into the array `groupSum(first, count)` returns for segments
 * first…first+count−1 (called once per group, in order, before its periodogram is added): how
 * welchSpectrogram (spectrogram.ts) builds its columns from Welch's own FFTs without a copy. The
 * spectrum and the sums are bit for bit those of welchPsd with an onSegments hook adding `power`.
 *
 * @param signal samples, full scale ±1
 * @param sampleRate in Hz (> 0)
 * @param size FFT size, a power of two ≥ 4
 * @param groupSum gives the N/2 + 1 running sums to add a group's periodogram to
 * @returns as welchPsd
 * @throws RangeError as welchPsd
 * @example welchPsdGrouped(mix, 44100, 4096, (first) => columnSums[columnOf(first)])
 */
export function welchPsdGrouped(
  signal: Float32Array,
  sampleRate: number,
  size: number,
  groupSum: (first: number, count: 1 | 2) => Float64Array,
): WelchSpectrum {
  return welchCore('welchPsd', signal, sampleRate, size, undefined, groupSum);
}

/**
 * z[2i] = x[a + i]·w[i], z[2i + 1] = x[b + i]·w[i], i = 0…m − 1: two segments windowed and
 * interleaved as one complex sequence (caller keeps a + m and b + m within x, m within w). Nothing
 * is computed before the loop: an operation there has no type feedback on the first (cold) call,
 * which runs before V8 allocates feedback, and the optimised code would deoptimise on it.
 */
function windowPair(z: Float64Array, x: Float32Array, a: number, b: number, w: Float64Array, m: number): void {
  for (let i = 0, o = 0; i < m; i++, o += 2) {
    const wi = w[i];
    z[o] = x[a + i] * wi;
    z[o + 1] = x[b + i] * wi;
  }
}

/** acc[k] += p[k] for every k. */
function addInto(acc: Float64Array, p: Float64Array): void {
  for (let k = 0; k < acc.length; k++) acc[k] += p[k];
}

function welchCore(
  fn: string,
  signal: Float32Array,
  sampleRate: number,
  size: number,
  onSegments: WelchOptions['onSegments'],
  groupSum: ((first: number, count: 1 | 2) => Float64Array) | undefined,
): WelchSpectrum {
  if (!isPowerOfTwo(size) || size < 4) {
    throw new RangeError(`${fn}: opts.size must be a power of two ≥ 4, got ${size}`);
  }
  if (!(sampleRate > 0) || !Number.isFinite(sampleRate)) {
    throw new RangeError(`${fn}: sampleRate must be a positive number of Hz, got ${sampleRate}`);
  }
  const n = signal.length;
  if (n === 0) throw new RangeError(`${fn}: signal is empty`);

  const fft = new RealFft(size);
  const bins = fft.bins;
  const acc = new Float64Array(bins);
  const power = new Float64Array(bins);

  const segLen = Math.min(n, size);
  const w = segLen >= 4 ? hannWindow(segLen) : new Float64Array(segLen).fill(1);
  let sumW2 = 0;
  for (let i = 0; i < segLen; i++) sumW2 += w[i] * w[i];

  const hop = size / 2;
  const segments = n < size ? 1 : Math.floor((n - size) / hop) + 1;
  // Segments go through the FFT two at a time: segment s windowed into the real parts, s + 1 (which
  // starts hop samples later) into the imaginary parts. An odd last one, or a lone short signal
  // (zero-padded to size), goes alone. Unless a hook must see each pair's periodogram on its own,
  // the periodogram is added into the sums (and the group's) in the transform's unpacking pass.
  const z = new Float64Array(2 * size);
  const pairsEnd = segments - (segments % 2);
  if (onSegments !== undefined) {
    for (let s = 0; s < pairsEnd; s += 2) {
      windowPair(z, signal, s * hop, s * hop + hop, w, size);
      fft.pairedPower(z, power);
      addInto(acc, power);
      onSegments(s, 2, power);
    }
  } else {
    segmentPairs(fft, z, signal, 0, hop, w, 0, pairsEnd, acc, groupSum);
  }
  if (pairsEnd < segments) loneSegment(fft, signal, 0, pairsEnd, hop, w, power, acc, onSegments, groupSum);
  return densityOf(acc, segments, sampleRate, sumW2, size);
}

/**
 * The periodograms of segment pairs (s, s + 1), s = s0, s0 + 2, … < s1 (s1 − s0 even), of a signal whose sample i
 * is x[i − base], added into acc and into groupSum(s, 2) in the transform's unpacking pass
 * (RealFft.accumulatePairedPower): welchCore's loop, and WelchSpectrogramStream's (spectrogram.ts)
 * over a signal that arrives in blocks. Kernel: trusts its inputs.
 *
 * @param w the window, fft.size values
 */
export function segmentPairs(
  fft: RealFft,
  z: Float64Array,
  x: Float32Array,
  base: number,
  hop: number,
  w: Float64Array,
  s0: number,
  s1: number,
  acc: Float64Array,
  groupSum: ((first: number, count: 1 | 2) => Float64Array) | undefined,
): void {
  const size = fft.size;
  for (let s = s0; s < s1; s += 2) {
    windowPair(z, x, s * hop - base, s * hop + hop - base, w, size);
    fft.accumulatePairedPower(z, acc, groupSum?.(s, 2));
  }
}

/**
 * Segment s alone (an odd last one, or a signal shorter than one segment: w then as long as the
 * signal, zero-padded to the FFT size), its periodogram added into acc, then handed to onSegments
 * and added into groupSum(s, 1). Kernel: trusts its inputs.
 */
export function loneSegment(
  fft: RealFft,
  x: Float32Array,
  base: number,
  s: number,
  hop: number,
  w: Float64Array,
  power: Float64Array,
  acc: Float64Array,
  onSegments: WelchOptions['onSegments'],
  groupSum: ((first: number, count: 1 | 2) => Float64Array) | undefined,
): void {
  const seg = new Float64Array(fft.size);
  const from = s * hop - base;
  for (let i = 0; i < w.length; i++) seg[i] = x[from + i] * w[i];
  fft.powerSpectrum(seg, power);
  addInto(acc, power);
  onSegments?.(s, 1, power);
  if (groupSum !== undefined) addInto(groupSum(s, 1), power);
}

/** The Welch spectrum from the summed periodograms of `segments` segments (module comment's scaling). */
export function densityOf(acc: Float64Array, segments: number, sampleRate: number, sumW2: number, size: number): WelchSpectrum {
  const bins = acc.length;
  const binHz = sampleRate / size;
  const psd = new Float64Array(bins);
  const frequencyHz = new Float64Array(bins);
  const scale = 1 / (segments * sampleRate * sumW2);
  for (let k = 0; k < bins; k++) {
    const fold = k === 0 || k === bins - 1 ? 1 : 2;
    psd[k] = fold * acc[k] * scale;
    frequencyHz[k] = k * binHz;
  }
  return { frequencyHz, psd, binHz, segments, size };
}

/**
 * {@link welchPsd} (default options) block by block, for a signal that arrives in pieces and is not
 * kept: the segments (size samples, hop size/2, from sample 0) are taken as soon as they are
 * complete, a stretch of whole segments at a time through welchPsd, and the stretches' averages
 * combined in proportion to their segment counts. The same segments and periodograms as welchPsd
 * over the whole signal, summed in another grouping: equal within float64 rounding (~1e-15
 * relative). Memory: the samples since the last stretch began, up to a few hundred thousand.
 * Needs at least `size` samples in all (a shorter signal is welchPsd's special case: use it).
 *
 * @example const w = new WelchStream(44100); w.add(a); w.add(b); w.result() // ≈ welchPsd(a ++ b, 44100)
 */
export class WelchStream {
  private readonly hop: number;
  /** Samples not yet in a stretch (they start at a segment boundary). */
  private buf: Float32Array;
  private filled = 0;
  private sum: Float64Array | null = null;
  private segments = 0;
  private last: WelchSpectrum | null = null;

  constructor(
    private readonly sampleRate: number,
    private readonly size = 4096,
    /** Segments per stretch sent to welchPsd. */
    private readonly stretch = 64,
  ) {
    if (!isPowerOfTwo(size) || size < 4) throw new RangeError(`WelchStream: size must be a power of two ≥ 4, got ${size}`);
    this.hop = size / 2;
    this.buf = new Float32Array(size + stretch * this.hop);
  }

  add(x: Float32Array): void {
    let i = 0;
    while (i < x.length) {
      const take = Math.min(x.length - i, this.buf.length - this.filled);
      this.buf.set(x.subarray(i, i + take), this.filled);
      this.filled += take;
      i += take;
      if (this.filled === this.buf.length) this.flush();
    }
  }

  /** Runs welchPsd over the whole segments in the buffer and keeps the last size − hop samples. */
  private flush(): void {
    const { size, hop } = this;
    if (this.filled < size) return;
    const count = Math.floor((this.filled - size) / hop) + 1;
    const span = (count - 1) * hop + size;
    const s = welchPsd(this.buf.subarray(0, span), this.sampleRate, { size });
    this.sum ??= new Float64Array(s.psd.length);
    for (let k = 0; k < s.psd.length; k++) this.sum[k] += s.psd[k] * s.segments;
    this.segments += s.segments;
    this.last = s;
    const next = count * hop; // where the next segment starts
    this.buf.copyWithin(0, next, this.filled);
    this.filled -= next;
  }

  /** The averaged spectrum; RangeError when fewer than `size` samples arrived. */
  result(): WelchSpectrum {
    this.flush();
    if (this.last === null || this.sum === null) throw new RangeError(`WelchStream.result: fewer than ${this.size} samples`);
    const psd = new Float64Array(this.sum.length);
    for (let k = 0; k < psd.length; k++) psd[k] = this.sum[k] / this.segments;
    return { ...this.last, psd, segments: this.segments };
  }
}
