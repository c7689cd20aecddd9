/**
 * True-peak level by ITU-R BS.1770-4 Annex 2: oversample 4× with the standard's 48-tap interpolating
 * FIR (four polyphase branches of 12 taps) and take the largest absolute value.
 *
 * Choices, stated once:
 * - 4× at every sample rate. Annex 2 allows 2× from 96 kHz; the FIR is defined relative to the input
 *   rate, so 4× stays valid there and under-reads less (at most 20·log10(cos(π·f/(4·fs)))).
 * - The input samples count as peaks too: the result is max(sample peak, oversampled peak). The
 *   Annex 2 filter is not a Nyquist filter (its phase 0 is not the identity: centre tap 0.972), so on
 *   its own it can read up to ~0.2 dB below the sample peak (EBU Tech 3341 case 15: −6.22 dB for a
 *   −6.02 dB sample peak), while the reconstructed waveform passes through every sample.
 *   {@link oversampledPeakLinear} gives the filter alone.
 * - The filter starts from rest (zeros before the clip) and runs 11 input periods past the end
 *   (zeros after), so a clip that stops on a peak still shows its overshoot.
 * - Fixed-point meters attenuate by 12.04 dB before the filter for headroom; in float64 that is
 *   unnecessary and omitted.
 */
import { ampToDb } from '../units.ts';
import { checkChannels } from './check-channels.ts';

/** Polyphase branch 0 of the BS.1770-4 Annex 2 interpolation filter (12 taps, exact binary fractions). */
export const TRUE_PEAK_PHASE0: readonly number[] = [
  0.001708984375, 0.010986328125, -0.0196533203125, 0.033203125, -0.0594482421875, 0.1373291015625,
  0.97216796875, -0.102294921875, 0.047607421875, -0.0266113281250, 0.014892578125, -0.00830078125,
];
/** Polyphase branch 1 of the BS.1770-4 Annex 2 interpolation filter. Branch 2 is it reversed, 3 is branch 0 reversed. */
export const TRUE_PEAK_PHASE1: readonly number[] = [
  -0.0291748046875, 0.029296875, -0.0517578125, 0.089111328125, -0.1665039062500, 0.465087890625,
  0.77978515625, -0.2003173828125, 0.1015625, -0.0582275390625, 0.0330810546875, -0.0189208984375,
];

/** The four branches h_p[k], p = 0…3, k = 0…11: y[4n + p] = Σ_k h_p[k]·x[n − k]. BS.1770-4 Annex 2. */
export const TRUE_PEAK_PHASES: readonly (readonly number[])[] = [
  TRUE_PEAK_PHASE0,
  TRUE_PEAK_PHASE1,
  [...TRUE_PEAK_PHASE1].reverse(),
  [...TRUE_PEAK_PHASE0].reverse(),
];

const TAPS = 12;
/**
 * Output positions checked together against one bound; must be ≥ TAPS − 1 (see peakKernel). Pass 1
 * ({@link blockMaximaByBits}) is unrolled for exactly 16.
 */
const CHUNK = 16;
/**
 * max over branches of Σ_k |h_p[k]|, raised by 1e-12 relative: a computed |y| can exceed the exact
 * Σ|h||x| bound by at most ~12 rounding errors (~3e-15 relative), so the margin keeps the skip exact.
 */
const ABS_TAP_SUM_BOUND =
  Math.max(...TRUE_PEAK_PHASES.map((h) => h.reduce((s, v) => s + Math.abs(v), 0))) * (1 + 1e-12);
/** A binary32 pattern with the sign bit cleared; for non-NaN values it orders as |x| (IEEE 754). */
const ABS_BITS_MASK = 0x7fffffff;
/** The pattern of +Infinity; any larger masked pattern is a NaN. */
const INFINITY_BITS = 0x7f800000;
/** Longest channel pass 1 reads by bits; its int32 index arithmetic stays below 2³¹ (longer → plain pass). */
const MAX_BITS_PASS_LENGTH = 2 ** 30;

/** Largest |x[i]| (the sample peak), linear full scale. Empty → 0. */
export function samplePeakLinear(samples: Float32Array): number {
  let m = 0;
  for (let i = 0; i < samples.length; i++) {
    const a = Math.abs(samples[i]);
    if (a > m) m = a;
  }
  return m;
}

