/**
 * Per-frame statistics of a modulation signal: mean, mean square, minimum and maximum over short
 * frames (default 1 ms). Downstream models (thermal simulation, gain advice) evaluate any gain from
 * these without another pass over the samples, because a rail that follows the audio dissipates
 * according to the signal's mean and mean square within each frame, not its envelope alone.
 *
 * Frame layout (used by every per-frame function in shared/dsp): frame k covers the samples
 * [b(k), b(k+1)) with b(k) = floor(k·fs·frameS), the last frame ending at the clip's end, so it
 * may be shorter. fs·frameS may be fractional (44.1 samples for 1 ms at 44.1 kHz): the frames then
 * hold 44 or 45 samples and their starts never drift from k·frameS by a sample or more.
 */

/** Per-frame statistics of one signal. Serialise typed arrays with Array.from at the edge. */
export interface FrameStats {
  /** Nominal frame length, s. */
  frameS: number;
  /** Sample rate of the analysed signal, Hz. */
  sampleRate: number;
  /** Number of frames: the smallest K with b(K) ≥ sampleCount. */
  count: number;
  /** fs·frameS, samples per frame; may be fractional (see frameStart). */
  samplesPerFrame: number;
  /** Samples in the analysed signal (needed for the length of the last frame). */
  sampleCount: number;
  /** Mean of the samples in each frame, linear full scale. */
  mean: Float64Array;
  /** Mean of the squared samples in each frame, (linear full scale)². */
  meanSquare: Float64Array;
  /** Smallest sample in each frame, linear full scale (exact sample value). */
  min: Float32Array;
  /** Largest sample in each frame, linear full scale (exact sample value). */
  max: Float32Array;
}

/** Caller-owned buffers for computeFrameStats; each must hold at least `count` frames. */
export interface FrameStatsBuffers {
  mean: Float64Array;
  meanSquare: Float64Array;
  min: Float32Array;
  max: Float32Array;
}

/**
 * Relative nudge applied before flooring k·samplesPerFrame, so that products that are integers in
 * exact arithmetic (10·44.1 = 441) are not floored to one less by binary rounding. It moves a
 * boundary only if the exact product lies within 1e-12 relative below an integer (≤ 2e-5 samples
 * for a 5-minute clip), which no sample rate and frame length in decimal seconds produce.
 */
const BOUNDARY_NUDGE = 1 + 1e-12;

/**
 * First sample of frame k: b(k) = floor(k·samplesPerFrame), samples.
 * Kernel: trusts its inputs (k ≥ 0 integer, samplesPerFrame ≥ 1).
 * @example frameStart(10, 44.1) // 441
 */
export const frameStart = (k: number, samplesPerFrame: number): number =>
  Math.floor(k * samplesPerFrame * BOUNDARY_NUDGE);

/**
 * Number of frames covering `sampleCount` samples: the smallest K with b(K) ≥ sampleCount.
 * Kernel: trusts its inputs (sampleCount ≥ 0, samplesPerFrame ≥ 1).
 * @example frameCount(44100, 44.1) // 1000;  frameCount(100, 48) // 3 (48 + 48 + 4 samples)
 */
export function frameCount(sampleCount: number, samplesPerFrame: number): number {
  let k = Math.ceil(sampleCount / samplesPerFrame);
  while (k > 0 && frameStart(k - 1, samplesPerFrame) >= sampleCount) k--;
  while (frameStart(k, samplesPerFrame) < sampleCount) k++;
  return k;
}

/**
 * Samples in frame k of `stats`: b(k+1) − b(k), or sampleCount − b(k) for the last frame.
 * @example frameLength(stats, stats.count - 1) // length of the (possibly shorter) tail frame
 */
export function frameLength(stats: FrameStats, k: number): number {
  const end = k + 1 >= stats.count ? stats.sampleCount : frameStart(k + 1, stats.samplesPerFrame);
  return end - frameStart(k, stats.samplesPerFrame);
}

/**
 * Validates a frame layout and returns samplesPerFrame = sampleRate·frameS. Throws RangeError
 * naming `fn` and the value for a non-positive or non-finite rate or frame, or a frame shorter than
 * one sample. @example checkFrameLayout('f', 44100, 0.001) // 44.1
 */
