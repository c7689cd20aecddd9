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
 * 1. Decimation. The signal is low-passed and decimated by q = ⌊fs/(5.5·maxHz)⌋ to the analysis rate
 *    fs_a = fs/q (11.025 kHz for 44.1 kHz and maxHz 2 kHz), so the shortest period still spans ≥ 5.5
 *    samples. The filters are centred (zero-delay) Kaiser-windowed-sinc FIRs (J. F. Kaiser, in Kuo &
 *    Kaiser, *System Analysis by Digital Computer*, 1966; design formulas in Oppenheim & Schafer,
 *    *Discrete-Time Signal Processing*, 3rd ed., ch. 7, Kaiser window method), half-band stages
 *    when q is a power of two: the band to 0.2·fs_a (≥ 1.1·maxHz) passes, and what would alias onto
 *    it is ≥ 40 dB down. The half-band stages run two at a time in one loop, the signal between
 *    them held in locals (rounded to float32, as if stored), the same sums as stage by stage.
 * 2. FFT difference function. d(τ) = e(0) + e(τ) − 2·c(τ), e from prefix sums of squares and
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
import { RealFft, nextPowerOfTwo } from './fft.ts';

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

/** Zeroth-order modified Bessel function of the first kind, by its power series (DLMF 10.25.2). */
function besselI0(x: number): number {
  let sum = 1;
  let term = 1;
  const q = (x * x) / 4;
  for (let k = 1; k < 200; k++) {
    term *= q / (k * k);
    sum += term;
    if (term < 1e-17 * sum) break;
  }
  return sum;
}

/**
 * Low-pass FIR for decimation by q: Kaiser-windowed sinc, cutoff (−6 dB) at the output Nyquist
 * frequency fs/(2q), transition band `transition`·fs/q wide centred on it, `rejectionDb` stop-band
 * rejection. Kaiser's formulas (Oppenheim & Schafer, *Discrete-Time Signal Processing*, 3rd ed.,
 * ch. 7, Kaiser window design method): β = 0.5842·(A−21)^0.4 + 0.07886·(A−21) for 21 < A ≤ 50 dB,
 * order M = (A − 8)/(2.285·Δω) with Δω the transition width in rad/sample, rounded up to even so the filter is centred. Taps sum to 1.
 * For q = 2 it is a half-band filter: every other tap is exactly 0.
 *
 * @param q decimation factor (integer ≥ 2)
 * @param transition transition width as a fraction of the output rate (default 0.6: pass band to
 *   0.2·fs/q, stop band from 0.8·fs/q, whose aliases land at ≥ 0.2·fs/q)
 * @param rejectionDb stop-band rejection A, 21…50 dB (default 40)
 * @returns odd number of symmetric taps
 * @example decimationFilter(4).length // → 17
 */
export function decimationFilter(q: number, transition = 0.6, rejectionDb = 40): Float64Array {
  const a = rejectionDb;
  const beta = 0.5842 * Math.pow(a - 21, 0.4) + 0.07886 * (a - 21);
  const dw = (2 * Math.PI * transition) / q;
  let m = Math.ceil((a - 8) / (2.285 * dw));
  if (m % 2 === 1) m++;
  const h = new Float64Array(m + 1);
  const half = m / 2;
  const i0b = besselI0(beta);
  let sum = 0;
  for (let i = 0; i <= m; i++) {
    const t = i - half;
    if (t !== 0 && t % q === 0) continue; // zeros of the sinc, exactly
    const sinc = t === 0 ? 1 / q : Math.sin((Math.PI * t) / q) / (Math.PI * t);
    const r = t / half;
    h[i] = (sinc * besselI0(beta * Math.sqrt(Math.max(0, 1 - r * r)))) / i0b;
    sum += h[i];
  }
  for (let i = 0; i <= m; i++) h[i] /= sum;
  return h;
}

/**
 * Low-pass and decimate by q with the time origin kept (centred filters, no delay): output sample m
 * is at input sample m·q; samples outside the signal count as 0. The band 0…0.2·fs/q is kept free
 * of aliases to ≥ 40 dB. A power-of-two q runs as a cascade of half-band stages (each 2:1 stage only
 * has to reject what would fold onto that final band, so the early stages are short); any other q
 * is one {@link decimationFilter} stage.
 *
 * The cascade runs block by block (8192 output samples at a time, each stage computing just the
 * stretch of its output the next stage reads), so no intermediate signal is held whole: the memory
 * is the output plus a few small buffers. Every stage output is rounded to float32, as if each
 * stage had produced a whole float32 signal.
 *
 * @param signal input samples
 * @param q integer factor ≥ 1 (1 returns a copy)
 * @returns ⌈n/q⌉ samples (float32, like audio; the stages accumulate in float64)
 * @example decimate(x44k, 4) // → the 11.025 kHz signal, same time origin
 */
export function decimate(signal: ArrayLike<number>, q: number): Float32Array {
  if (!Number.isInteger(q) || q < 1) throw new RangeError(`decimate: q must be an integer ≥ 1, got ${q}`);
  if (q === 1) return Float32Array.from(signal);
  const d = new Decimator(signal, q);
  const out = new Float32Array(d.length);
  d.run(0, d.length, out, 0);
  return out;
}