/** All four branch outputs at input position n, with x outside [0, N) taken as 0; returns max |y|. */
function peakAtEdge(x: Float32Array, n: number): number {
  let m = 0;
  for (const h of TRUE_PEAK_PHASES) {
    let acc = 0;
    for (let k = 0; k < TAPS; k++) {
      const i = n - k;
      if (i >= 0 && i < x.length) acc += h[k] * x[i];
    }
    const a = Math.abs(acc);
    if (a > m) m = a;
  }
  return m;
}

/**
 * Largest |y| of the 4× oversampled signal, y[4n + p] = Σ_{k=0}^{11} h_p[k]·x[n−k] for n = 0 … N + 10
 * (the BS.1770-4 Annex 2 FIR alone, zeros outside the clip). Linear full scale; empty → 0.
 * Source: ITU-R BS.1770-4 Annex 2. See {@link channelTruePeakLinear} for the measured true peak.
 *
 * @example oversampledPeakLinear(fsOver4SineAt0Deg) // → 0.4888 (−6.22 dB; EBU Tech 3341 case 15)
 */
export function oversampledPeakLinear(samples: Float32Array): number {
  return peakKernel(samples, false);
}

/**
 * True peak of one channel: max(sample peak, max |y| of the 4× oversampled signal), linear full
 * scale (see the file header for why the samples count). Source: ITU-R BS.1770-4 Annex 2.
 *
 * Exact skipping: output positions are taken in runs of 16; every |y| in a run is at most
 * max_p Σ_k|h_p[k]| (= 2.023) × the largest |x| among the run's 16 inputs and the 16 before them.
 * The block maxima come from one pass that also yields the sample peak, the running maximum starts
 * there, and runs whose bound cannot beat it are never filtered. The result is bit-identical to
 * filtering every position (the tests check it), typically several times faster on music.
 *
 * @param samples one channel, full scale ±1 (finite values)
 * @example channelTruePeakLinear(fsOver4SineAt45Deg) // → 0.50 (−6.0 dBTP; its samples peak at 0.354)
 */
export function channelTruePeakLinear(samples: Float32Array): number {
  return peakKernel(samples, true);
}

function peakKernel(x: Float32Array, includeSamples: boolean): number {
  const n = x.length;
  if (n === 0) return 0;
  // Pass 1: max |x| of each block of CHUNK inputs (exact in float32) and the sample peak.
  const blockMax = new Float32Array(Math.ceil(n / CHUNK) + 1); // one spare zero block for the flush tail
  let samplePeak = n <= MAX_BITS_PASS_LENGTH ? blockMaximaByBits(x, blockMax) : Number.NaN;
  if (Number.isNaN(samplePeak)) samplePeak = blockMaximaPlain(x, blockMax);

  // Pass 2: outputs [start, start + CHUNK) read inputs [start − 11, start + CHUNK); CHUNK ≥ 11, so the
  // max of this input block and the previous one bounds every |y| in the run. Rounding is monotone,
  // so max(a, b)·B = max(a·B, b·B) and each block's product is tested twice (no branch on a < b).
  const bound = ABS_TAP_SUM_BOUND;
  const total = n + TAPS - 1;
  const runs = Math.ceil(total / CHUNK);
  let run = includeSamples ? samplePeak : 0;
  let previous = 0;
  for (let blk = 0; blk < runs; blk++) {
    const current = blockMax[blk] * bound;
    if (current > run || previous > run) {
      const start = blk * CHUNK;
      run = filteredPeak(x, start, Math.min(start + CHUNK, total), run);
    }
    previous = current;
  }
  return run;
}

/**
 * Pass 1 of {@link peakKernel}: blockMax[b] = max |x[i]| over inputs [16b, 16b + 16) and the largest
 * of them (the sample peak), or NaN when x holds a NaN (blockMax then incomplete: use
 * {@link blockMaximaPlain}). Needs x.length ≤ 2³⁰.
 *
 * Exact and free of data-dependent branches (a running `if (a > m)` mispredicts on audio): for
 * non-NaN binary32 values |x| orders as the bit pattern with the sign cleared (IEEE 754 places the
 * biased exponent above the mantissa), so maxima are taken on those int32 patterns as
 * max(m, v) = m − (d & (d >> 31)), d = m − v (both in [0, 2³¹), so d cannot overflow), with four
 * running maxima per block, and stored through an Int32Array view of blockMax.
 */
