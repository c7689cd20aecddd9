/**
 * Dominant-pitch track by YIN: A. de Cheveigné and H. Kawahara, "YIN, a fundamental frequency
 * estimator for speech and music", J. Acoust. Soc. Am. 111(4), 2002, pp. 1917–1930.
 *
 * Steps of the paper implemented (its section II): (2) difference function
 *   d(τ) = Σ_{j=0}^{W−1} (x[t+j] − x[t+j+τ])²,
 * (3) cumulative mean normalised difference d′(0) = 1, d′(τ) = d(τ)·τ / Σ_{j=1}^{τ} d(j),
 * (4) absolute threshold: the first dip of d′ (in order of increasing lag) that goes below the
 * threshold, taken at its bottom; no such dip → unvoiced, (5) parabolic interpolation of the dip,
 * on d rather than d′ as the paper advises. Step 6 (best local estimate) is left out. The
 * aperiodicity reported is d′ at the chosen dip, or the smallest d′ in range when unvoiced: the
 * paper's measure, 0 for a perfectly periodic frame, near 1 for noise; at a dip it is read at the
 * parabola's vertex, like the period, so coarse sampling of short periods does not inflate it.
 *
 * Made fast (a 5-minute 44.1 kHz clip has 30 000 frames of 10 ms) by three measures:
 * 1. Decimation (decimate.ts). The signal is low-passed and decimated by q = ⌊fs/(5.5·maxHz)⌋ to the analysis rate
 *    fs_a = fs/q (11.025 kHz for 44.1 kHz and maxHz 2 kHz), so the shortest period still spans ≥ 5.5
 *    samples. The filters are centred (zero-delay) Kaiser-windowed-sinc FIRs (J. F. Kaiser, in Kuo &
 *    Kaiser, *System Analysis by Digital Computer*, 1966; design formulas in Oppenheim & Schafer,
 *    *Discrete-Time Signal Processing*, 3rd ed., ch. 7, Kaiser window method), half-band stages
 *    when q is a power of two: the band to 0.2·fs_a (≥ 1.1·maxHz) passes, and what would alias onto
 *    it is ≥ 40 dB down. The half-band stages run two at a time in one loop, the signal between
 *    them held in locals (rounded to float32, as if stored), the same sums as stage by stage.
 * 2. FFT difference function (yin-difference.ts). d(τ) = e(0) + e(τ) − 2·c(τ), e from prefix sums of squares and
 *    c(τ) = Σ_{j<W} x[t+j]·x[t+j+τ] assembled from blocks of B samples (a hop, or an equal part of
 *    one when the hop exceeds half the longest lag, which keeps N small): each block's spectrum
 *    Xb (zero-padded to N ≥ B + τmax + 2, so the circular correlation does not wrap), the spectrum of
 *    the blocks that follow it, Sb = Σₗ X_{b+l}·e^(−j2πk·l·B/N), and c = IDFT(Σ over the window's
 *    blocks of conj(Xb)·Sb), kept as a running sum. Per hop (defaults): half a complex 512-point FFT
 *    (two blocks' spectra at once) and one inverse, instead of three real FFTs per frame.
 * 3. Refinement. Where a period spans fewer than 40 analysis samples, the dip is refined on the
 *    original signal: d at the integer full-rate lags around the estimate, walked to the lowest, and the
 *    parabola through it and its neighbours, over max(2 periods, 5 ms) of the window.
 *
 * Memory: the decimated signal and its running sums of squares are made as the frames read them and
 * kept only for a window of a few frames (DecimatedStream, RunningPrefixSums), each value computed
 * exactly as in one pass over the whole signal; a track of any length costs a few hundred kB beyond
 * its output, where whole arrays took 5 bytes per input sample (66 MB for 5 minutes at 44.1 kHz).
 *
 * Because a period of only 5.5–40 analysis samples is coarse, the threshold test in step 4 uses the
 * interpolated bottom of each dip (the vertex of the parabola through d′ at the dip and its
 * neighbours) as well as the sampled value; with sampled values alone a dip falling between samples
 * can stay above the threshold and the estimate jump an octave down.
 *
 * Pitch range: minHz…maxHz with 0 < minHz < maxHz ≤ fs/4 (defaults 40…2000 Hz). Harmonics above
 * 0.2·fs_a (2.2 kHz at the defaults) are attenuated in the search (not in the refinement), so a
 * missing fundamental is found from its harmonics below that frequency.
 */