/** A symmetric odd-length FIR for 2:1 or q:1 decimation with its zero taps dropped. */
interface FirStage {
  q: number;
  /** (taps − 1)/2: how far a tap reaches either side of the centre. */
  half: number;
  centre: number;
  /** Offsets o > 0 of the non-zero tap pairs h[half ± o], and their weights. */
  offsets: Int32Array;
  weights: Float64Array;
}

function firStage(q: number, h: Float64Array): FirStage {
  const half = (h.length - 1) / 2;
  const offsets: number[] = [];
  const weights: number[] = [];
  for (let o = 1; o <= half; o++) {
    if (h[half + o] !== 0) {
      offsets.push(o);
      weights.push(h[half + o]);
    }
  }
  return { q, half, centre: h[half], offsets: Int32Array.from(offsets), weights: Float64Array.from(weights) };
}

/**
 * Outputs m0…m1−1 of one FIR decimation stage into out[o0…]: y[m] = centre·x[m·q] +
 * Σⱼ wⱼ·(x[m·q − oⱼ] + x[m·q + oⱼ]), summed in that order, where x is the stage input of length
 * nIn, given by `src` from input index srcLo on (src[i − srcLo]); input samples outside 0…nIn−1
 * count as 0. `src` must cover every in-range index the outputs reach.
 */
function firRange(
  src: ArrayLike<number>,
  srcLo: number,
  nIn: number,
  st: FirStage,
  m0: number,
  m1: number,
  out: Float32Array,
  o0: number,
): void {
  const { q, half, centre, offsets, weights } = st;
  const pairs = offsets.length;
  // interior outputs a…b−1 have every tap inside the input
  const a = Math.min(m1, Math.max(m0, Math.ceil(half / q)));
  const b = Math.max(a, Math.min(m1, Math.floor((nIn - 1 - half) / q) + 1));
  if (pairs === 2 && q === 2 && offsets[0] === 1 && offsets[1] === 3 && a < b) {
    halfBand13(src, a * 2 - srcLo, b - a, centre, weights[0], weights[1], out, o0 + a - m0);
  } else if (pairs === 2) {
    // the half-band stages: two pairs of taps, unrolled
    const o1 = offsets[0];
    const o2 = offsets[1];
    const w1 = weights[0];
    const w2 = weights[1];
    for (let m = a; m < b; m++) {
      const c = m * q - srcLo;
      out[o0 + m - m0] = centre * src[c] + w1 * (src[c - o1] + src[c + o1]) + w2 * (src[c - o2] + src[c + o2]);
    }
  } else {
    for (let m = a; m < b; m++) {
      const c = m * q - srcLo;
      let acc = centre * src[c];
      for (let j = 0; j < pairs; j++) acc += weights[j] * (src[c - offsets[j]] + src[c + offsets[j]]);
      out[o0 + m - m0] = acc;
    }
  }
  // the ends, where taps reach outside the input (those samples count as 0)
  const edge = (m: number) => {
    const c = m * q;
    let acc = centre * src[c - srcLo];
    for (let j = 0; j < pairs; j++) {
      const l = c - offsets[j];
      const r = c + offsets[j];
      acc += weights[j] * ((l >= 0 ? src[l - srcLo] : 0) + (r < nIn ? src[r - srcLo] : 0));
    }
    out[o0 + m - m0] = acc;
  };
  for (let m = m0; m < a; m++) edge(m);
  for (let m = b; m < m1; m++) edge(m);
}

/**
 * The interior of a 2:1 half-band stage with non-zero taps at offsets 0, ±1, ±3 (every half-band
 * stage {@link Decimator} makes): count outputs y = centre·x[c] + w1·(x[c−1] + x[c+1]) +
 * w2·(x[c−3] + x[c+3]), c = c0, c0 + 2, …, into out[j0…]; the same sums as firRange's general loop,
 * term by term. Each odd input sample serves four outputs, so the four odd samples an output reads
 * are kept in locals and shifted along: two loads per output instead of five.
 */
function halfBand13(
  src: ArrayLike<number>,
  c0: number,
  count: number,
  centre: number,
  w1: number,
  w2: number,
  out: Float32Array,
  j0: number,
): void {
  let xm3 = src[c0 - 3];
  let xm1 = src[c0 - 1];
  let xp1 = src[c0 + 1];
  let c = c0;
  const end = j0 + count;
  for (let j = j0; j < end; j++) {
    const xp3 = src[c + 3];
    out[j] = centre * src[c] + w1 * (xm1 + xp1) + w2 * (xm3 + xp3);
    xm3 = xm1;
    xm1 = xp1;
    xp1 = xp3;
    c += 2;
  }
}

/**
 * Two 2:1 half-band stages (taps at 0, ±1, ±3) in one pass: stage A, y[i] = cA·x[2i] + a1·(x[2i−1] +
 * x[2i+1]) + a2·(x[2i−3] + x[2i+3]) rounded to float32 (as if stored in a float32 signal), then
 * stage B on y the same way with cB, b1, b2, for `count` outputs of B whose first reads x at c0
 * (= 4p₀ − the index of src[0]), into out[j0…]. The sums are those of two {@link halfBand13} passes,
 * term by term; y is kept in locals (the seven values around 2p), never stored. Interior only: every
 * x and y read must exist.
 */
