/**
 * Envelopes of a modulation signal: a one-pole peak follower with separate attack and release, and
 * a per-frame RMS envelope computed from frame statistics (no pass over the samples).
 *
 * Time-constant convention (both attack and release): τ is the time to cover 1 − 1/e ≈ 63.2 % of a
 * step, i.e. the follower is the sampled (impulse-invariant) one-pole RC response:
 *   y[n] = y[n−1] + α·(|x[n]| − y[n−1]),  α = 1 − e^(−1/(τ·fs)),
 * so after m samples of a step from 0 to 1, y = 1 − e^(−m/(τ·fs)) exactly, and after m samples of
 * a drop from 1 to 0, y = e^(−m/(τ·fs)). (A 10→90 % rise time is τ·ln 9 ≈ 2.197·τ.) The attack
 * coefficient applies while |x| > y, the release coefficient otherwise: the "branching" peak
 * detector of Giannoulis, Massberg & Reiss, "Digital dynamic range compressor design — a tutorial
 * and analysis", J. Audio Eng. Soc. 60(6), 2012, which uses the same 1 − 1/e convention
 * [recalled]. The coefficient is the impulse-invariant discretisation of the RC step response
 * v = 1 − e^(−t/RC) (Oppenheim & Schafer, Discrete-Time Signal Processing, §7.1 [recalled]).
 *
 * Both envelopes scale with gain: the follower of g·x is |g| times the follower of x (every
 * comparison and update is homogeneous of degree 1), and so is the RMS envelope.
 */
import { type FrameStats, checkFrameLayout, computeFrameStats, frameCount, frameStart } from './frame-stats.ts';
import {
  HISTOGRAM_RUN_MAX,
  type HistogramLayout,
  type HistogramOptions,
  type MagnitudeHistogram,
  addCounts,
  emptyHistogram,
  histogramLayout,
  magnitudeHistogram,
} from './histogram.ts';
import { WholeUnits } from './whole-units.ts';

/**
 * frameStart, held in this module: an imported binding may be read through a getter on the
 * exporting module's object at each use (CommonJS transpilation), which V8 does not always fold
 * away inside a hot loop.
 */
const startOf = frameStart;

/**
 * One-pole smoothing coefficient α = 1 − e^(−1/(τ·fs)) (dimensionless), from a time constant τ in s
 * and a rate fs in Hz; τ = 0 gives 1 (instant), τ = ∞ gives 0 (hold). Kernel: trusts its inputs.
 * @example onePoleCoefficient(0.001, 48000) // 1 − e^(−1/48) ≈ 0.020621
 */
export const onePoleCoefficient = (tauS: number, sampleRate: number): number =>
  tauS === 0 ? 1 : -Math.expm1(-1 / (tauS * sampleRate));

export interface PeakFollowerOptions {
  /** Attack time constant τa, s (63.2 % of a rising step; 0 = instant). */
  attackS: number;
  /** Release time constant τr, s (decay to 1/e after a fall; Infinity = hold the peak). */
  releaseS: number;
  /** Hz. */
  sampleRate: number;
}

/** A running peak follower. `value` is the current envelope, linear full scale. */
export interface PeakFollower {
  /** Feeds one sample (linear full scale), returns the envelope after it. */
  next(x: number): number;
  /** Sets the envelope to `levelLinear` (default 0). */
  reset(levelLinear?: number): void;
  readonly value: number;
}

function checkFollower(fn: string, o: PeakFollowerOptions): void {
  if (!(Number.isFinite(o.sampleRate) && o.sampleRate > 0)) {
    throw new RangeError(`${fn}: sampleRate must be a positive number of Hz, got ${o.sampleRate}`);
  }
  if (!(o.attackS >= 0 && o.attackS < Infinity)) {
    throw new RangeError(`${fn}: attackS must be a finite time ≥ 0 s, got ${o.attackS}`);
  }
  if (!(o.releaseS >= 0)) throw new RangeError(`${fn}: releaseS must be ≥ 0 s (Infinity holds), got ${o.releaseS}`);
}

/**
 * Creates a one-pole peak follower of |x| (convention in the module comment).
 * @example
 *   const f = createPeakFollower({ attackS: 0.001, releaseS: 0.05, sampleRate: 48000 });
 *   for (let m = 0; m < 48; m++) f.next(1);  // f.value = 1 − e^(−1) ≈ 0.632 after 1 ms
 */