import { CASCADE_BLOCK, DecimatedStream, Decimator } from './decimate.ts';
import { BlockCorrelator, RunningPrefixSums } from './yin-difference.ts';


/** Options of {@link yinPitchTrack}; every field has a default. */
export interface YinOptions {
  /** Frame hop, s (default 0.01; rounded to whole blocks of analysis samples, see PitchTrack.hopS). */
  hopS?: number;
  /** Lowest pitch searched, Hz (default 40): the longest lag is 1/minHz. */
  minHz?: number;
  /** Highest pitch searched, Hz (default 2000; at most fs/4). */
  maxHz?: number;
  /** Absolute threshold on d′ (default 0.15; the paper's evaluation used 0.1). */
  threshold?: number;
  /** Integration window W, s (default and minimum 1/minHz, the longest period, as the paper advises). */
  windowS?: number;
}

/** A pitch track on a regular frame grid. */
export interface PitchTrack {
  /** Frame hop actually used, s. */
  hopS: number;
  /** Centre of each frame's analysed span (window plus longest lag), s. */
  timesS: Float64Array;
  /** Fundamental frequency per frame, Hz; NaN where unvoiced (no dip below the threshold, or silent). */
  f0Hz: Float32Array;
  /** YIN aperiodicity, d′ at the chosen dip's vertex (0 periodic … ≈1 noise); 1 for silent frames. */
  aperiodicity: Float32Array;
  /** Median of the voiced frames' f0, Hz; null when no frame is voiced. */
  medianHz: number | null;
  /** Voiced frames / all frames (0 when there are no frames). */
  voicedFraction: number;
}

/** Mean square below which a frame counts as silent (−100 dB re full scale²). */
const SILENT_MEAN_SQUARE = 1e-10;

/** Fewest analysis-rate samples in the shortest period searched (fs/q ≥ 5.5·maxHz). */
const MIN_PERIOD_SAMPLES = 5.5;

/**
 * Periods shorter than this many analysis samples are refined on the full-rate signal. Measured with
 * band-limited sawtooth tones 41 Hz…2 kHz at 44.1 kHz (11.025 kHz analysis rate): parabolic
 * interpolation alone errs by ≤ 0.14 % for periods ≥ 40 samples but by up to 0.7 % at 6–10 samples;
 * with the refinement the error stays ≤ 0.3 % over the whole range.
 */
const REFINE_BELOW_SAMPLES = 40;

/**
 * YIN pitch track (de Cheveigné & Kawahara 2002) of a mono signal; the module comment describes the
 * method and how it is made fast.
 *
 * Frames start every hop and span W + τmax + 2 samples; only whole frames are analysed, so a clip
 * shorter than about windowS + 1/minHz gives no frames. Frames with a mean square below 1e-10
 * (−100 dB re full scale) are unvoiced with aperiodicity 1.
 *
 * @param signal samples, full scale ±1
 * @param sampleRate Hz
 * @param opts see {@link YinOptions}
 * @returns see {@link PitchTrack}
 * @throws RangeError for a bad sample rate or option (the message names it)
 * @example
 *   const t = yinPitchTrack(voice, 44100); // t.medianHz ≈ 220 for a sung A3
 */
export function yinPitchTrack(signal: Float32Array, sampleRate: number, opts: YinOptions = {}): PitchTrack {
  const t = new YinTracker(signal.length, sampleRate, opts);
  t.setInput(signal, 0);
  t.advance(signal.length);
  return t.result();
}

/**
 * The YIN pitch track of {@link yinPitchTrack} for a signal whose length is known in advance, its
 * frames taken as far as the samples given allow: `setInput(x, base)` names the stretch of the
 * signal held (x[i] is sample base + i), `advance(available)` analyses every frame whose samples,
 * with the decimation's reach, lie below `available`, and `keepFrom()` says the first sample the
 * frames still to come may read (so a caller can drop what lies before). With the stretches given
 * in order the frames, and so the track, are exactly those of one call over the whole signal: the
 * same code on the same samples.
 */