function halfBand13Pair(
  src: ArrayLike<number>,
  c0: number,
  count: number,
  cA: number,
  a1: number,
  a2: number,
  cB: number,
  b1: number,
  b2: number,
  out: Float32Array,
  j0: number,
): void {
  // stage A outputs y[2p₀−3] … y[2p₀+1], at x positions t = c0 − 6 … c0 + 2, made in order with
  // the odd x samples around t kept in locals as in halfBand13 (y[2p₀−2] is not needed: skipped)
  let t = c0 - 6;
  let xm3 = src[t - 3];
  let xm1 = src[t - 1];
  let xp1 = src[t + 1];
  let xp3 = src[t + 3];
  let ym3 = Math.fround(cA * src[t] + a1 * (xm1 + xp1) + a2 * (xm3 + xp3));
  t += 4;
  xm3 = src[t - 3];
  xm1 = src[t - 1];
  xp1 = src[t + 1];
  xp3 = src[t + 3];
  let ym1 = Math.fround(cA * src[t] + a1 * (xm1 + xp1) + a2 * (xm3 + xp3));
  t += 2;
  xm3 = xm1;
  xm1 = xp1;
  xp1 = xp3;
  xp3 = src[t + 3];
  let y0 = Math.fround(cA * src[t] + a1 * (xm1 + xp1) + a2 * (xm3 + xp3));
  t += 2;
  xm3 = xm1;
  xm1 = xp1;
  xp1 = xp3;
  xp3 = src[t + 3];
  let yp1 = Math.fround(cA * src[t] + a1 * (xm1 + xp1) + a2 * (xm3 + xp3));
  const end = j0 + count;
  for (let j = j0; j < end; j++) {
    // y[2p+2] and y[2p+3]
    t += 2;
    xm3 = xm1;
    xm1 = xp1;
    xp1 = xp3;
    xp3 = src[t + 3];
    const yp2 = Math.fround(cA * src[t] + a1 * (xm1 + xp1) + a2 * (xm3 + xp3));
    t += 2;
    xm3 = xm1;
    xm1 = xp1;
    xp1 = xp3;
    xp3 = src[t + 3];
    const yp3 = Math.fround(cA * src[t] + a1 * (xm1 + xp1) + a2 * (xm3 + xp3));
    out[j] = cB * y0 + b1 * (ym1 + yp1) + b2 * (ym3 + yp3);
    ym3 = ym1;
    ym1 = yp1;
    y0 = yp2;
    yp1 = yp3;
  }
}

/** Output samples per block of {@link Decimator.run}. */
const CASCADE_BLOCK = 8192;

/**
 * The decimation of {@link decimate} as a cascade of FIR stages run block by block: for each block
 * of final outputs, the input range every stage needs is worked out backwards (outputs m0…m1−1 of a
 * stage read its input from m0·q − half to (m1 − 1)·q + half), then the stages run forwards over just
 * those ranges into small float32 buffers. Same arithmetic, and so the same values, as running each
 * stage over the whole signal, for any split of the outputs into calls of `run`.
 */
class Decimator {
  /** Output length ⌈n/q⌉. */
  readonly length: number;
  private readonly stages: FirStage[] = [];
  /** Length of the signal after each stage, the input's first. */
  private readonly ns: number[];
  private readonly bufs: Float32Array[] = [];
  private readonly lo: number[];
  private readonly hi: number[];

  constructor(
    private readonly signal: ArrayLike<number>,
    q: number,
  ) {
    if (q > 1 && (q & (q - 1)) === 0) {
      const count = Math.round(Math.log2(q));
      for (let i = 1; i <= count; i++) {
        // stage i outputs fs/2^i; keep 0…0.2·fs/q alias-free: transition = 1 − 2·(0.2·fs/q)/(fs/2^i)
        this.stages.push(firStage(2, decimationFilter(2, 1 - 0.4 * 2 ** (i - count))));
      }
    } else if (q > 1) {
      this.stages.push(firStage(q, decimationFilter(q)));
    }
    this.ns = [signal.length];
    for (const st of this.stages) this.ns.push(Math.ceil(this.ns[this.ns.length - 1] / st.q));
    this.length = this.ns[this.stages.length];
    this.lo = new Array<number>(this.stages.length + 1);
    this.hi = new Array<number>(this.stages.length + 1);
    const taps013 = (st: FirStage | undefined) =>
      st !== undefined && st.q === 2 && st.offsets.length === 2 && st.offsets[0] === 1 && st.offsets[1] === 3;
    this.pairable = this.stages.map((st, i) => taps013(this.stages[i - 1]) && taps013(st));
  }

  /** pairable[s]: stages s and s + 1 (1-based) are both half-band stages with taps at 0, ±1, ±3. */
  private readonly pairable: boolean[];