export function checkFrameLayout(fn: string, sampleRate: number, frameS: number): number {
  if (!(Number.isFinite(sampleRate) && sampleRate > 0)) {
    throw new RangeError(`${fn}: sampleRate must be a positive number of Hz, got ${sampleRate}`);
  }
  if (!(Number.isFinite(frameS) && frameS > 0)) {
    throw new RangeError(`${fn}: frameS must be a positive number of seconds, got ${frameS}`);
  }
  const spf = sampleRate * frameS;
  if (spf < 1) {
    throw new RangeError(`${fn}: frameS·sampleRate must be at least one sample, got ${spf}`);
  }
  return spf;
}

/**
 * Mean, mean square, minimum and maximum of `signal` in each frame, accumulated in float64.
 *
 * mean_k = (1/n_k)·Σ x[i], meanSquare_k = (1/n_k)·Σ x[i]² over the n_k samples of frame k
 * (frame layout in the module comment). Linear full scale in, linear full scale out.
 * Throws RangeError on a non-positive rate or frame, or on NaN/±∞ samples (naming the frame).
 *
 * @param signal  mono samples, linear full scale
 * @param sampleRate  Hz
 * @param opts.frameS  frame length, s (default 0.001)
 * @param opts.out  caller buffers of at least frameCount(n, fs·frameS) frames; the result's arrays
 *   are subarrays of them
 * @example computeFrameStats(x, 44100).meanSquare[0] // mean of x[0..43]²
 */
export function computeFrameStats(
  signal: Float32Array,
  sampleRate: number,
  opts: { frameS?: number; out?: FrameStatsBuffers } = {},
): FrameStats {
  const frameS = opts.frameS ?? 0.001;
  const spf = checkFrameLayout('computeFrameStats', sampleRate, frameS);
  const n = signal.length;
  const count = frameCount(n, spf);
  const o = opts.out;
  if (o && (o.mean.length < count || o.meanSquare.length < count || o.min.length < count || o.max.length < count)) {
    throw new RangeError(`computeFrameStats: out buffers must hold ${count} frames`);
  }
  const mean = o ? o.mean.subarray(0, count) : new Float64Array(count);
  const meanSquare = o ? o.meanSquare.subarray(0, count) : new Float64Array(count);
  const min = o ? o.min.subarray(0, count) : new Float32Array(count);
  const max = o ? o.max.subarray(0, count) : new Float32Array(count);

  let start = 0;
  for (let k = 0; k < count; k++) {
    const end = k + 1 === count ? n : frameStart(k + 1, spf);
    let s = 0;
    let s2 = 0;
    let lo = signal[start];
    let hi = lo;
    for (let i = start; i < end; i++) {
      const x = signal[i];
      s += x;
      s2 += x * x;
      if (x < lo) lo = x;
      if (x > hi) hi = x;
    }
    const inv = 1 / (end - start);
    mean[k] = s * inv;
    meanSquare[k] = s2 * inv;
    min[k] = lo;
    max[k] = hi;
    start = end;
  }
  for (let k = 0; k < count; k++) {
    if (!Number.isFinite(meanSquare[k])) {
      throw new RangeError(
        `computeFrameStats: signal has a NaN or infinite sample in frame ${k} (near ${(k * frameS).toFixed(3)} s)`,
      );
    }
  }
  return { frameS, sampleRate, count, samplesPerFrame: spf, sampleCount: n, mean, meanSquare, min, max };
}

/** First and second moments per frame, linear full scale. */
export interface FrameMoments {
  mean: Float64Array;
  meanSquare: Float64Array;
}

/**
 * Frame moments of the scaled signal g·x, from the statistics of x alone:
 * mean(g·x) = g·mean(x), E[(g·x)²] = g²·E[x²] (linearity of expectation). No clipping is modelled:
 * where g·max > 1 or g·min < −1 the true, clipped signal has smaller moments.
 *
 * @param gain  dimensionless amplitude factor (may be negative)
 * @param out  optional buffers of at least stats.count values
 * @example scaledFrameMoments(stats, 2).meanSquare[k] === 4 * stats.meanSquare[k]
 */
export function scaledFrameMoments(stats: FrameStats, gain: number, out?: FrameMoments): FrameMoments {
  const n = stats.count;
  if (out && (out.mean.length < n || out.meanSquare.length < n)) {
    throw new RangeError(`scaledFrameMoments: out buffers must hold ${n} frames`);
  }
  const mean = out ? out.mean.subarray(0, n) : new Float64Array(n);
  const meanSquare = out ? out.meanSquare.subarray(0, n) : new Float64Array(n);
  const g2 = gain * gain;
  for (let k = 0; k < n; k++) {
    mean[k] = gain * stats.mean[k];
    meanSquare[k] = g2 * stats.meanSquare[k];
  }
  return { mean, meanSquare };
}