export class YinTracker {
  private readonly q: number;
  private readonly fsA: number;
  private readonly dec: Decimator;
  private readonly x: DecimatedStream;
  private readonly prefix: RunningPrefixSums;
  private readonly correlator: BlockCorrelator;
  private readonly corr: Float64Array;
  private readonly d: Float64Array;
  private readonly dn: Float64Array;
  private readonly lowest = new Float64Array(1); // searchDips' smallest d′
  private readonly minRefine: number;
  private readonly tauMin: number;
  private readonly tauMax: number;
  private readonly lags: number;
  private readonly hop: number;
  private readonly w: number;
  private readonly block: number;
  private readonly blocksPerHop: number;
  private readonly blocksPerWindow: number;
  private readonly frames: number;
  private readonly threshold: number;
  private readonly timesS: Float64Array;
  private readonly f0Hz: Float32Array;
  private readonly aperiodicity: Float32Array;
  private readonly voiced: number[] = [];
  private signal: Float32Array = new Float32Array(0);
  private base = 0;
  /** The next frame to analyse. */
  private f = 0;

  /** @throws RangeError for a bad sample rate or option (the message names it) */
  constructor(
    private readonly sampleCount: number,
    private readonly sampleRate: number,
    opts: YinOptions = {},
  ) {
    if (!(sampleRate > 0) || !Number.isFinite(sampleRate)) {
      throw new RangeError(`yinPitchTrack: sampleRate must be a positive number of Hz, got ${sampleRate}`);
    }
    const hopS = opts.hopS ?? 0.01;
    const minHz = opts.minHz ?? 40;
    const maxHz = opts.maxHz ?? 2000;
    const threshold = (this.threshold = opts.threshold ?? 0.15);
    const windowS = opts.windowS ?? 1 / minHz;
    if (!(hopS > 0) || !Number.isFinite(hopS)) {
      throw new RangeError(`yinPitchTrack: opts.hopS must be > 0 s, got ${hopS}`);
    }
    if (!(minHz > 0 && minHz < maxHz && maxHz <= sampleRate / 4)) {
      throw new RangeError(
        `yinPitchTrack: need 0 < opts.minHz < opts.maxHz ≤ fs/4 = ${sampleRate / 4} Hz, got ${minHz}…${maxHz}`,
      );
    }
    if (!(threshold > 0 && threshold < 1)) {
      throw new RangeError(`yinPitchTrack: opts.threshold must be in (0, 1), got ${threshold}`);
    }
    if (!(windowS >= 1 / minHz - 1e-12) || !Number.isFinite(windowS)) {
      throw new RangeError(`yinPitchTrack: opts.windowS must be at least 1/minHz = ${1 / minHz} s, got ${windowS}`);
    }

    const q = (this.q = Math.max(1, Math.floor(sampleRate / (MIN_PERIOD_SAMPLES * maxHz))));
    const fsA = (this.fsA = sampleRate / q);
    this.dec = new Decimator(this.signal, q, sampleCount);
    const n = this.dec.length;

    this.tauMin = Math.max(2, Math.floor(fsA / maxHz));
    const tauMax = (this.tauMax = Math.ceil(fsA / minHz));
    const lags = (this.lags = tauMax + 2); // lags 0…tauMax+1 (the +1 for the right neighbour of a dip at tauMax)
    // blocks of at most lags/2 samples keep the FFT near 2–4 × lags long; a hop is a whole number of them
    const hopSamples = Math.max(1, Math.round(hopS * fsA));
    const blocksPerHop = (this.blocksPerHop = Math.ceil(hopSamples / Math.max(1, Math.floor(lags / 2))));
    const block = (this.block = Math.max(1, Math.round(hopSamples / blocksPerHop)));
    const hop = (this.hop = blocksPerHop * block);
    const blocksPerWindow = (this.blocksPerWindow = Math.ceil(Math.max(windowS * fsA, tauMax) / block));
    const w = (this.w = blocksPerWindow * block);
    const frames = (this.frames = n >= w + lags ? Math.floor((n - w - lags) / hop) + 1 : 0);

    // The decimated signal is read as it is made: the correlator reads up to ahead + 3 blocks past
    // the window it correlates, the running sums from the window's start; keep both reaches.
    this.x = new DecimatedStream(this.dec, 2 * (w + lags + hop) + (Math.ceil(lags / block) + 4) * block);
    this.prefix = new RunningPrefixSums(this.x, 4 * (w + lags + hop));
    this.correlator = new BlockCorrelator(this.x, block, blocksPerWindow, lags);
    this.corr = new Float64Array(this.correlator.size);
    this.d = new Float64Array(lags);
    this.dn = new Float64Array(lags);
    this.minRefine = Math.round(0.005 * sampleRate);
    this.timesS = new Float64Array(frames);
    this.f0Hz = new Float32Array(frames).fill(Number.NaN);
    this.aperiodicity = new Float32Array(frames).fill(1);
  }