  /**
   * Whether outputs p0…p1−1 of stage s + 1 read only stage-s outputs inside that signal, each of
   * which reads only samples inside stage s's input (so {@link halfBand13Pair} needs no zeros).
   */
  private pairInterior(s: number, p0: number, p1: number): boolean {
    const ns = this.ns;
    return p0 < p1 && 2 * p0 - 3 >= 2 && 2 * (p1 - 1) + 3 <= ns[s] - 1 && 2 * (2 * (p1 - 1) + 3) + 3 <= ns[s - 1] - 1;
  }

  /** Final outputs m0…m1−1 (0 ≤ m0 ≤ m1 ≤ length) into out[o0…]. */
  run(m0: number, m1: number, out: Float32Array, o0: number): void {
    const { stages, ns, lo, hi, bufs } = this;
    const last = stages.length;
    if (last === 0) {
      for (let m = m0; m < m1; m++) out[o0 + m - m0] = this.signal[m];
      return;
    }
    for (let b0 = m0; b0 < m1; b0 += CASCADE_BLOCK) {
      lo[last] = b0;
      hi[last] = Math.min(m1, b0 + CASCADE_BLOCK);
      for (let s = last; s >= 1; s--) {
        const st = stages[s - 1];
        lo[s - 1] = Math.max(0, lo[s] * st.q - st.half);
        hi[s - 1] = Math.min(ns[s - 1], (hi[s] - 1) * st.q + st.half + 1);
      }
      let src: ArrayLike<number> = this.signal;
      for (let s = 1; s <= last; s++) {
        // two half-band stages at once where every tap of both reaches inside their inputs
        const pair = s < last && this.pairable[s] && this.pairInterior(s, lo[s + 1], hi[s + 1]);
        const t = pair ? s + 1 : s; // the stage whose output this pass writes
        const len = hi[t] - lo[t];
        let dst: Float32Array = out;
        let d0 = o0 + lo[t] - m0;
        if (t < last) {
          if (!bufs[t] || bufs[t].length < len) bufs[t] = new Float32Array(Math.max(len, 2 * CASCADE_BLOCK));
          dst = bufs[t];
          d0 = 0;
        }
        const srcLo = s === 1 ? 0 : lo[s - 1];
        if (pair) {
          const a = stages[s - 1];
          const b = stages[s];
          const [a1, a2] = a.weights;
          const [b1, b2] = b.weights;
          halfBand13Pair(src, 4 * lo[t] - srcLo, len, a.centre, a1, a2, b.centre, b1, b2, dst, d0);
        } else {
          firRange(src, srcLo, ns[s - 1], stages[s - 1], lo[s], hi[s], dst, d0);
        }
        src = dst;
        s = t;
      }
    }
  }
}

/**
 * The decimated signal made as it is read: `ensure(from, to)` makes samples from…to−1 one
 * contiguous stretch of `samples()` (valid until the next call), computing them when first asked
 * for, and returns where it starts (an offset, so a read makes no view object). Reads must move
 * forward: only the last `capacity` samples are kept, so memory is a window, not the whole
 * decimated signal. A read reaching back before what is kept is a programming error (RangeError).
 */
class DecimatedStream {
  readonly length: number;
  private readonly buf: Float32Array;
  /** Samples start…end−1 are in buf[0…end−start−1]. */
  private start = 0;
  private end = 0;

  constructor(
    private readonly dec: Decimator,
    capacity: number,
  ) {
    this.length = dec.length;
    this.buf = new Float32Array(Math.min(dec.length, capacity + CASCADE_BLOCK));
  }

  /** Makes samples from…to−1 available as samples()[at…at+to−from−1] (until the next call); returns `at`. */
  ensure(from: number, to: number): number {
    if (from < this.start || to > this.length || from > to) {
      throw new RangeError(`DecimatedStream.ensure: ${from}…${to} outside ${this.start}…${this.length}`);
    }
    if (to > this.end) {
      let want = Math.min(this.length, Math.max(to, this.end + CASCADE_BLOCK));
      const cap = this.buf.length;
      if (want - this.start > cap) {
        // slide down, keeping as much history before `from` as fits (the other reader trails behind)
        const keep = Math.min(from, want - cap);
        if (keep < this.end) this.buf.copyWithin(0, keep - this.start, this.end - this.start);
        this.start = keep;
        this.end = Math.max(this.end, keep);
        want = Math.min(want, keep + cap);
        if (want < to) throw new RangeError(`DecimatedStream.ensure: ${to - from} samples do not fit in ${cap}`);
      }
      this.dec.run(this.end, want, this.buf, this.end - this.start);
      this.end = want;
    }
    return from - this.start;
  }