/** Per-frame moments of a rail voltage, with the count of frames where the linear model fails. */
export interface RailFrameMoments {
  /** E[v] per frame, V. */
  meanV: Float64Array;
  /** E[v²] per frame, V². */
  meanSquareV2: Float64Array;
  /** Frames whose g·x leaves [−1, 1] (from min/max): there the real rail clips and these moments are not exact. */
  saturatedFrames: number;
}

/**
 * Moments of a rail that follows the audio, v = (V/2)(1 + g·x), per frame, without the samples:
 * E[v] = (V/2)(1 + g·mean), E[v²] = (V²/4)(1 + 2g·mean + g²·meanSquare)
 * (expanding the square; linearity of expectation). Exact while −1 ≤ g·x ≤ 1 in the frame, i.e.
 * the rail stays within [0, V]; frames where it would not are counted in `saturatedFrames`.
 * Mean-square rail voltage is what resistive dissipation (P = E[v²]/R) depends on.
 *
 * @param gain  dimensionless modulation depth applied to x (1: full-scale audio swings 0…V)
 * @param railV  peak rail voltage V, volts
 * @param out  optional buffers of at least stats.count values
 * @example railFrameMoments(stats, 0.5, 48).meanV[k] // 24·(1 + 0.5·mean_k) V
 */
export function railFrameMoments(
  stats: FrameStats,
  gain: number,
  railV: number,
  out?: { meanV: Float64Array; meanSquareV2: Float64Array },
): RailFrameMoments {
  const n = stats.count;
  if (out && (out.meanV.length < n || out.meanSquareV2.length < n)) {
    throw new RangeError(`railFrameMoments: out buffers must hold ${n} frames`);
  }
  const meanV = out ? out.meanV.subarray(0, n) : new Float64Array(n);
  const meanSquareV2 = out ? out.meanSquareV2.subarray(0, n) : new Float64Array(n);
  const h = railV / 2;
  const h2 = h * h;
  const g2 = gain * gain;
  let saturatedFrames = 0;
  for (let k = 0; k < n; k++) {
    const m = stats.mean[k];
    meanV[k] = h * (1 + gain * m);
    meanSquareV2[k] = h2 * (1 + 2 * gain * m + g2 * stats.meanSquare[k]);
    const a = gain * stats.min[k];
    const b = gain * stats.max[k];
    if (a < -1 || a > 1 || b < -1 || b > 1) saturatedFrames++;
  }
  return { meanV, meanSquareV2, saturatedFrames };
}

/**
 * Combines each run of `factor` consecutive frames into one, exactly: the mean and mean square are
 * sample-count-weighted means of the frames' values (Σ n_k·m_k / Σ n_k), min of mins, max of maxes.
 * The result has frameS·factor and samplesPerFrame·factor, so its layout is the one
 * computeFrameStats would give for frameS·factor; the last group may hold fewer frames.
 *
 * @param factor  integer ≥ 1
 * @param out  optional buffers of at least ceil(count/factor) frames
 * @example decimateFrameStats(computeFrameStats(x, 48000), 10) // ≈ computeFrameStats(x, 48000, { frameS: 0.01 })
 */