export function createPeakFollower(opts: PeakFollowerOptions): PeakFollower {
  checkFollower('createPeakFollower', opts);
  const aA = onePoleCoefficient(opts.attackS, opts.sampleRate);
  const aR = onePoleCoefficient(opts.releaseS, opts.sampleRate);
  let y = 0;
  return {
    next(x: number): number {
      const a = Math.abs(x);
      y += (a > y ? aA : aR) * (a - y);
      return y;
    },
    reset(levelLinear = 0): void {
      y = levelLinear;
    },
    get value() {
      return y;
    },
  };
}

/**
 * Runs the peak follower over `signal` and returns, for each frame (layout of frame-stats.ts), the
 * follower's maximum within that frame, linear full scale. The follower starts at `initialLevel`.
 *
 * @param opts.frameS  frame length, s (default 0.001)
 * @param opts.out  optional buffer of at least frameCount(n, fs·frameS) values
 * @example peakEnvelopeFrames(x, 44100, { attackS: 0.0005, releaseS: 0.02 }) // one value per 1 ms
 */
export function peakEnvelopeFrames(
  signal: Float32Array,
  sampleRate: number,
  opts: { attackS: number; releaseS: number; frameS?: number; initialLevel?: number; out?: Float64Array },
): Float64Array {
  const fn = 'peakEnvelopeFrames';
  checkFollower(fn, { ...opts, sampleRate });
  const frameS = opts.frameS ?? 0.001;
  const spf = checkFrameLayout(fn, sampleRate, frameS);
  const n = signal.length;
  const count = frameCount(n, spf);
  if (opts.out && opts.out.length < count) throw new RangeError(`${fn}: out must hold ${count} values`);
  const out = opts.out ? opts.out.subarray(0, count) : new Float64Array(count);
  const aA = onePoleCoefficient(opts.attackS, sampleRate);
  const aR = onePoleCoefficient(opts.releaseS, sampleRate);
  let y = opts.initialLevel ?? 0;
  let start = 0;
  for (let k = 0; k < count; k++) {
    const end = k + 1 === count ? n : frameStart(k + 1, spf);
    let m = 0;
    for (let i = start; i < end; i++) {
      const a = Math.abs(signal[i]);
      y += (a > y ? aA : aR) * (a - y);
      if (y > m) m = y;
    }
    out[k] = m;
    start = end;
  }
  return out;
}

/**
 * computeFrameStats, peakEnvelopeFrames and magnitudeHistogram in one pass over the samples, with
 * exactly their results (the same operations in the same order for each output). The follower's
 * update is a chain each sample waits on; the frame sums, extremes and the histogram's table
 * lookup fit in the time it leaves idle, so the three cost little more than the follower alone.
 *
 * @param opts.frameS frame length, s (default 0.001); attackS, releaseS as peakEnvelopeFrames (the
 *   follower starts at 0); histogram: the layout (magnitudeHistogram's options, `into` excepted)
 * @throws RangeError as computeFrameStats and peakEnvelopeFrames do (NaN/±∞ samples name their frame)
 * @example const { frames, peak, histogram } = sourceStatsPass(x, 44100, { attackS: 0.001, releaseS: 0.05 })
 */
export function sourceStatsPass(
  signal: Float32Array,
  sampleRate: number,
  opts: { attackS: number; releaseS: number; frameS?: number; histogram?: Omit<HistogramOptions, 'into'> },
): { frames: FrameStats; peak: Float64Array; histogram: MagnitudeHistogram } {
  const fn = 'sourceStatsPass';
  checkFollower(fn, { ...opts, sampleRate });
  const frameS = opts.frameS ?? 0.001;
  const spf = checkFrameLayout(fn, sampleRate, frameS);
  const L = histogramLayout(opts.histogram);
  const n = signal.length;
  const count = frameCount(n, spf);
  if (count === 0 || n > HISTOGRAM_RUN_MAX) {
    return {
      ...frameStatsWithEnvelope(signal, sampleRate, frameS, opts),
      histogram: magnitudeHistogram(signal, opts.histogram),
    };
  }
  const mean = new Float64Array(count);
  const meanSquare = new Float64Array(count);
  const min = new Float32Array(count);
  const max = new Float32Array(count);
  const peak = new Float64Array(count);
  const acc = new Int32Array(L.nBins + 3);
  const bits = new Int32Array(signal.buffer, signal.byteOffset, n);
  const aA = onePoleCoefficient(opts.attackS, sampleRate);
  const aR = onePoleCoefficient(opts.releaseS, sampleRate);
  const out: PassOutputs = { mean, meanSquare, min, max, peak, acc, state: new Float64Array(2) };
  primeKernel(L);
  const peakBits = sourceStatsKernel(signal, bits, 0, n, spf, 0, count, count, aA, aR, L, out);
  if (peakBits < 0) throw nonFinite(fn, -1 - peakBits, frameS);
  const histogram = emptyHistogram(L);
  addCounts(histogram, acc, peakBits, n);
  return { frames: { frameS, sampleRate, count, samplesPerFrame: spf, sampleCount: n, mean, meanSquare, min, max }, peak, histogram };
}