function blockMaximaByBits(x: Float32Array, blockMax: Float32Array): number {
  const n = x.length;
  const mask = ABS_BITS_MASK;
  const bits = new Int32Array(x.buffer, x.byteOffset, n);
  const out = new Int32Array(blockMax.buffer, blockMax.byteOffset, blockMax.length);
  // Whole blocks only. The mask tells the compiler i + 15 stays below 2³¹, so it drops overflow checks.
  const wholeEnd = n & 0x7ffffff0;
  let peak = 0;
  let d = 0;
  for (let i = 0; i < wholeEnd; i += 16) {
    let m0 = bits[i] & mask;
    let m1 = bits[i + 1] & mask;
    let m2 = bits[i + 2] & mask;
    let m3 = bits[i + 3] & mask;
    d = (m0 - (bits[i + 4] & mask)) | 0;
    m0 = (m0 - (d & (d >> 31))) | 0;
    d = (m1 - (bits[i + 5] & mask)) | 0;
    m1 = (m1 - (d & (d >> 31))) | 0;
    d = (m2 - (bits[i + 6] & mask)) | 0;
    m2 = (m2 - (d & (d >> 31))) | 0;
    d = (m3 - (bits[i + 7] & mask)) | 0;
    m3 = (m3 - (d & (d >> 31))) | 0;
    d = (m0 - (bits[i + 8] & mask)) | 0;
    m0 = (m0 - (d & (d >> 31))) | 0;
    d = (m1 - (bits[i + 9] & mask)) | 0;
    m1 = (m1 - (d & (d >> 31))) | 0;
    d = (m2 - (bits[i + 10] & mask)) | 0;
    m2 = (m2 - (d & (d >> 31))) | 0;
    d = (m3 - (bits[i + 11] & mask)) | 0;
    m3 = (m3 - (d & (d >> 31))) | 0;
    d = (m0 - (bits[i + 12] & mask)) | 0;
    m0 = (m0 - (d & (d >> 31))) | 0;
    d = (m1 - (bits[i + 13] & mask)) | 0;
    m1 = (m1 - (d & (d >> 31))) | 0;
    d = (m2 - (bits[i + 14] & mask)) | 0;
    m2 = (m2 - (d & (d >> 31))) | 0;
    d = (m3 - (bits[i + 15] & mask)) | 0;
    m3 = (m3 - (d & (d >> 31))) | 0;
    d = (m0 - m1) | 0;
    m0 = (m0 - (d & (d >> 31))) | 0;
    d = (m2 - m3) | 0;
    m2 = (m2 - (d & (d >> 31))) | 0;
    d = (m0 - m2) | 0;
    m0 = (m0 - (d & (d >> 31))) | 0;
    out[i >> 4] = m0;
    d = (peak - m0) | 0;
    peak = (peak - (d & (d >> 31))) | 0;
  }
  if (wholeEnd < n) {
    let m = 0;
    for (let i = wholeEnd; i < n; i++) {
      const v = bits[i] & mask;
      if (v > m) m = v;
    }
    out[wholeEnd >> 4] = m;
    if (m > peak) peak = m;
  }
  if (peak > INFINITY_BITS) return Number.NaN;
  return new Float32Array(Int32Array.of(peak).buffer)[0];
}

/** Pass 1 with float compares, for any length and for NaN samples (`a > m` is false: NaN never counts). */
function blockMaximaPlain(x: Float32Array, blockMax: Float32Array): number {
  const n = x.length;
  const blocks = Math.ceil(n / CHUNK);
  let samplePeak = 0;
  for (let blk = 0; blk < blocks; blk++) {
    const end = Math.min(n, (blk + 1) * CHUNK);
    let m = 0;
    for (let i = blk * CHUNK; i < end; i++) {
      const a = Math.abs(x[i]);
      if (a > m) m = a;
    }
    blockMax[blk] = m;
    if (m > samplePeak) samplePeak = m;
  }
  return samplePeak;
}