  /** The stretch of the signal held: x[i] is sample base + i. */
  setInput(x: Float32Array, base: number): void {
    this.signal = x;
    this.base = base;
    this.dec.setInput(x, base);
  }

  /**
   * One past the last full-rate sample frame f may read: its window and lags in the decimated
   * signal, the correlator's blocks ahead of it, the decimated stream's read-ahead of up to one
   * cascade block, and the decimation's reach back to the full rate (the full-rate refinement reads
   * within the frame's own span).
   */
  private need(f: number): number {
    const t0 = f * this.hop;
    const ahead = Math.ceil(this.lags / this.block);
    const lastBlock = f * this.blocksPerHop + this.blocksPerWindow - 1;
    const decimated = Math.min(this.dec.length, Math.max(t0 + this.w + this.lags, (lastBlock + ahead + 4) * this.block) + CASCADE_BLOCK);
    return Math.max(this.dec.inputRange(0, Math.max(1, decimated))[1], Math.min(this.sampleCount, (t0 + this.w + this.lags) * this.q + 2));
  }

  /** The first full-rate sample the frames still to come may read. */
  keepFrom(): number {
    const t0 = Math.min(this.f, this.frames) * this.hop;
    const made = this.x.made;
    const decimator = made < this.dec.length ? this.dec.inputRange(made, made + 1)[0] : this.sampleCount;
    return Math.max(0, Math.min(t0 * this.q, decimator));
  }

  /** Analyses the frames whose samples all lie below `available` (every frame once it is sampleCount). */
  advance(available: number): void {
    const all = available >= this.sampleCount;
    while (this.f < this.frames && (all || this.need(this.f) <= available)) this.frame(this.f++);
  }

  private frame(f: number): void {
    const { q, fsA, hop, w, lags, tauMax, d, dn, corr, lowest } = this;
    this.correlator.advanceTo(f * this.blocksPerHop + this.blocksPerWindow - 1); // the blocks up to the window's last
    const t0 = f * hop;
    this.timesS[f] = (t0 + (w + tauMax) / 2) / fsA;
    const p0 = this.prefix.window(t0, w + lags); // cumSq[p0 + j] = Σ_{i<t0+j} x[i]²
    const cumSq = this.prefix.values();
    const e0 = cumSq[p0 + w] - cumSq[p0];
    if (e0 <= SILENT_MEAN_SQUARE * w) return;

    // steps 2–4, lag by lag up to the first qualifying dip
    this.correlator.correlate(corr);
    const tau = searchDips(corr, cumSq, p0, w, e0, d, dn, this.tauMin, tauMax, this.threshold, lowest);
    if (tau < 0) {
      this.aperiodicity[f] = lowest[0];
      return;
    }
    this.aperiodicity[f] = Math.max(0, dn[tau] - parabolaDepth(dn[tau - 1], dn[tau], dn[tau + 1]));

    // step 5: parabolic interpolation on d, refined at the full rate where the analysis rate is coarse
    const lag = tau + parabolaOffset(d[tau - 1], d[tau], d[tau + 1]);
    let period = lag * q;
    if (q > 1 && lag < REFINE_BELOW_SAMPLES) period = refineFullRate(this.signal, t0 * q - this.base, w * q, period, q, this.minRefine, this.sampleCount - this.base);
    const hz = this.sampleRate / period;
    this.f0Hz[f] = hz;
    this.voiced.push(hz);
  }