/** Output arrays of sourceStatsKernel (one object, so the kernel's arguments keep stable types). */
interface PassOutputs {
  mean: Float64Array;
  meanSquare: Float64Array;
  min: Float32Array;
  max: Float32Array;
  peak: Float64Array;
  /** Histogram counts [below, bins…, above, zeros] (histogram.ts, countMagnitudeBits). */
  acc: Int32Array;
  /** Carried from run to run: [the follower's level, the float32 bits of the highest magnitude so far]. */
  state: Float64Array;
}

/**
 * Kernel of sourceStatsPass: frame sums, extremes, follower maximum and histogram counts of frames
 * k0…k1−1 of a signal of n samples and `count` frames, whose sample i is signal[i − base] (the
 * follower's level and the highest magnitude so far come in out.state and go back there); returns
 * the float32 bits of the highest magnitude, or −1 − k for the first frame k whose mean square is not
 * finite (it stops there). Trusts its inputs (bits aliases signal; count = frameCount(n, spf) ≥ 1;
 * signal holds the frames asked for).
 */
function sourceStatsKernel(
  signal: Float32Array,
  bits: Int32Array,
  base: number,
  n: number,
  spf: number,
  k0: number,
  k1: number,
  count: number,
  aA: number,
  aR: number,
  L: HistogramLayout,
  out: PassOutputs,
): number {
  const { mean, meanSquare, min, max, peak, acc, state } = out;
  const { tab, edgeBits, shift, keyLo } = L;
  const tabLen = tab.length;
  const aboveAt = L.nBins + 1;
  const zerosAt = L.nBins + 2;
  let y = state[0];
  let peakBits = state[1] | 0;
  let start = startOf(k0, spf) - base;
  for (let k = k0; k < k1; k++) {
    const end = (k + 1 === count ? n : startOf(k + 1, spf)) - base;
    let s = 0;
    let s2 = 0;
    let lo = signal[start];
    let hi = lo;
    let m = 0;
    for (let i = start; i < end; i++) {
      const x = signal[i];
      s += x;
      s2 += x * x;
      if (x < lo) lo = x;
      if (x > hi) hi = x;
      const a = Math.abs(x);
      y += (a > y ? aA : aR) * (a - y);
      if (y > m) m = y;
      const b = bits[i] & 0x7fffffff;
      const t = (b >> shift) - keyLo;
      if (t >= 0 && t < tabLen) acc[tab[t] + ((edgeBits[t] - b - 1) >>> 31)]++;
      else acc[t < 0 ? (b === 0 ? zerosAt : 0) : aboveAt]++;
      if (b > peakBits) peakBits = b;
    }
    const inv = 1 / (end - start);
    const ms = s2 * inv;
    if (!(ms < Infinity)) return -1 - k; // NaN or ±∞ in the frame (s2 ≥ 0 otherwise)
    mean[k] = s * inv;
    meanSquare[k] = ms;
    min[k] = lo;
    max[k] = hi;
    peak[k] = m;
    start = end;
  }
  state[0] = y;
  state[1] = peakBits;
  return peakBits;
}

/** The error for a NaN or infinite sample in frame k. */
const nonFinite = (fn: string, k: number, frameS: number): RangeError =>
  new RangeError(`${fn}: signal has a NaN or infinite sample in frame ${k} (near ${(k * frameS).toFixed(3)} s)`);

/** Zero, below-range, in-range (both sides of a bin edge), above-range and negative magnitudes. */
const PRIME_SAMPLES = new Float32Array([0, 1e-30, 0.5, -0.25, 1e10, -1, 0.001, -0, 1]);
let primed = false;
const PRIME_CALLS = 12;

/**
 * Runs sourceStatsKernel PRIME_CALLS times, once per process, over PRIME_SAMPLES in two frames (its
 * outputs are thrown away), so that every branch of it has type feedback before the first long
 * call: V8 compiles that call's loop while it runs (on-stack replacement), and a branch first taken
 * after that deoptimises the compiled loop and costs a second compilation.
 */