  /** The buffer {@link DecimatedStream.ensure} indexes (the same array for the stream's life). */
  samples(): Float32Array {
    return this.buf;
  }
}

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
  if (!(sampleRate > 0) || !Number.isFinite(sampleRate)) {
    throw new RangeError(`yinPitchTrack: sampleRate must be a positive number of Hz, got ${sampleRate}`);
  }
  const hopS = opts.hopS ?? 0.01;
  const minHz = opts.minHz ?? 40;
  const maxHz = opts.maxHz ?? 2000;
  const threshold = opts.threshold ?? 0.15;
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

  const q = Math.max(1, Math.floor(sampleRate / (MIN_PERIOD_SAMPLES * maxHz)));
  const fsA = sampleRate / q;
  const dec = new Decimator(signal, q);
  const n = dec.length;

  const tauMin = Math.max(2, Math.floor(fsA / maxHz));
  const tauMax = Math.ceil(fsA / minHz);
  const lags = tauMax + 2; // lags 0…tauMax+1 (the +1 for the right neighbour of a dip at tauMax)
  // blocks of at most lags/2 samples keep the FFT near 2–4 × lags long; a hop is a whole number of them
  const hopSamples = Math.max(1, Math.round(hopS * fsA));
  const blocksPerHop = Math.ceil(hopSamples / Math.max(1, Math.floor(lags / 2)));
  const block = Math.max(1, Math.round(hopSamples / blocksPerHop));
  const hop = blocksPerHop * block;
  const blocksPerWindow = Math.ceil(Math.max(windowS * fsA, tauMax) / block);
  const w = blocksPerWindow * block;
  const frames = n >= w + lags ? Math.floor((n - w - lags) / hop) + 1 : 0;

  // The decimated signal is read as it is made: the correlator reads up to ahead + 3 blocks past
  // the window it correlates, the running sums from the window's start; keep both reaches.
  const x = new DecimatedStream(dec, 2 * (w + lags + hop) + (Math.ceil(lags / block) + 4) * block);
  const prefix = new RunningPrefixSums(x, 4 * (w + lags + hop));
  const correlator = new BlockCorrelator(x, block, blocksPerWindow, lags);
  const corr = new Float64Array(correlator.size);
  const d = new Float64Array(lags);
  const dn = new Float64Array(lags);
  const minRefine = Math.round(0.005 * sampleRate);
  const cumSq = prefix.values();
  const lowest = new Float64Array(1); // searchDips' smallest d′

  const timesS = new Float64Array(frames);
  const f0Hz = new Float32Array(frames).fill(Number.NaN);
  const aperiodicity = new Float32Array(frames).fill(1);
  const voiced: number[] = [];
  for (let f = 0; f < frames; f++) {
    correlator.advanceTo(f * blocksPerHop + blocksPerWindow - 1); // the blocks up to the window's last
    const t0 = f * hop;
    timesS[f] = (t0 + (w + tauMax) / 2) / fsA;
    const p0 = prefix.window(t0, w + lags); // cumSq[p0 + j] = Σ_{i<t0+j} x[i]²
    const e0 = cumSq[p0 + w] - cumSq[p0];
    if (e0 <= SILENT_MEAN_SQUARE * w) continue;

    // steps 2–4, lag by lag up to the first qualifying dip
    correlator.correlate(corr);
    const tau = searchDips(corr, cumSq, p0, w, e0, d, dn, tauMin, tauMax, threshold, lowest);
    if (tau < 0) {
      aperiodicity[f] = lowest[0];
      continue;
    }
    aperiodicity[f] = Math.max(0, dn[tau] - parabolaDepth(dn[tau - 1], dn[tau], dn[tau + 1]));

    // step 5: parabolic interpolation on d, refined at the full rate where the analysis rate is coarse
    const lag = tau + parabolaOffset(d[tau - 1], d[tau], d[tau + 1]);
    let period = lag * q;
    if (q > 1 && lag < REFINE_BELOW_SAMPLES) period = refineFullRate(signal, t0 * q, w * q, period, q, minRefine);
    const hz = sampleRate / period;
    f0Hz[f] = hz;
    voiced.push(hz);
  }

  voiced.sort((a, b) => a - b);
  const mid = voiced.length >> 1;
  const medianHz =
    voiced.length === 0 ? null : voiced.length % 2 ? voiced[mid] : 0.5 * (voiced[mid - 1] + voiced[mid]);
  return {
    hopS: hop / fsA,
    timesS,
    f0Hz,
    aperiodicity,
    medianHz,
    voicedFraction: frames > 0 ? voiced.length / frames : 0,
  };
}

/**
 * The running sums of squares P[i] = Σ_{j<i} x[j]² (P[0] = 0), each computed from the one before as
 * P[i] = P[i−1] + x[i−1]² (so the values are those of one pass over the whole signal), kept only
 * for a window that moves forward: `window(t0, len)` gives P[t0 … t0+len−1]. Memory is one window,
 * not n + 1 float64 values.
 */
class RunningPrefixSums {
  private readonly buf: Float64Array;
  /** Index i of buf[0], and how many P values from there are filled in. */
  private start = 0;
  private filled = 1;

  constructor(
    private readonly x: DecimatedStream,
    capacity: number,
  ) {
    this.buf = new Float64Array(Math.max(2, capacity));
  }

