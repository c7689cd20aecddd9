/**
 * Look-ahead peak limiter that GUARANTEES a ceiling on every output sample, optionally on the true
 * peak (ITU-R BS.1770-4 Annex 2) as well.
 *
 * Why not a compressor: a feed-back or feed-forward compressor with a finite ratio and an attack
 * time (the Web Audio DynamicsCompressorNode, ratio ≤ 20:1, detector without look-ahead) lets the
 * first samples of every transient through and, above its threshold, still lets the level rise at
 * 1/ratio: it bounds nothing. A ceiling needs the gain to be down BEFORE the peak arrives.
 *
 * Method (offline, latency compensated; in a real-time stream the same arithmetic is a delay of L
 * samples):
 * 1. required gain per sample r[n] = min(1, c/|x[n]|), c the ceiling;
 * 2. look-ahead minimum m[n] = min_{k∈[n, n+L]} r[k], L = round(lookAheadS·fs) (sliding-window
 *    minimum with a monotonic deque, O(1) per sample: Lemire, "Streaming maximum-minimum filter
 *    using no more than three comparisons per element", Nordic J. Computing 13(4), 2006);
 * 3. release: h[n] = m[n] when m[n] ≤ h[n−1] (instant attack), else m[n] + (h[n−1] − m[n])·e^(−1/(τ·fs))
 *    (one-pole release towards m, τ = releaseS), so h ≤ m;
 * 4. attack smoothing: G[n] = mean of h over [n−L, n] (box filter of L+1 samples), a linear ramp of
 *    the gain over the look-ahead window before each peak;
 * 5. y[n] = x[n]·G[n].
 * The guarantee: every k in [n−L, n] has n in its look-ahead window [k, k+L], so h[k] ≤ m[k] ≤ r[n],
 * hence G[n] ≤ r[n] and |y[n]| ≤ c in exact arithmetic. A final clamp at the largest float32 ≤ c
 * absorbs rounding (it moves a sample by at most a few float32 ulps; `safetyClamped` counts it).
 * (The ramp-and-window construction is the usual one for brick-wall limiters, e.g. Giannoulis,
 * Massberg & Reiss, "Digital dynamic range compressor design — a tutorial and analysis", J. Audio
 * Eng. Soc. 60(6), 2012, for the attack/release smoothing [recalled].)
 *
 * True peak: the sample ceiling says nothing about peaks between samples. With `truePeak` the
 * limiter measures the output's true peak (shared/dsp/true-peak.ts, BS.1770-4 Annex 2: 4×
 * oversampled, max with the sample peak), lowers its sample ceiling by the overshoot and runs again
 * (at most 6 passes); should the measure still exceed c, the whole output is scaled by c/truePeak
 * (true peak is homogeneous: TP(a·y) = a·TP(y)). So the measured true peak never exceeds c.
 */
import { channelTruePeakLinear } from './true-peak.ts';

/** Default look-ahead, s (5 ms: long enough for a smooth ramp, short against musical attacks). */
export const DEFAULT_LOOKAHEAD_S = 0.005;
/** Default release time constant, s (50 ms: common practice for program limiters). */
export const DEFAULT_RELEASE_S = 0.05;
/** 10^(−1/20): a gain more than 1 dB below unity. */
const ONE_DB_DOWN = 0.8912509381337456;
/** Most limiter passes in true-peak mode before the final scaling. */
const MAX_TRUE_PEAK_PASSES = 6;

/** Options of {@link lookAheadLimit}; levels linear full scale, times in seconds. */
export interface LimiterOptions {
  /** Highest |output sample| (and true peak with `truePeak`), linear full scale (1.0 = 0 dBFS), > 0. */
  ceiling: number;
  /** Look-ahead window, s (default 0.005). 0 gives a hard gain limiter without ramp. */
  lookAheadS?: number;
  /** Release time constant, s (default 0.05); 0 releases as fast as the window allows. */
  releaseS?: number;
  /** Also keep the BS.1770-4 Annex 2 true peak at or below the ceiling (default false). */
  truePeak?: boolean;
}