  /** The track; RangeError when some frame has not been analysed (advance with every sample first). */
  result(): PitchTrack {
    if (this.f < this.frames) throw new RangeError(`YinTracker.result: ${this.f} of ${this.frames} frames analysed`);
    const voiced = [...this.voiced].sort((a, b) => a - b);
    const mid = voiced.length >> 1;
    const medianHz =
      voiced.length === 0 ? null : voiced.length % 2 ? voiced[mid] : 0.5 * (voiced[mid - 1] + voiced[mid]);
    const frames = this.frames;
    return {
      hopS: this.hop / this.fsA,
      timesS: this.timesS,
      f0Hz: this.f0Hz,
      aperiodicity: this.aperiodicity,
      medianHz,
      voicedFraction: frames > 0 ? voiced.length / frames : 0,
    };
  }
}

/**
 * YIN steps 2–4 for one frame, computed lag by lag and stopped one lag past the first qualifying dip:
 * d[τ] = e(0) + e(τ) − 2·c(τ) with e(τ) = cumSq[t0+τ+w] − cumSq[t0+τ] (clamped at 0 against
 * rounding), dn[τ] = d[τ]·τ / Σ_{j=1}^{τ} d[j] (dn[0] = 1; 1 where the sum is 0), and the first local
 * minimum of dn in tauMin…tauMax whose sampled or parabolic-vertex value is below the threshold.
 *
 * The lags are computed one ahead of the lag examined, which is compared with its neighbours held in
 * locals.
 *
 * @param lowest out: lowest[0] = the smallest dn seen in tauMin…tauMax
 * @returns tau of that dip (−1 if none)
 */
function searchDips(
  corr: Float64Array,
  cumSq: Float64Array,
  t0: number,
  w: number,
  e0: number,
  d: Float64Array,
  dn: Float64Array,
  tauMin: number,
  tauMax: number,
  threshold: number,
  lowest: Float64Array,
): number {
  dn[0] = 1;
  let least = Infinity;
  // lag 1
  const v1 = e0 + (cumSq[t0 + 1 + w] - cumSq[t0 + 1]) - 2 * corr[1];
  const d1 = v1 > 0 ? v1 : 0;
  d[1] = d1;
  let running = d1;
  let here = running > 0 ? (d1 * 1) / running : 1; // (d[k]·k)/Σ at k = 1
  dn[1] = here;
  let before = 1; // dn[tau − 1]
  for (let tau = 1; tau <= tauMax; tau++) {
    // compute lag tau + 1, then examine lag tau
    const k = tau + 1;
    const v = e0 + (cumSq[t0 + k + w] - cumSq[t0 + k]) - 2 * corr[k];
    const dk = v > 0 ? v : 0;
    d[k] = dk;
    running += dk;
    const after = running > 0 ? (dk * k) / running : 1;
    dn[k] = after;
    if (tau >= tauMin) {
      if (here < least) least = here;
      if (!(here > before || here > after)) {
        const bottom = here < threshold ? here : here - parabolaDepth(before, here, after);
        if (bottom < threshold) {
          lowest[0] = least;
          return tau;
        }
      }
    }
    before = here;
    here = after;
  }
  lowest[0] = least;
  return -1;
}

/** How far the vertex of the parabola through (−1, a), (0, b), (1, c) lies below b (0 if not convex). */
function parabolaDepth(a: number, b: number, c: number): number {
  const den = a - 2 * b + c;
  return den > 0 ? ((a - c) * (a - c)) / (8 * den) : 0;
}

/** Vertex offset (−½…½) of the parabola through (−1, a), (0, b), (1, c); 0 when it is not convex. */
function parabolaOffset(a: number, b: number, c: number): number {
  const den = a - 2 * b + c;
  if (!(den > 0)) return 0;
  const p = (0.5 * (a - c)) / den;
  return p > 0.5 ? 0.5 : p < -0.5 ? -0.5 : p;
}

/**
 * Full-rate refinement of a period estimate (full-rate samples): d(τ) = Σ_{j<W′}(x[s+j] − x[s+j+τ])²
 * over W′ = min(w, max(2 periods, minWindow)) at integer lags, walking from round(estimate) to the local
 * minimum (at most `steps` each way), then the parabola through it and its neighbours.
 */