  /**
   * Makes P[t0 … t0+len−1] available and returns where P[t0] is in {@link RunningPrefixSums.values}
   * (valid until the next call); t0 ≥ the previous t0, len ≤ capacity, t0 + len − 1 ≤ n.
   */
  window(t0: number, len: number): number {
    const buf = this.buf;
    const end = t0 + len;
    if (this.start + this.filled >= end) return t0 - this.start;
    const base = this.start + this.filled - 1; // first sample read
    const xs = this.x.samples();
    const at = this.x.ensure(base, end - 1) - base; // x[i] is xs[at + i]
    while (this.start + this.filled < end) {
      if (this.filled === buf.length) {
        // full: slide down, keeping the values from t0 on (at least the last one, to continue the sum)
        const from = Math.min(t0 - this.start, this.filled - 1);
        buf.copyWithin(0, from, this.filled);
        this.start += from;
        this.filled -= from;
      }
      // P[i] = P[i−1] + x[i−1]² up to the end or the buffer's end, whichever is first
      const stop = Math.min(buf.length, end - this.start);
      const shift = at + this.start - 1; // buf[f] takes x[start + f − 1] = xs[shift + f]
      let f = this.filled;
      let sum = buf[f - 1];
      for (; f < stop; f++) {
        const v = xs[shift + f];
        sum = sum + v * v;
        buf[f] = sum;
      }
      this.filled = f;
    }
    return t0 - this.start;
  }

  /** The buffer {@link RunningPrefixSums.window} indexes (the same array for the object's life). */
  values(): Float64Array {
    return this.buf;
  }
}

/**
 * Cross-correlation c(τ) = Σ_{j<W} x[t+j]·x[t+j+τ], τ = 0…lags−1, of a window of `blocks` blocks
 * with the signal that follows, assembled per block in the frequency domain (module comment, item 2).
 *
 * With φ = e^(−j2πk·B/N) (a shift by one block) and A = the number of later blocks a block's lags
 * reach into, S_b = Σ_{l=0}^{A} φˡ·X_{b+l} is updated by S_{b+1} = φ⁻¹·(S_b − X_b) + φᴬ·X_{b+A+1},
 * and Q = Σ of the window's conj(X_b)·S_b by adding the newest product and dropping the oldest. Both
 * running quantities are recomputed exactly every 1024 blocks, so rounding cannot accumulate.
 */
class BlockCorrelator {
  /** FFT size N. */
  readonly size: number;
  private readonly fft: RealFft;
  private readonly bins: number;
  private readonly ahead: number;
  private readonly ring: number;
  private readonly xRe: Float64Array;
  private readonly xIm: Float64Array;
  private readonly pRe: Float64Array;
  private readonly pIm: Float64Array;
  /** φˡ for l = 0…ahead, row l at l·bins. */
  private readonly powRe: Float64Array;
  private readonly powIm: Float64Array;
  private readonly sRe: Float64Array;
  private readonly sIm: Float64Array;
  private readonly qRe: Float64Array;
  private readonly qIm: Float64Array;
  /**
   * One buffer holds all the arrays above, as views: the real parts at offsets xAt (the ring), pAt,
   * powAt, sAt and qAt, the imaginary parts `half` further on; {@link blockStep2} indexes it alone.
   */
  private readonly ws: Float64Array;
  private readonly half: number;
  private readonly pAt: number;
  private readonly powAt: number;
  private readonly sAt: number;
  private readonly qAt: number;
  /** Views of the ring's slots, made once (forwardPairAdjacent writes a block's spectrum into them). */
  private readonly slotRe: Float64Array[] = [];
  private readonly slotIm: Float64Array[] = [];
  /** The next block {@link BlockCorrelator.advanceTo} takes in. */
  private next = 0;

  constructor(
    private readonly x: DecimatedStream,
    private readonly hop: number,
    private readonly blocks: number,
    lags: number,
  ) {
    this.ahead = Math.ceil(lags / hop);
    // X_b … X_{b+ahead+3}: two blocks are taken in at once and spectra are made two at a time
    this.ring = this.ahead + 4;
    this.size = nextPowerOfTwo((this.ahead + 1) * hop);
    this.fft = new RealFft(this.size);
    const bins = (this.bins = this.fft.bins);
    this.pAt = this.ring * bins;
    this.powAt = this.pAt + blocks * bins;
    this.sAt = this.powAt + (this.ahead + 1) * bins;
    this.qAt = this.sAt + bins;
    const half = (this.half = this.qAt + bins);
    const ws = (this.ws = new Float64Array(2 * half));
    this.xRe = ws.subarray(0, this.pAt);
    this.xIm = ws.subarray(half, half + this.pAt);
    this.pRe = ws.subarray(this.pAt, this.powAt);
    this.pIm = ws.subarray(half + this.pAt, half + this.powAt);
    this.powRe = ws.subarray(this.powAt, this.sAt);
    this.powIm = ws.subarray(half + this.powAt, half + this.sAt);
    for (let l = 0; l <= this.ahead; l++) {
      for (let k = 0; k < bins; k++) {
        const phi = (2 * Math.PI * k * l * hop) / this.size;
        this.powRe[l * bins + k] = Math.cos(phi);
        this.powIm[l * bins + k] = -Math.sin(phi);
      }
    }
    this.sRe = ws.subarray(this.sAt, this.qAt);
    this.sIm = ws.subarray(half + this.sAt, half + this.qAt);
    this.qRe = ws.subarray(this.qAt, half);
    this.qIm = ws.subarray(half + this.qAt, 2 * half);
    for (let i = 0; i < this.ring; i++) {
      this.slotRe.push(this.xRe.subarray(i * bins, (i + 1) * bins));
      this.slotIm.push(this.xIm.subarray(i * bins, (i + 1) * bins));
    }
  }