/** What {@link lookAheadLimit} returns: the limited samples and what was done to them. */
export interface LimiterResult {
  /** Limited samples, linear full scale, aligned with the input (no latency). */
  output: Float32Array;
  /** Lowest gain applied, linear (1 = never limited). */
  minGain: number;
  /** Largest gain reduction, dB (≥ 0). */
  maxReductionDb: number;
  /** Samples whose gain was below 1. */
  limitedSamples: number;
  /** Samples whose gain was more than 1 dB below 1 (the release keeps gains a hair below 1 long after a peak). */
  deepSamples: number;
  /** Samples the final rounding clamp moved (rounding only; see the module comment). */
  safetyClamped: number;
  /** The sample ceiling of the last pass, linear (below `ceiling` after true-peak passes). */
  sampleCeiling: number;
  /** Passes run (1 without `truePeak`). */
  passes: number;
  /** Gain of the final whole-output scaling in true-peak mode, linear (1 when not needed). */
  finalScale: number;
  /** Sample peak of the output, linear. */
  samplePeak: number;
  /** True peak of the output (BS.1770-4 Annex 2), linear; NaN when not measured (truePeak off). */
  truePeak: number;
}

/** Largest float32 not above x (x > 0). */
function float32AtMost(x: number): number {
  const f = Math.fround(x);
  if (f <= x) return f;
  const buf = new Float32Array([f]);
  new Uint32Array(buf.buffer)[0] -= 1;
  return buf[0];
}

/**
 * One limiter pass (module comment, steps 1–5) at sample ceiling `c`, block by block: the look-ahead
 * deque, the release and the box filter's ring carry over from one `write` to the next, so any split
 * of the signal into blocks gives the same output, bit for bit, as one call over the whole. Output
 * sample k leaves once input k + L has arrived (a latency of L samples); `end` releases the last L.
 * Memory: O(L), whatever the signal's length.
 *
 * Kernel: trusts its inputs (finite samples, c > 0, L ≥ 0 integer, 0 ≤ a < 1).
 *
 * @example const s = new LimiterStream(0.9, 220, 0.9995); let m = s.write(x, y); m += s.end(y.subarray(m));
 */
export class LimiterStream {
  private readonly c: number;
  private readonly cf: number;
  private readonly L: number;
  private readonly a: number;
  private readonly W: number;
  private readonly cap: number;
  private readonly dqIdx: Float64Array;
  private readonly dqVal: Float64Array;
  private head = 0;
  private tail = 0;
  private readonly ring: Float64Array;
  private slot = 0;
  private sum: number;
  private hPrev = 1;
  /** The last L + 1 inputs, a ring (the sample that leaves is L behind the newest), written at `dIn`. */
  private readonly delay: Float32Array;
  private dIn = 0;
  /** Index of the next input sample (j); the output index is j − L. */
  private j = 0;
  /** Lowest gain applied so far, linear. */
  minGain = 1;
  /** Samples whose gain was below 1, more than 1 dB below 1, and moved by the rounding clamp. */
  limited = 0;
  deep = 0;
  clamped = 0;

  constructor(c: number, L: number, a: number) {
    this.c = c;
    this.cf = float32AtMost(c);
    this.L = L;
    this.a = a;
    this.W = L + 1;
    this.cap = this.W + 1;
    this.dqIdx = new Float64Array(this.cap);
    this.dqVal = new Float64Array(this.cap);
    this.ring = new Float64Array(this.W).fill(1);
    this.sum = this.W;
    this.delay = new Float32Array(L + 1);
  }

  /** Pushes `x` and writes the outputs that become ready into out[0…]; returns how many (≤ x.length). */
  write(x: Float32Array, out: Float32Array): number {
    return this.steps(x, x.length, out);
  }