export function decimateFrameStats(stats: FrameStats, factor: number, out?: FrameStatsBuffers): FrameStats {
  if (!(Number.isInteger(factor) && factor >= 1)) {
    throw new RangeError(`decimateFrameStats: factor must be an integer ≥ 1, got ${factor}`);
  }
  const count = Math.ceil(stats.count / factor);
  if (out && (out.mean.length < count || out.meanSquare.length < count || out.min.length < count || out.max.length < count)) {
    throw new RangeError(`decimateFrameStats: out buffers must hold ${count} frames`);
  }
  const mean = out ? out.mean.subarray(0, count) : new Float64Array(count);
  const meanSquare = out ? out.meanSquare.subarray(0, count) : new Float64Array(count);
  const min = out ? out.min.subarray(0, count) : new Float32Array(count);
  const max = out ? out.max.subarray(0, count) : new Float32Array(count);
  const spf = stats.samplesPerFrame;
  for (let j = 0; j < count; j++) {
    const k0 = j * factor;
    const k1 = Math.min(k0 + factor, stats.count);
    let s = 0;
    let s2 = 0;
    let lo = stats.min[k0];
    let hi = stats.max[k0];
    let start = frameStart(k0, spf);
    for (let k = k0; k < k1; k++) {
      const end = k + 1 === stats.count ? stats.sampleCount : frameStart(k + 1, spf);
      const nk = end - start;
      s += nk * stats.mean[k];
      s2 += nk * stats.meanSquare[k];
      if (stats.min[k] < lo) lo = stats.min[k];
      if (stats.max[k] > hi) hi = stats.max[k];
      start = end;
    }
    const inv = 1 / (start - frameStart(k0, spf));
    mean[j] = s * inv;
    meanSquare[j] = s2 * inv;
    min[j] = lo;
    max[j] = hi;
  }
  return {
    frameS: stats.frameS * factor,
    sampleRate: stats.sampleRate,
    count,
    samplesPerFrame: spf * factor,
    sampleCount: stats.sampleCount,
    mean,
    meanSquare,
    min,
    max,
  };
}

/**
 * {@link computeFrameStats} block by block, for a signal whose length is known in advance but whose
 * samples arrive in pieces (a render streamed to a file): `add` the samples in order in blocks of
 * any lengths, then `result()`. Each frame's sums run over its samples in order, so the figures
 * equal computeFrameStats's of the whole signal exactly. Memory: the frame arrays only.
 *
 * @example const s = new FrameStatsStream(n, 44100); s.add(a); s.add(b); s.result() // = computeFrameStats(a ++ b, 44100)
 */
export class FrameStatsStream {
  private readonly stats: FrameStats;
  private readonly spf: number;
  /** Frame being summed, its end (exclusive), and the samples taken so far. */
  private k = 0;
  private end: number;
  private at = 0;
  private s = 0;
  private s2 = 0;
  private lo = Infinity;
  private hi = -Infinity;

  constructor(sampleCount: number, sampleRate: number, frameS = 0.001) {
    this.spf = checkFrameLayout('FrameStatsStream', sampleRate, frameS);
    const count = frameCount(sampleCount, this.spf);
    this.stats = {
      frameS,
      sampleRate,
      count,
      samplesPerFrame: this.spf,
      sampleCount,
      mean: new Float64Array(count),
      meanSquare: new Float64Array(count),
      min: new Float32Array(count),
      max: new Float32Array(count),
    };
    this.end = count <= 1 ? sampleCount : frameStart(1, this.spf);
  }

  /** Adds the next samples (at most sampleCount in all). */
  add(block: Float32Array): void {
    const st = this.stats;
    let { k, end, at, s, s2, lo, hi } = this;
    if (at + block.length > st.sampleCount) throw new RangeError(`FrameStatsStream.add: more than the ${st.sampleCount} samples announced`);
    let i = 0;
    while (i < block.length) {
      // the samples of frame k in this block (it ends at sample `end`), then its figures once complete
      const stop = Math.min(block.length, i + (end - at));
      const from = i;
      for (; i < stop; i++) {
        const x = block[i];
        s += x;
        s2 += x * x;
        if (x < lo) lo = x;
        if (x > hi) hi = x;
      }
      at += stop - from;
      if (at === end) {
        const start = k === 0 ? 0 : frameStart(k, this.spf);
        const inv = 1 / (end - start);
        st.mean[k] = s * inv;
        st.meanSquare[k] = s2 * inv;
        st.min[k] = lo;
        st.max[k] = hi;
        if (!Number.isFinite(st.meanSquare[k])) {
          throw new RangeError(`FrameStatsStream: signal has a NaN or infinite sample in frame ${k} (near ${(k * st.frameS).toFixed(3)} s)`);
        }
        k++;
        end = k + 1 >= st.count ? st.sampleCount : frameStart(k + 1, this.spf);
        s = 0;
        s2 = 0;
        lo = Infinity;
        hi = -Infinity;
      }
    }
    Object.assign(this, { k, end, at, s, s2, lo, hi });
  }

  /** The frame statistics; RangeError when fewer samples than announced were added. */
  result(): FrameStats {
    if (this.at !== this.stats.sampleCount) throw new RangeError(`FrameStatsStream.result: ${this.at} of ${this.stats.sampleCount} samples added`);
    return this.stats;
  }
}