  /** Block spectra are made two at a time (one complex FFT); `made` is the last block done. */
  private made = -1;

  private blockSpectra(upTo: number): void {
    const { x, hop, slotRe, slotIm } = this;
    while (this.made < upTo) {
      const b0 = this.made + 1;
      const s0 = b0 % this.ring;
      const s1 = (b0 + 1) % this.ring;
      const start0 = Math.min(x.length, b0 * hop);
      const start1 = Math.min(x.length, start0 + hop);
      const end = Math.min(x.length, start1 + hop);
      const at = x.ensure(start0, end) - start0; // x[i] is xs[at + i]
      const xs = x.samples();
      this.fft.forwardPairAdjacent(
        xs,
        at + start0,
        at + start1,
        at + end,
        slotRe[s0],
        slotIm[s0],
        slotRe[s1],
        slotIm[s1],
      );
      this.made += 2;
    }
  }

  /** S_b = Σ_l φˡ·X_{b+l} and Q = Σ of the stored products, summed afresh. */
  private resync(b: number): void {
    const { bins, sRe, sIm, qRe, qIm, pRe, pIm } = this;
    sRe.fill(0);
    sIm.fill(0);
    for (let l = 0; l <= this.ahead; l++) {
      const o = ((b + l) % this.ring) * bins;
      const ol = l * bins;
      for (let k = 0; k < bins; k++) {
        const ar = this.xRe[o + k];
        const ai = this.xIm[o + k];
        const br = this.powRe[ol + k];
        const bi = this.powIm[ol + k];
        sRe[k] += ar * br - ai * bi;
        sIm[k] += ar * bi + ai * br;
      }
    }
    qRe.fill(0);
    qIm.fill(0);
    for (let i = 0; i < this.blocks; i++) {
      for (let k = 0; k < bins; k++) {
        qRe[k] += pRe[i * bins + k];
        qIm[k] += pIm[i * bins + k];
      }
    }
  }

  /**
   * Takes in blocks up to `last` in order (each P_b = conj(X_b)·S_b replaces P_{b−blocks}). Two
   * consecutive blocks go through one pass over the bins ({@link blockStep2}) unless a resync falls
   * between them; every bin sees the same operations in the same order as block by block.
   */
  advanceTo(last: number): void {
    const { bins, ahead, ring, blocks } = this;
    while (this.next <= last) {
      const b = this.next;
      if (b === 0) {
        this.blockSpectra(ahead);
        this.resync(0);
      }
      if (b < last && (b + 1) % 1024 !== 0) {
        this.blockSpectra(b + ahead + 2);
        const pAt = this.pAt;
        blockStep2(
          this.ws,
          this.half,
          (b % ring) * bins,
          ((b + ahead + 1) % ring) * bins,
          ((b + 1) % ring) * bins,
          ((b + ahead + 2) % ring) * bins,
          this.sAt,
          pAt + (b % blocks) * bins,
          pAt + ((b + 1) % blocks) * bins,
          this.qAt,
          this.powAt + bins,
          this.powAt + ahead * bins,
          bins,
        );
        this.next = b + 2;
      } else {
        this.blockSpectra(b + ahead + 1);
        blockStep(
          this.xRe,
          this.xIm,
          (b % ring) * bins,
          ((b + ahead + 1) % ring) * bins,
          this.sRe,
          this.sIm,
          this.pRe,
          this.pIm,
          (b % blocks) * bins,
          this.qRe,
          this.qIm,
          this.powRe,
          this.powIm,
          ahead * bins,
          bins,
        );
        this.next = b + 1;
      }
      if (this.next % 1024 === 0) this.resync(this.next);
    }
  }

  /** c(τ) for the window made of the last `blocks` blocks, into out[0…size−1] (lags ≥ `lags` unused). */
  correlate(out: Float64Array): void {
    this.fft.inverse(this.qRe, this.qIm, out);
  }
}

/**
 * Two consecutive blocks b, b + 1 of {@link BlockCorrelator} in one pass over the bins: for each bin,
 * exactly the operations of {@link blockStep} for block b and then for block b + 1, with S and Q
 * held in locals between the two. The bins are independent, so the results are those of two calls
 * of blockStep, bit for bit. Every array is a stretch of `ws` (real parts at the offsets given,
 * imaginary parts `half` further on): X_b at xb, X_{b+A+1} at xn, X_{b+1} at xb2, X_{b+A+2} at xn2,
 * S at sAt, the product slots of b and b + 1 at p1 and p2, Q at qAt, φ at c1, φᴬ at cA.
 */