function primeKernel(L: HistogramLayout): void {
  if (primed) return;
  primed = true;
  const x = PRIME_SAMPLES;
  const out: PassOutputs = {
    mean: new Float64Array(2),
    meanSquare: new Float64Array(2),
    min: new Float32Array(2),
    max: new Float32Array(2),
    peak: new Float64Array(2),
    acc: new Int32Array(L.nBins + 3),
    state: new Float64Array(2),
  };
  const bits = new Int32Array(x.buffer);
  // V8 allocates a function's feedback vector only after several calls (lazy feedback allocation).
  for (let r = 0; r < PRIME_CALLS; r++) {
    out.state.fill(0);
    sourceStatsKernel(x, bits, 0, x.length, 4.5, 0, 2, 2, 0.5, 0.25, L, out);
  }
}

/** computeFrameStats and peakEnvelopeFrames as two passes (sourceStatsPass's fallback). */
function frameStatsWithEnvelope(
  signal: Float32Array,
  sampleRate: number,
  frameS: number,
  o: { attackS: number; releaseS: number },
): { frames: FrameStats; peak: Float64Array } {
  const frames = computeFrameStats(signal, sampleRate, { frameS });
  return { frames, peak: peakEnvelopeFrames(signal, sampleRate, { attackS: o.attackS, releaseS: o.releaseS, frameS }) };
}

/**
 * {@link sourceStatsPass} block by block, for a signal whose length is known in advance and whose
 * samples arrive in pieces (the modulation source of a file being decoded): `add` the next samples,
 * in blocks of any lengths, then read `result()`. The follower's level and the histogram's counts
 * are carried across blocks and a frame cut by a block edge is gathered first (whole-units.ts), so
 * the result equals sourceStatsPass's on the whole signal exactly. Memory: the frame arrays only.
 *
 * @example const s = new SourceStatsStream(n, 44100, { attackS: 0.001, releaseS: 0.05 }); s.add(a); s.add(b); s.result()
 */
export class SourceStatsStream {
  private readonly L: HistogramLayout;
  private readonly out: PassOutputs;
  private readonly frames: FrameStats;
  private readonly histogram: MagnitudeHistogram;
  private readonly units: WholeUnits;
  private readonly aA: number;
  private readonly aR: number;
  private readonly one: Float32Array[] = [new Float32Array(0)];

  /** @throws RangeError as sourceStatsPass for bad options, or for sampleCount < 1 */
  constructor(
    private readonly sampleCount: number,
    sampleRate: number,
    opts: { attackS: number; releaseS: number; frameS?: number; histogram?: Omit<HistogramOptions, 'into'> },
  ) {
    const fn = 'SourceStatsStream';
    checkFollower(fn, { ...opts, sampleRate });
    if (!(Number.isInteger(sampleCount) && sampleCount >= 1)) throw new RangeError(`${fn}: sampleCount must be an integer ≥ 1, got ${sampleCount}`);
    const frameS = opts.frameS ?? 0.001;
    const spf = checkFrameLayout(fn, sampleRate, frameS);
    this.L = histogramLayout(opts.histogram);
    const count = frameCount(sampleCount, spf);
    this.frames = {
      frameS,
      sampleRate,
      count,
      samplesPerFrame: spf,
      sampleCount,
      mean: new Float64Array(count),
      meanSquare: new Float64Array(count),
      min: new Float32Array(count),
      max: new Float32Array(count),
    };
    const f = this.frames;
    this.out = { mean: f.mean, meanSquare: f.meanSquare, min: f.min, max: f.max, peak: new Float64Array(count), acc: new Int32Array(this.L.nBins + 3), state: new Float64Array(2) };
    this.histogram = emptyHistogram(this.L);
    this.aA = onePoleCoefficient(opts.attackS, sampleRate);
    this.aR = onePoleCoefficient(opts.releaseS, sampleRate);
    primeKernel(this.L);
    this.units = new WholeUnits(1, count, sampleCount, (k) => startOf(k, spf), Math.ceil(spf) + 1, (x, base, k0, k1) => this.measure(x[0], base, k0, k1));
  }

  /** Adds the next `len` samples (x[0…len)). */
  add(x: Float32Array, len = x.length): void {
    this.one[0] = x;
    this.units.add(this.one, len);
  }

