/**
 * The YIN difference function's two ingredients (A. de Cheveigné and H. Kawahara, "YIN, a
 * fundamental frequency estimator for speech and music", J. Acoust. Soc. Am. 111(4), 2002, eq. 7):
 * d(τ) = e(0) + e(τ) − 2·c(τ), e from running sums of squares ({@link RunningPrefixSums}) and
 * c(τ) = Σ_{j<W} x[t+j]·x[t+j+τ] assembled from blocks of B samples ({@link BlockCorrelator}): each
 * block's spectrum Xb (zero-padded to N ≥ B + τmax + 2, so the circular correlation does not wrap),
 * the spectrum of the blocks that follow it, Sb = Σₗ X_{b+l}·e^(−j2πk·l·B/N), and
 * c = IDFT(Σ over the window's blocks of conj(Xb)·Sb), kept as a running sum. Per hop (defaults):
 * half a complex 512-point FFT (two blocks' spectra at once) and one inverse, instead of three real
 * FFTs per frame. Both read the decimated signal (decimate.ts) through a window that moves forward.
 */
import type { DecimatedStream } from './decimate.ts';
import { RealFft, nextPowerOfTwo } from './fft.ts';

/**
 * The running sums of squares P[i] = Σ_{j<i} x[j]² (P[0] = 0), each computed from the one before as
 * P[i] = P[i−1] + x[i−1]² (so the values are those of one pass over the whole signal), kept only
 * for a window that moves forward: `window(t0, len)` gives P[t0 … t0+len−1]. Memory is one window,
 * not n + 1 float64 values.
 */
export class RunningPrefixSums {
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
export class BlockCorrelator {
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