/** max(run, |y| over the four branches at input positions [start, stop)); a NaN output never counts. */
function filteredPeak(x: Float32Array, start: number, stop: number, run: number): number {
  const n = x.length;
  const [h0, h1, h2, h3] = TRUE_PEAK_PHASES;
  const a0 = h0[0], a1 = h0[1], a2 = h0[2], a3 = h0[3], a4 = h0[4], a5 = h0[5];
  const a6 = h0[6], a7 = h0[7], a8 = h0[8], a9 = h0[9], a10 = h0[10], a11 = h0[11];
  const b0 = h1[0], b1 = h1[1], b2 = h1[2], b3 = h1[3], b4 = h1[4], b5 = h1[5];
  const b6 = h1[6], b7 = h1[7], b8 = h1[8], b9 = h1[9], b10 = h1[10], b11 = h1[11];
  const c0 = h2[0], c1 = h2[1], c2 = h2[2], c3 = h2[3], c4 = h2[4], c5 = h2[5];
  const c6 = h2[6], c7 = h2[7], c8 = h2[8], c9 = h2[9], c10 = h2[10], c11 = h2[11];
  const d0 = h3[0], d1 = h3[1], d2 = h3[2], d3 = h3[3], d4 = h3[4], d5 = h3[5];
  const d6 = h3[6], d7 = h3[7], d8 = h3[8], d9 = h3[9], d10 = h3[10], d11 = h3[11];
  for (let p = start; p < stop; p++) {
    if (p < TAPS - 1 || p >= n) {
      const m = peakAtEdge(x, p);
      if (m > run) run = m;
      continue;
    }
    const x0 = x[p], x1 = x[p - 1], x2 = x[p - 2], x3 = x[p - 3], x4 = x[p - 4], x5 = x[p - 5];
    const x6 = x[p - 6], x7 = x[p - 7], x8 = x[p - 8], x9 = x[p - 9], x10 = x[p - 10], x11 = x[p - 11];
    const y0 = a0 * x0 + a1 * x1 + a2 * x2 + a3 * x3 + a4 * x4 + a5 * x5 + a6 * x6 + a7 * x7 + a8 * x8 + a9 * x9 + a10 * x10 + a11 * x11;
    const y1 = b0 * x0 + b1 * x1 + b2 * x2 + b3 * x3 + b4 * x4 + b5 * x5 + b6 * x6 + b7 * x7 + b8 * x8 + b9 * x9 + b10 * x10 + b11 * x11;
    const y2 = c0 * x0 + c1 * x1 + c2 * x2 + c3 * x3 + c4 * x4 + c5 * x5 + c6 * x6 + c7 * x7 + c8 * x8 + c9 * x9 + c10 * x10 + c11 * x11;
    const y3 = d0 * x0 + d1 * x1 + d2 * x2 + d3 * x3 + d4 * x4 + d5 * x5 + d6 * x6 + d7 * x7 + d8 * x8 + d9 * x9 + d10 * x10 + d11 * x11;
    const m0 = Math.abs(y0), m1 = Math.abs(y1), m2 = Math.abs(y2), m3 = Math.abs(y3);
    // Rarely true, so well predicted (Math.max alone branches on which |y| is largest); then the
    // original rule: Math.max is NaN if any output is, and a NaN never beats run.
    if (m0 > run || m1 > run || m2 > run || m3 > run) {
      const m = Math.max(m0, m1, m2, m3);
      if (m > run) run = m;
    }
  }
  return run;
}

/** What {@link measureTruePeak} reports. */
export interface TruePeakReport {
  /** Highest true peak over all channels, linear full scale (1.0 = 0 dBTP). */
  truePeakLinear: number;
  /** The same in dBTP: 20·log10(truePeakLinear); silence → −Infinity. */
  truePeakDbtp: number;
  /** True peak of each channel, linear full scale. */
  perChannelLinear: number[];
}

/**
 * True peak of a clip per ITU-R BS.1770-4 Annex 2 (4× polyphase FIR, see the file header for the
 * choices): per channel max(sample peak, max |4× oversampled|), then the maximum over channels,
 * in dBTP = 20·log10(peak). Source: ITU-R BS.1770-4 Annex 2; test signals EBU Tech 3341 cases 15–19.
 *
 * @param channels planar channels of equal length, full scale ±1
 * @param sampleRate Hz (the filter is relative to it; used for validation only)
 * @example measureTruePeak([fsOver4SineAt45Deg], 48000).truePeakDbtp // → −6.0 dBTP (samples −9.03 dBFS)
 */
export function measureTruePeak(channels: Float32Array[], sampleRate: number): TruePeakReport {
  checkChannels('measureTruePeak', channels, sampleRate);
  return truePeakReport(channels.map(channelTruePeakLinear));
}

/**
 * The report of channels whose true peaks (linear full scale) are known: the highest, and in dBTP.
 * @example truePeakReport([0.5, 0.25]).truePeakDbtp // −6.02
 */
export function truePeakReport(perChannelLinear: number[]): TruePeakReport {
  const truePeakLinear = Math.max(...perChannelLinear);
  return { truePeakLinear, truePeakDbtp: ampToDb(truePeakLinear), perChannelLinear };
}