  private measure(x: Float32Array, base: number, k0: number, k1: number): void {
    const f = this.frames;
    const from = startOf(k0, f.samplesPerFrame) - base;
    const to = (k1 === f.count ? f.sampleCount : startOf(k1, f.samplesPerFrame)) - base;
    const bits = new Int32Array(x.buffer, x.byteOffset, to);
    const out = this.out;
    const r = sourceStatsKernel(x, bits, base, f.sampleCount, f.samplesPerFrame, k0, k1, f.count, this.aA, this.aR, this.L, out);
    if (r < 0) throw nonFinite('SourceStatsStream', -1 - r, f.frameS);
    // each run's counts go into the float64 histogram at once (a run is at most one block, < 2^30 samples)
    addCounts(this.histogram, out.acc, r, to - from);
    out.acc.fill(0);
  }

  /** The frame statistics, peak envelope and histogram; RangeError before every sample has arrived. */
  result(): { frames: FrameStats; peak: Float64Array; histogram: MagnitudeHistogram } {
    this.units.end('SourceStatsStream.result');
    return { frames: this.frames, peak: this.out.peak, histogram: this.histogram };
  }
}

/**
 * RMS envelope per frame from frame statistics: for frame k, √(Σ n_j·meanSquare_j / Σ n_j) over the
 * W = max(1, round(windowS/frameS)) frames of its window (n_j = samples in frame j), i.e. the exact
 * RMS of the samples in those frames. The effective window is W whole frames (10 ms default =
 * 10 frames of 1 ms). 'centred' windows span frames k − ⌊W/2⌋ … k − ⌊W/2⌋ + W − 1 (zero lag, the
 * clip is known in advance); 'trailing' spans k − W + 1 … k (causal, like a meter). Windows are cut
 * at the clip's ends. A full-scale sine reads 1/√2 (plain RMS, see level.ts).
 *
 * Sums are recomputed from scratch every W frames and slid in between, so rounding left behind by a
 * loud passage cannot swamp a quiet one for longer than one window.
 *
 * @param opts.windowS  window length, s (default 0.01)
 * @param opts.out  optional buffer of at least stats.count values
 * @example rmsEnvelope(computeFrameStats(sine, 44100)) // ≈ A/√2 in every full window
 */
export function rmsEnvelope(
  stats: FrameStats,
  opts: { windowS?: number; align?: 'centred' | 'trailing'; out?: Float64Array } = {},
): Float64Array {
  const fn = 'rmsEnvelope';
  const windowS = opts.windowS ?? 0.01;
  if (!(Number.isFinite(windowS) && windowS > 0)) {
    throw new RangeError(`${fn}: windowS must be a positive number of seconds, got ${windowS}`);
  }
  const count = stats.count;
  if (opts.out && opts.out.length < count) throw new RangeError(`${fn}: out must hold ${count} values`);
  const out = opts.out ? opts.out.subarray(0, count) : new Float64Array(count);
  const w = Math.max(1, Math.round(windowS / stats.frameS));
  const lead = opts.align === 'trailing' ? w - 1 : Math.floor(w / 2);
  rmsKernel(stats.meanSquare, stats.samplesPerFrame, stats.sampleCount, count, w, lead, out);
  return out;
}


/** Samples in frame j of `count` frames over n samples: frameLength without a FrameStats. */
const lengthOf = (j: number, spf: number, n: number, count: number): number =>
  (j + 1 >= count ? n : startOf(j + 1, spf)) - startOf(j, spf);

/**
 * Kernel of rmsEnvelope: out[k] for k < count from the mean squares `ms` of frames of spf samples
 * over n samples, windows of w frames starting `lead` frames before k. Trusts its inputs.
 */
function rmsKernel(ms: Float64Array, spf: number, n: number, count: number, w: number, lead: number, out: Float64Array): void {
  // Window of output k: frames [k − lead, k − lead + w) cut to [0, count).
  let energy = 0;
  let samples = 0;
  let phase = 0; // k mod w
  for (let k = 0; k < count; k++) {
    if (phase === 0) {
      const lo = Math.max(0, k - lead);
      const hi = Math.min(count, k - lead + w);
      energy = 0;
      samples = 0;
      for (let j = lo; j < hi; j++) {
        const len = lengthOf(j, spf, n, count);
        energy += len * ms[j];
        samples += len;
      }
    } else {
      const inJ = k - lead + w - 1; // frame entering at the top
      const outJ = k - lead - 1; // frame leaving at the bottom
      if (inJ < count) {
        const len = lengthOf(inJ, spf, n, count);
        energy += len * ms[inJ];
        samples += len;
      }
      if (outJ >= 0) {
        const len = lengthOf(outJ, spf, n, count);
        energy -= len * ms[outJ];
        samples -= len;
      }
    }
    out[k] = samples > 0 && energy > 0 ? Math.sqrt(energy / samples) : 0;
    if (++phase === w) phase = 0;
  }
}