function blockStep2(
  ws: Float64Array,
  half: number,
  xb: number,
  xn: number,
  xb2: number,
  xn2: number,
  sAt: number,
  p1: number,
  p2: number,
  qAt: number,
  c1: number,
  cA: number,
  bins: number,
): void {
  // offsets as int32 locals (not re-checked as tagged parameters on every access)
  const h = half | 0;
  const n = bins | 0;
  const ob = xb | 0;
  const on = xn | 0;
  const ob2 = xb2 | 0;
  const on2 = xn2 | 0;
  const os = sAt | 0;
  const op = p1 | 0;
  const op2 = p2 | 0;
  const oq = qAt | 0;
  const oc = c1 | 0;
  const oa = cA | 0;
  for (let k = 0; k < n; k++) {
    const c = ws[oc + k];
    const s = ws[h + oc + k];
    const ar = ws[oa + k];
    const ai = ws[h + oa + k];
    // block b
    let xr = ws[ob + k];
    let xi = ws[h + ob + k];
    let sr = ws[os + k];
    let si = ws[h + os + k];
    let nr = xr * sr + xi * si;
    let ni = xr * si - xi * sr;
    let qr = ws[oq + k] + (nr - ws[op + k]);
    let qi = ws[h + oq + k] + (ni - ws[h + op + k]);
    ws[op + k] = nr;
    ws[h + op + k] = ni;
    let dr = sr - xr;
    let di = si - xi;
    let yr = ws[on + k];
    let yi = ws[h + on + k];
    sr = dr * c + di * s + (yr * ar - yi * ai);
    si = di * c - dr * s + (yr * ai + yi * ar);
    // block b + 1
    xr = ws[ob2 + k];
    xi = ws[h + ob2 + k];
    nr = xr * sr + xi * si;
    ni = xr * si - xi * sr;
    qr += nr - ws[op2 + k];
    qi += ni - ws[h + op2 + k];
    ws[op2 + k] = nr;
    ws[h + op2 + k] = ni;
    dr = sr - xr;
    di = si - xi;
    yr = ws[on2 + k];
    yi = ws[h + on2 + k];
    ws[os + k] = dr * c + di * s + (yr * ar - yi * ai);
    ws[h + os + k] = di * c - dr * s + (yr * ai + yi * ar);
    ws[oq + k] = qr;
    ws[h + oq + k] = qi;
  }
}

/**
 * One block of {@link BlockCorrelator}, fused into a single pass over the bins: the product
 * n = conj(X_b)·S_b replaces the oldest stored product p (q += n − p), then
 * S ← φ⁻¹·(S − X_b) + φᴬ·X_{b+A+1}, with φ = pow row 1 and φᴬ = pow row A (at offset oa).
 */
function blockStep(
  xRe: Float64Array,
  xIm: Float64Array,
  ob: number,
  on: number,
  sRe: Float64Array,
  sIm: Float64Array,
  pRe: Float64Array,
  pIm: Float64Array,
  op: number,
  qRe: Float64Array,
  qIm: Float64Array,
  powRe: Float64Array,
  powIm: Float64Array,
  oa: number,
  bins: number,
): void {
  for (let k = 0; k < bins; k++) {
    const xr = xRe[ob + k];
    const xi = xIm[ob + k];
    const sr = sRe[k];
    const si = sIm[k];
    const nr = xr * sr + xi * si;
    const ni = xr * si - xi * sr;
    qRe[k] += nr - pRe[op + k];
    qIm[k] += ni - pIm[op + k];
    pRe[op + k] = nr;
    pIm[op + k] = ni;
    // φ⁻¹ = conj φ (|φ| = 1)
    const dr = sr - xr;
    const di = si - xi;
    const c = powRe[bins + k];
    const s = powIm[bins + k];
    const yr = xRe[on + k];
    const yi = xIm[on + k];
    const ar = powRe[oa + k];
    const ai = powIm[oa + k];
    sRe[k] = dr * c + di * s + (yr * ar - yi * ai);
    sIm[k] = di * c - dr * s + (yr * ai + yi * ar);
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
): number {
  const wr = Math.min(w, Math.max(Math.ceil(2 * estimate), minWindow));
  let tau = Math.round(estimate);
  let here = diffAt(x, start, wr, tau);
  let left = diffAt(x, start, wr, tau - 1);
  let right = diffAt(x, start, wr, tau + 1);
  for (let step = 0; step < steps; step++) {
    if (left < here) {
      right = here;
      here = left;
      tau--;
      left = diffAt(x, start, wr, tau - 1);
    } else if (right < here) {
      left = here;
      here = right;
      tau++;
      right = diffAt(x, start, wr, tau + 1);
    } else break;
  }
  if (!Number.isFinite(left) || !Number.isFinite(right) || !Number.isFinite(here)) return estimate;
  return tau + parabolaOffset(left, here, right);
}

/** d(τ) = Σ_{j<W}(x[s+j] − x[s+j+τ])² on the full-rate signal; Infinity when τ < 1 or past the end. */
function diffAt(x: Float32Array, start: number, w: number, tau: number): number {
  if (tau < 1 || start + w + tau > x.length) return Infinity;
  let s = 0;
  const end = start + w;
  for (let j = start; j < end; j++) {
    const v = x[j] - x[j + tau];
    s += v * v;
  }
  return s;
}