/**
 * The true peak of one channel measured block by block (ITU-R BS.1770-4 Annex 2, as
 * {@link channelTruePeakLinear}): feed the samples in order with `add`, in blocks of any lengths,
 * then read `value()`. The filter's 11 samples of history are carried from block to block, the
 * filter starts from rest and `value()` runs it 11 periods past the last sample (zeros after), so
 * the result equals channelTruePeakLinear of the whole signal exactly: the same sums of the same
 * products, and the same exact skip (runs of 16 outputs whose bound 2.023 × max |input| cannot beat
 * the running maximum are not filtered). Memory: one block plus 11 samples.
 *
 * @example const m = new TruePeakMeter(); m.add(a); m.add(b); m.value() // = channelTruePeakLinear(a ++ b)
 */
export class TruePeakMeter {
  /** [11 samples of history | the block]; grown to the largest block seen. */
  private buf = new Float32Array(TAPS - 1 + 4096);
  private run = 0;
  private samplePeak = 0;
  private ended = false;

  /** Resets to a new signal. */
  reset(): void {
    this.buf.fill(0, 0, TAPS - 1);
    this.run = 0;
    this.samplePeak = 0;
    this.ended = false;
  }

  /** Block maxima of the block being added (grown as needed). */
  private blockMax = new Float32Array(0);

  /**
   * Adds the next samples (finite values, full scale ±1). The block's maxima over runs of 16
   * inputs and its sample peak come first (blockMaximaByBits, as channelTruePeakLinear's pass 1),
   * so the running maximum the skip tests against already holds the block's own sample peak.
   */
  add(block: Float32Array): void {
    if (this.ended) throw new RangeError('TruePeakMeter.add: the signal was ended by value(); reset() first');
    const h = TAPS - 1;
    const len = block.length;
    if (len === 0) return;
    if (this.buf.length < h + len) {
      const grown = new Float32Array(h + len);
      grown.set(this.buf.subarray(0, h));
      this.buf = grown;
    }
    const buf = this.buf;
    // the largest |x| among the 11 samples of history, before they are overwritten
    let previous = 0;
    for (let i = 0; i < h; i++) {
      const a = Math.abs(buf[i]);
      if (a > previous) previous = a;
    }
    buf.set(block, h);
    const runs = Math.ceil(len / CHUNK);
    if (this.blockMax.length < runs + 1) this.blockMax = new Float32Array(runs + 1);
    const blockMax = this.blockMax;
    // read from the meter's own copy: `block` may lie in shared memory, where V8 reads it slower
    const own = buf.subarray(h, h + len);
    let sp = len <= MAX_BITS_PASS_LENGTH ? blockMaximaByBits(own, blockMax) : Number.NaN;
    if (Number.isNaN(sp)) sp = blockMaximaPlain(own, blockMax);
    if (sp > this.samplePeak) this.samplePeak = sp;
    // Run r: outputs at buffer positions h + 16r … h + 16r + 15, reading inputs 16r … h + 16r + 15,
    // i.e. block run r and the 11 inputs before it (the end of run r − 1, or the history).
    const bound = ABS_TAP_SUM_BOUND;
    let run = Math.max(this.run, this.samplePeak);
    let before = previous * bound;
    for (let r = 0; r < runs; r++) {
      const current = blockMax[r] * bound;
      if (current > run || before > run) {
        const start = h + r * CHUNK;
        run = filteredPeak(buf, start, Math.min(start + CHUNK, h + len), run);
      }
      before = current;
    }
    this.run = run;
    buf.copyWithin(0, len, len + h);
  }

  /** True peak of everything added: max(sample peak, max |4× oversampled|), linear full scale. Ends the signal. */
  value(): number {
    if (!this.ended) {
      // the filter's tail: 11 outputs past the last sample, with zeros after it
      const h = TAPS - 1;
      this.buf.fill(0, h, 2 * h);
      this.filterRange(this.buf, 2 * h);
      this.ended = true;
    }
    return Math.max(this.run, this.samplePeak);
  }

  /** Outputs at buffer positions [11, end), in runs of 16 with the exact skip of peakKernel. */
  private filterRange(buf: Float32Array, end: number): void {
    const h = TAPS - 1;
    const bound = ABS_TAP_SUM_BOUND;
    let run = Math.max(this.run, this.samplePeak);
    for (let start = h; start < end; start += CHUNK) {
      const stop = Math.min(end, start + CHUNK);
      let m = 0;
      for (let i = start - h; i < stop; i++) {
        const a = Math.abs(buf[i]);
        if (a > m) m = a;
      }
      if (m * bound > run) run = filteredPeak(buf, start, stop, run);
    }
    this.run = run;
  }
}