  /** Releases the last outputs (the required gain past the end is 1) into out[0…]; returns how many (≤ L). */
  end(out: Float32Array): number {
    return this.steps(null, this.L, out);
  }

  /** `count` steps, each pushing x[i] (or 1 for the gain past the end when x is null). */
  private steps(x: Float32Array | null, count: number, out: Float32Array): number {
    const { c, cf, L, a, W, cap, dqIdx, dqVal, ring, delay } = this;
    const D = L + 1;
    let { head, tail, slot, sum, hPrev, j, minGain, limited, deep, clamped, dIn } = this;
    let o = 0;
    for (let i = 0; i < count; i++, j++) {
      // Push the required gain of sample j (1 beyond the clip's end).
      let v = 1;
      // the ring's slot for sample j; the sample leaving (k = j − L) sits in the next slot
      const d = dIn;
      dIn = dIn + 1 === D ? 0 : dIn + 1;
      if (x !== null) {
        const xj = x[i];
        delay[d] = xj;
        const ax = Math.abs(xj);
        if (ax > c) v = c / ax;
      }
      while (tail !== head) {
        const back = tail === 0 ? cap - 1 : tail - 1;
        if (dqVal[back] >= v) tail = back;
        else break;
      }
      dqIdx[tail] = j;
      dqVal[tail] = v;
      tail = tail + 1 === cap ? 0 : tail + 1;
      const k = j - L;
      if (k < 0) continue;
      // Drop indices that left the window [k, k + L]; the one just pushed stays, so the deque is not empty.
      while (dqIdx[head] < k) head = head + 1 === cap ? 0 : head + 1;
      const m = dqVal[head];
      const h = m <= hPrev ? m : m + (hPrev - m) * a;
      hPrev = h;
      sum += h - ring[slot];
      ring[slot] = h;
      slot = slot + 1 === W ? 0 : slot + 1;
      // Re-add the window exactly now and then so rounding in the running sum cannot accumulate.
      if ((k & 0xffff) === 0xffff) {
        sum = 0;
        for (let q = 0; q < W; q++) sum += ring[q];
      }
      let g = sum / W;
      if (g > 1) g = 1;
      if (g < 1) {
        limited++;
        if (g < ONE_DB_DOWN) deep++;
        if (g < minGain) minGain = g;
      }
      let y = Math.fround(delay[dIn] * g);
      if (y > cf) {
        y = cf;
        clamped++;
      } else if (y < -cf) {
        y = -cf;
        clamped++;
      }
      out[o++] = y;
    }
    Object.assign(this, { head, tail, slot, sum, hPrev, j, minGain, limited, deep, clamped, dIn });
    return o;
  }
}

/**
 * One limiter pass over the whole of `x` into `out` (LimiterStream in one block).
 * Kernel: trusts its inputs (finite samples, c > 0, L ≥ 0 integer, 0 ≤ a < 1).
 */
function limitPass(x: Float32Array, c: number, L: number, a: number, out: Float32Array) {
  const s = new LimiterStream(c, L, a);
  const m = s.write(x, out);
  // the pass's last L outputs (fewer for a signal shorter than L)
  const tail = new Float32Array(L);
  const t = s.end(tail);
  out.set(tail.subarray(0, t), m);
  return { minGain: s.minGain, limited: s.limited, deep: s.deep, clamped: s.clamped };
}

/**
 * Limits `input` so that no output sample exceeds `opts.ceiling` in magnitude (and, with
 * `opts.truePeak`, no BS.1770-4 Annex 2 true peak either): look-ahead window minimum of the
 * required gain c/|x|, one-pole release, box-filter attack ramp (module comment for the method,
 * the guarantee and the sources). Offline and latency-compensated: output[n] belongs to input[n].
 *
 * Validation: RangeError for a non-positive or non-finite ceiling, a negative look-ahead or release,
 * a non-positive sample rate, or a NaN/±∞ sample (naming its index).
 *
 * @param input  mono samples, linear full scale
 * @param sampleRate  Hz
 * @param out  optional destination of input.length samples (may be `input` itself)
 * @example lookAheadLimit(x, 48000, { ceiling: 1, truePeak: true }).truePeak // ≤ 1 (0 dBTP)
 */