function refineFullRate(
  x: Float32Array,
  start: number,
  w: number,
  estimate: number,
  steps: number,
  minWindow: number,
  length: number,
): number {
  const wr = Math.min(w, Math.max(Math.ceil(2 * estimate), minWindow));
  let tau = Math.round(estimate);
  let here = diffAt(x, length, start, wr, tau);
  let left = diffAt(x, length, start, wr, tau - 1);
  let right = diffAt(x, length, start, wr, tau + 1);
  for (let step = 0; step < steps; step++) {
    if (left < here) {
      right = here;
      here = left;
      tau--;
      left = diffAt(x, length, start, wr, tau - 1);
    } else if (right < here) {
      left = here;
      here = right;
      tau++;
      right = diffAt(x, length, start, wr, tau + 1);
    } else break;
  }
  if (!Number.isFinite(left) || !Number.isFinite(right) || !Number.isFinite(here)) return estimate;
  return tau + parabolaOffset(left, here, right);
}

/** d(τ) = Σ_{j<W}(x[s+j] − x[s+j+τ])² on the full-rate signal (x[0…length) of it); Infinity when τ < 1 or past the end. */
function diffAt(x: Float32Array, length: number, start: number, w: number, tau: number): number {
  if (tau < 1 || start + w + tau > length) return Infinity;
  let s = 0;
  const end = start + w;
  for (let j = start; j < end; j++) {
    const v = x[j] - x[j + tau];
    s += v * v;
  }
  return s;
}

/**
 * {@link yinPitchTrack} block by block, for a signal whose length is known in advance and whose
 * samples arrive in pieces (the modulation source of a file being decoded): `add` the next samples,
 * in blocks of any lengths, then read `result()`. The frames are analysed as soon as their samples
 * have arrived (YinTracker), and only the samples later frames may still read are kept, so memory is
 * a block plus a stretch of about one decimation block (8192 decimated samples, ~65 000 samples at
 * 44.1 kHz), not the signal. The track equals yinPitchTrack's on the whole signal exactly.
 *
 * @example const p = new PitchStream(n, 44100, { hopS: 0.02 }); p.add(a); p.add(b); p.result().medianHz
 */
export class PitchStream {
  private readonly tracker: YinTracker;
  private buf = new Float32Array(0);
  /** Index in the whole signal of buf[0]; samples held: buf[0…filled). */
  private base = 0;
  private filled = 0;

  /** @throws RangeError as yinPitchTrack for a bad sample rate or option */
  constructor(
    private readonly sampleCount: number,
    sampleRate: number,
    opts: YinOptions = {},
  ) {
    this.tracker = new YinTracker(sampleCount, sampleRate, opts);
  }

  /** Adds the next `len` samples (x[0…len)) and analyses the frames they complete. */
  add(x: Float32Array, len = x.length): void {
    if (this.base + this.filled + len > this.sampleCount) {
      throw new RangeError(`PitchStream.add: more than the ${this.sampleCount} samples announced`);
    }
    const keep = Math.min(this.tracker.keepFrom(), this.base + this.filled);
    if (keep > this.base) {
      this.buf.copyWithin(0, keep - this.base, this.filled);
      this.filled -= keep - this.base;
      this.base = keep;
    }
    if (this.filled + len > this.buf.length) {
      const grown = new Float32Array(Math.max(2 * this.buf.length, this.filled + len));
      grown.set(this.buf.subarray(0, this.filled));
      this.buf = grown;
    }
    this.buf.set(x.subarray(0, len), this.filled);
    this.filled += len;
    this.tracker.setInput(this.buf.subarray(0, this.filled), this.base);
    this.tracker.advance(this.base + this.filled);
  }

  /** The pitch track; RangeError before every sample has arrived. */
  result(): PitchTrack {
    const received = this.base + this.filled;
    if (received !== this.sampleCount) throw new RangeError(`PitchStream.result: ${received} of ${this.sampleCount} samples added`);
    this.tracker.advance(this.sampleCount);
    return this.tracker.result();
  }
}
