/**
 * Decimation for the pitch track (shared/dsp/pitch.ts): the signal is low-passed and decimated by q
 * to the analysis rate fs_a = fs/q. The filters are centred (zero-delay) Kaiser-windowed-sinc FIRs
 * (J. F. Kaiser, in Kuo & Kaiser, *System Analysis by Digital Computer*, 1966; design formulas in
 * Oppenheim & Schafer, *Discrete-Time Signal Processing*, 3rd ed., ch. 7, Kaiser window method),
 * half-band stages when q is a power of two: the band to 0.2·fs_a passes, and what would alias onto
 * it is ≥ 40 dB down. The half-band stages run two at a time in one loop, the signal between them
 * held in locals (rounded to float32, as if stored), the same sums as stage by stage.
 *
 * Memory: {@link DecimatedStream} makes the decimated signal as it is read and keeps only a window
 * of it, each value computed exactly as in one pass over the whole signal.
 */

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

/** Output samples per block of {@link Decimator.run}; DecimatedStream makes at least this many at a time. */
export const CASCADE_BLOCK = 8192;

/**
 * The decimation of {@link decimate} as a cascade of FIR stages run block by block: for each block
 * of final outputs, the input range every stage needs is worked out backwards (outputs m0…m1−1 of a
 * stage read its input from m0·q − half to (m1 − 1)·q + half), then the stages run forwards over just
 * those ranges into small float32 buffers. Same arithmetic, and so the same values, as running each
 * stage over the whole signal, for any split of the outputs into calls of `run`.
 */
export class Decimator {
  /** Output length ⌈n/q⌉. */
  readonly length: number;
  private readonly stages: FirStage[] = [];
  /** Length of the signal after each stage, the input's first. */
  private readonly ns: number[];
  private readonly bufs: Float32Array[] = [];
  private readonly lo: number[];
  private readonly hi: number[];

  /** Index in the whole signal of `signal[0]` (setInput). */
  private base = 0;
  /** Samples of the whole signal from `base` on that `signal` holds. */
  private held: number;

  /**
   * @param signal the input, or its first stretch (see setInput)
   * @param inputLength length of the whole input (default signal.length)
   */
  constructor(
    private signal: ArrayLike<number>,
    q: number,
    inputLength = signal.length,
  ) {
    this.held = signal.length;
    if (q > 1 && (q & (q - 1)) === 0) {
      const count = Math.round(Math.log2(q));
      for (let i = 1; i <= count; i++) {
        // stage i outputs fs/2^i; keep 0…0.2·fs/q alias-free: transition = 1 − 2·(0.2·fs/q)/(fs/2^i)
        this.stages.push(firStage(2, decimationFilter(2, 1 - 0.4 * 2 ** (i - count))));
      }
    } else if (q > 1) {
      this.stages.push(firStage(q, decimationFilter(q)));
    }
    this.ns = [inputLength];
    for (const st of this.stages) this.ns.push(Math.ceil(this.ns[this.ns.length - 1] / st.q));
    this.length = this.ns[this.stages.length];
    this.lo = new Array<number>(this.stages.length + 1);
    this.hi = new Array<number>(this.stages.length + 1);
    const taps013 = (st: FirStage | undefined) =>
      st !== undefined && st.q === 2 && st.offsets.length === 2 && st.offsets[0] === 1 && st.offsets[1] === 3;
    this.pairable = this.stages.map((st, i) => taps013(this.stages[i - 1]) && taps013(st));
  }

  /**
   * Gives the input as a stretch of the whole signal: x[i] is sample base + i (for a signal that
   * arrives in blocks and is not kept whole). Each `run` must then read only samples inside the
   * stretch: {@link Decimator.inputRange} says which it reads; anything else is a RangeError.
   */
  setInput(x: ArrayLike<number>, base: number): void {
    this.signal = x;
    this.base = base;
    this.held = x.length;
  }

  /**
   * The input samples [from, to) that outputs m0…m1−1 (m0 < m1) read: the cascade's reach worked
   * backwards, stage by stage (as run does).
   *
   * @example new Decimator(x, 8).inputRange(0, 100) // [0, 800 + reach)
   */
  inputRange(m0: number, m1: number): [number, number] {
    let lo = m0;
    let hi = m1;
    for (let s = this.stages.length; s >= 1; s--) {
      const st = this.stages[s - 1];
      lo = Math.max(0, lo * st.q - st.half);
      hi = Math.min(this.ns[s - 1], (hi - 1) * st.q + st.half + 1);
    }
    return [lo, hi];
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
    if (m1 > m0) {
      const [need0, need1] = this.inputRange(m0, m1);
      if (need0 < this.base || need1 > this.base + this.held) {
        throw new RangeError(`Decimator.run: outputs ${m0}…${m1} read input ${need0}…${need1}, but only ${this.base}…${this.base + this.held} is given`);
      }
    }
    if (last === 0) {
      for (let m = m0; m < m1; m++) out[o0 + m - m0] = this.signal[m - this.base];
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
        const srcLo = s === 1 ? this.base : lo[s - 1];
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
export class DecimatedStream {
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

  /** One past the last decimated sample made so far (the next `ensure` that needs more starts there). */
  get made(): number {
    return this.end;
  }

  /** The buffer {@link DecimatedStream.ensure} indexes (the same array for the stream's life). */
  samples(): Float32Array {
    return this.buf;
  }
}