export function lookAheadLimit(input: Float32Array, sampleRate: number, opts: LimiterOptions, out?: Float32Array): LimiterResult {
  const c = opts.ceiling;
  const lookAheadS = opts.lookAheadS ?? DEFAULT_LOOKAHEAD_S;
  const releaseS = opts.releaseS ?? DEFAULT_RELEASE_S;
  if (!(Number.isFinite(c) && c > 0)) throw new RangeError(`lookAheadLimit: ceiling must be a finite linear level > 0, got ${c}`);
  if (!(Number.isFinite(sampleRate) && sampleRate > 0)) throw new RangeError(`lookAheadLimit: sampleRate must be > 0 Hz, got ${sampleRate}`);
  if (!(Number.isFinite(lookAheadS) && lookAheadS >= 0 && lookAheadS <= 1)) throw new RangeError(`lookAheadLimit: lookAheadS must be 0…1 s, got ${lookAheadS}`);
  if (!(Number.isFinite(releaseS) && releaseS >= 0)) throw new RangeError(`lookAheadLimit: releaseS must be ≥ 0 s, got ${releaseS}`);
  for (let i = 0; i < input.length; i++) {
    if (!Number.isFinite(input[i])) throw new RangeError(`lookAheadLimit: input[${i}] is ${input[i]}, not a finite sample`);
  }
  const output = out ?? new Float32Array(input.length);
  if (output.length < input.length) throw new RangeError(`lookAheadLimit: out has ${output.length} samples, input has ${input.length}`);
  const L = Math.round(lookAheadS * sampleRate);
  const a = releaseS > 0 ? Math.exp(-1 / (releaseS * sampleRate)) : 0;
  // True-peak passes read the input again, so never write over it before the last pass.
  const src = output === input && opts.truePeak ? input.slice() : input;

  let sampleCeiling = c;
  let passes = 0;
  let finalScale = 1;
  let r = limitPass(src, sampleCeiling, L, a, output);
  passes++;
  let tp = NaN;
  if (opts.truePeak) {
    tp = channelTruePeakLinear(output.subarray(0, src.length));
    while (tp > c && passes < MAX_TRUE_PEAK_PASSES) {
      // Lower the sample ceiling by the measured overshoot, with a little extra so the next pass lands below.
      sampleCeiling *= (c / tp) * (1 - 1e-6);
      r = limitPass(src, sampleCeiling, L, a, output);
      passes++;
      tp = channelTruePeakLinear(output.subarray(0, src.length));
    }
    if (tp > c) {
      // Homogeneity of the true peak: scale once, then float32 rounding of the products may still
      // raise a value by half an ulp, hence the small extra margin.
      finalScale = (c / tp) * (1 - 1e-6);
      for (let i = 0; i < src.length; i++) output[i] = Math.fround(output[i] * finalScale);
      tp = channelTruePeakLinear(output.subarray(0, src.length));
    }
  }
  let samplePeak = 0;
  for (let i = 0; i < src.length; i++) {
    const v = Math.abs(output[i]);
    if (v > samplePeak) samplePeak = v;
  }
  const minGain = r.minGain * finalScale;
  return {
    output: output.length === src.length ? output : output.subarray(0, src.length),
    minGain,
    maxReductionDb: minGain > 0 ? -20 * Math.log10(minGain) : Infinity,
    limitedSamples: finalScale < 1 ? src.length : r.limited,
    deepSamples: finalScale < ONE_DB_DOWN ? src.length : r.deep,
    safetyClamped: r.clamped,
    sampleCeiling,
    passes,
    finalScale,
    samplePeak,
    truePeak: tp,
  };
}
