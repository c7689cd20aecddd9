/**
 * A spectrogram sized for display: about a thousand time columns and a hundred-odd log-spaced
 * frequency rows, whatever the clip length, with a bounded number of FFTs.
 *
 * Each column covers an equal share of the clip. Inside it, ⌈share/(size/2)⌉ Hann frames of `size`
 * samples (enough for 50 % overlap), at most `maxFramesPerColumn`, are spread evenly and their one-sided
 * power spectral densities averaged (the density scaling of welch.ts: FS²/Hz, Σ psd·binHz = mean
 * square). A five-minute clip at 44.1 kHz thus costs 1000 × 8 FFTs of 2048 points, frames 1654
 * samples apart (every sample covered); beyond about 6.2 minutes (8 × 2048 samples per column) the
 * frames leave gaps. Short clips get one frame per column and fewer columns (a quarter frame apart).
 *
 * welchSpectrogram makes the same display from Welch's own segments (welch.ts) when the clip is long
 * enough to give every column some of them (about 93 s at 44.1 kHz for 1000 columns of 4096): the
 * spectrum and the display then share every FFT, and the display covers every sample.
 *
 * Rows: `rows` bands with log-spaced edges eᵣ = minHz·(maxHz/minHz)^(r/rows). A row's value is the
 * mean of the PSD over [eᵣ, eᵣ₊₁] with the PSD taken as piecewise linear between bin centres, i.e.
 * (1/(eᵣ₊₁ − eᵣ))·∫ psd(f) df. Wide rows thus average their bins (trapezoid weights); rows narrower
 * than a bin interpolate between the two nearest bins instead of repeating one. Because the row means
 * are means of a density, Σᵣ 10^(db/10)·(eᵣ₊₁ − eᵣ) ≈ the power between minHz and maxHz.
 */
import { RealFft, isPowerOfTwo } from './fft.ts';
import { hannWindow } from './window.ts';
import { type WelchSpectrum, densityOf, loneSegment, segmentPairs, welchPsd, welchPsdGrouped } from './welch.ts';

/** Options of {@link displaySpectrogram}; every field has a default. */
export interface SpectrogramOptions {
  /** Requested time columns (default 1000); fewer for clips shorter than columns × size/4 samples. */
  columns?: number;
  /** Log-spaced frequency rows (default 128). */
  rows?: number;
  /** Lower edge of the lowest row, Hz (default 20). */
  minHz?: number;
  /** Upper edge of the highest row, Hz (default min(20000, fs/2)). */
  maxHz?: number;
  /** FFT size, a power of two ≥ 4 (default 2048: 21.5 Hz bins, 46 ms at 44.1 kHz). */
  size?: number;
  /** Most FFT frames averaged per column (default 8); bounds the cost of long clips. */
  maxFramesPerColumn?: number;
  /** Level written for a row with no power, dB re 1 FS²/Hz (default −200). */
  floorDb?: number;
}

/** A display spectrogram. `db[c·rows + r]` is column c (time), row r (frequency, lowest first). */
export interface DisplaySpectrogram {
  /** Centre time of each column, s. */
  timesS: Float64Array;
  /** Geometric centre √(eᵣ·eᵣ₊₁) of each row, Hz. */
  frequenciesHz: Float64Array;
  /** Row edges, rows + 1 values, Hz. */
  edgesHz: Float64Array;
  /**
   * Mean PSD of each row in dB re 1 FS²/Hz (10·log10 of FS²/Hz, floored at floorDb), laid out
   * column after column: each time column is a contiguous run of `rows` values, lowest row first.
   */
  db: Float32Array;
  columns: number;
  rows: number;
  /** FFT frames averaged in each column. */
  framesPerColumn: number;
  /** FFT size used. */
  size: number;
}

/**
 * Means of a one-sided PSD (bins k·binHz, piecewise linear between them, constant beyond the last
 * bin) over consecutive bands with the given edges: out[r] = ∫_{e_r}^{e_{r+1}} psd / (e_{r+1} − e_r).
 * The integral of a piecewise-linear function is exact (trapezoid rule on its own knots). Bins
 * and edges are in the same units, so the mean is a density in the PSD's own unit.
 *
 * @param psd density per bin, any unit U/Hz
 * @param binHz bin spacing, Hz
 * @param edgesHz ascending band edges, Hz (≥ 0), bands = edgesHz.length − 1
 * @param out bands values (allocated when absent)
 * @returns mean density per band, in U/Hz
 * @example bandMeans(Float64Array.of(0, 1, 2, 3), 10, Float64Array.of(5, 25)) // → [1.5]
 */
export function bandMeans(
  psd: ArrayLike<number>,
  binHz: number,
  edgesHz: ArrayLike<number>,
  out: Float64Array = new Float64Array(edgesHz.length - 1),
): Float64Array {
  const last = psd.length - 1;
  // ∫ of the piece k (between bins k and k+1) from k to k+t, in U·bins; beyond the last bin the
  // density is constant. Rows are integrated piece by piece (no global running sum), so a quiet row
  // next to a loud one keeps its own relative precision.
  const partial = (k: number, t: number): number =>
    k >= last ? t * psd[last] : t * psd[k] + 0.5 * t * t * (psd[k + 1] - psd[k]);
  for (let r = 0; r < edgesHz.length - 1; r++) {
    const x0 = edgesHz[r] / binHz;
    const x1 = edgesHz[r + 1] / binHz;
    const k0 = Math.floor(x0);
    const k1 = Math.floor(x1);
    let integral: number;
    if (k0 === k1) {
      integral = partial(k0, x1 - k0) - partial(k0, x0 - k0);
    } else {
      integral = partial(k0, 1) - partial(k0, x0 - k0);
      for (let k = k0 + 1; k < k1; k++) integral += partial(k, 1);
      integral += partial(k1, x1 - k1);
    }
    out[r] = integral / (x1 - x0);
  }
  return out;
}

function positiveInt(v: number, name: string, fn: string): number {
  if (!Number.isInteger(v) || v < 1) {
    throw new RangeError(`${fn}: ${name} must be an integer ≥ 1, got ${v}`);
  }
  return v;
}

/** The validated options every spectrogram shares: rows and their edges, requested columns, floor. */
interface RowLayout {
  rows: number;
  requested: number;
  edgesHz: Float64Array;
  frequenciesHz: Float64Array;
  floorPower: number;
}

function rowLayout(fn: string, n: number, sampleRate: number, opts: SpectrogramOptions): RowLayout {
  if (!(sampleRate > 0) || !Number.isFinite(sampleRate)) {
    throw new RangeError(`${fn}: sampleRate must be a positive number of Hz, got ${sampleRate}`);
  }
  if (n === 0) throw new RangeError(`${fn}: signal is empty`);
  const rows = positiveInt(opts.rows ?? 128, 'opts.rows', fn);
  const requested = positiveInt(opts.columns ?? 1000, 'opts.columns', fn);
  const minHz = opts.minHz ?? 20;
  const maxHz = opts.maxHz ?? Math.min(20000, sampleRate / 2);
  if (!(minHz > 0 && minHz < maxHz && maxHz <= sampleRate / 2)) {
    throw new RangeError(`${fn}: need 0 < minHz < maxHz ≤ fs/2 = ${sampleRate / 2} Hz, got minHz ${minHz}, maxHz ${maxHz}`);
  }
  const edgesHz = new Float64Array(rows + 1);
  const frequenciesHz = new Float64Array(rows);
  const ratio = maxHz / minHz;
  for (let r = 0; r <= rows; r++) edgesHz[r] = minHz * Math.pow(ratio, r / rows);
  edgesHz[rows] = maxHz;
  for (let r = 0; r < rows; r++) frequenciesHz[r] = Math.sqrt(edgesHz[r] * edgesHz[r + 1]);
  return { rows, requested, edgesHz, frequenciesHz, floorPower: Math.pow(10, (opts.floorDb ?? -200) / 10) };
}

/**
 * Writes column c of `db` from `acc`, the column's summed unnormalised periodograms |X[k]|²
 * (k = 0…N/2, overwritten): scaled to a one-sided density averaged over `frames` (welch.ts),
 * averaged into the rows (bandMeans), in dB floored at the layout's floor.
 */
function writeColumn(
  acc: Float64Array,
  frames: number,
  sampleRate: number,
  sumW2: number,
  binHz: number,
  layout: RowLayout,
  means: Float64Array,
  db: Float32Array,
  c: number,
): void {
  const bins = acc.length;
  const scale = 1 / (frames * sampleRate * sumW2);
  for (let k = 0; k < bins; k++) acc[k] *= (k === 0 || k === bins - 1 ? 1 : 2) * scale;
  bandMeans(acc, binHz, layout.edgesHz, means);
  const { rows, floorPower } = layout;
  const base = c * rows;
  for (let r = 0; r < rows; r++) db[base + r] = 10 * Math.log10(Math.max(means[r], floorPower));
}

/**
 * Display spectrogram of a mono signal: Hann-windowed FFT frames averaged per time column, one-sided
 * PSD (FS²/Hz, welch.ts scaling) averaged into log-spaced rows, in dB (module comment for the method).
 *
 * Frames reach past the clip ends at the first and last columns; the missing samples count as zeros.
 * A column's frames go through the FFT in pairs (RealFft.pairedPower); their powers are added in
 * frame order.
 *
 * @param signal samples, full scale ±1 (not empty)
 * @param sampleRate Hz
 * @param opts see {@link SpectrogramOptions}
 * @returns see {@link DisplaySpectrogram}
 * @throws RangeError for empty input or invalid options (the message names the option)
 * @example
 *   const s = displaySpectrogram(clip, 44100); // 5 min → 1000 columns × 128 rows, 8 frames each
 *   s.db[c * s.rows + r]; // level of row r in column c, dB re 1 FS²/Hz
 */
export function displaySpectrogram(
  signal: Float32Array,
  sampleRate: number,
  opts: SpectrogramOptions = {},
): DisplaySpectrogram {
  const fn = 'displaySpectrogram';
  const n = signal.length;
  const layout = rowLayout(fn, n, sampleRate, opts);
  const size = opts.size ?? 2048;
  if (!isPowerOfTwo(size) || size < 4) {
    throw new RangeError(`${fn}: opts.size must be a power of two ≥ 4, got ${size}`);
  }
  const maxFrames = positiveInt(opts.maxFramesPerColumn ?? 8, 'opts.maxFramesPerColumn', fn);
  const { rows, requested, edgesHz, frequenciesHz } = layout;

  const columns = Math.min(requested, Math.max(1, Math.ceil(n / (size / 4))));
  const span = n / columns;
  const framesPerColumn = Math.min(maxFrames, Math.max(1, Math.ceil(span / (size / 2))));

  const fft = new RealFft(size);
  const bins = fft.bins;
  const w = hannWindow(size);
  let sumW2 = 0;
  for (let i = 0; i < size; i++) sumW2 += w[i] * w[i];
  const z = new Float64Array(2 * size);
  const frame = new Float64Array(size);
  const power = new Float64Array(bins);
  const acc = new Float64Array(bins);
  const means = new Float64Array(rows);
  const binHz = sampleRate / size;

  /** Frame f of column c, Hann-windowed, into out[offset + stride·i] (zeros where it reaches past the clip's ends). */
  const windowFrame = (c: number, f: number, out: Float64Array, offset: number, stride: number) => {
    const centre = (c + (f + 0.5) / framesPerColumn) * span;
    const start = Math.round(centre - size / 2);
    for (let i = 0; i < size; i++) {
      const j = start + i;
      out[offset + stride * i] = j >= 0 && j < n ? signal[j] * w[i] : 0;
    }
  };

  const timesS = new Float64Array(columns);
  const db = new Float32Array(columns * rows);
  for (let c = 0; c < columns; c++) {
    timesS[c] = ((c + 0.5) * span) / sampleRate;
    acc.fill(0);
    // frames two at a time through one complex FFT (RealFft.pairedPower), an odd last one alone
    let f = 0;
    for (; f + 1 < framesPerColumn; f += 2) {
      windowFrame(c, f, z, 0, 2);
      windowFrame(c, f + 1, z, 1, 2);
      fft.pairedPower(z, power);
      for (let k = 0; k < bins; k++) acc[k] += power[k];
    }
    if (f < framesPerColumn) {
      windowFrame(c, f, frame, 0, 1);
      fft.powerSpectrum(frame, power);
      for (let k = 0; k < bins; k++) acc[k] += power[k];
    }
    writeColumn(acc, framesPerColumn, sampleRate, sumW2, binHz, layout, means, db, c);
  }
  return { timesS, frequenciesHz, edgesHz, db, columns, rows, framesPerColumn, size };
}

/** Options of {@link welchSpectrogram}: the spectrogram's, less its own frame settings, and Welch's size. */
export interface WelchSpectrogramOptions extends Omit<SpectrogramOptions, 'size' | 'maxFramesPerColumn'> {
  /** Welch segment and FFT size, a power of two ≥ 4 (default 4096). */
  welchSize?: number;
  /** Frames per column for a clip too short to share (displaySpectrogram's maxFramesPerColumn; default 2). */
  ownFramesPerColumn?: number;
}

/**
 * Welch's spectrum and a display spectrogram from the same FFTs, when the clip is long enough: the
 * spectrogram's column c averages the Welch segments whose pair (the two segments that go through
 * one FFT, welch.ts) is centred in c's share of the clip, n/columns samples, with the density
 * scaling and rows of {@link displaySpectrogram}. Its frames are then Welch's: `welchSize` long,
 * half overlapping, every sample covered. This needs every column to receive a pair, about
 * columns × welchSize samples (93 s at 44.1 kHz for 1000 columns of 4096); a shorter clip gets
 * `displaySpectrogram(signal, sampleRate, { …opts, maxFramesPerColumn: ownFramesPerColumn })` beside
 * welchPsd instead. Either way the Welch spectrum is exactly welchPsd's.
 *
 * Columns may average different numbers of frames (a few more where a pair's centre falls just
 * inside); `framesPerColumn` reports the fewest.
 *
 * @param signal samples, full scale ±1 (not empty)
 * @param sampleRate Hz
 * @throws RangeError as welchPsd and displaySpectrogram do
 * @example const { welch, spectrogram } = welchSpectrogram(mix, 44100); // 5 min: 1000 columns of 6–7 frames of 4096
 */
export function welchSpectrogram(
  signal: Float32Array,
  sampleRate: number,
  opts: WelchSpectrogramOptions = {},
): { welch: WelchSpectrum; spectrogram: DisplaySpectrogram } {
  const plan = sharingPlan('welchSpectrogram', signal.length, sampleRate, opts);
  if (plan === null) {
    return {
      welch: welchPsd(signal, sampleRate, { size: opts.welchSize ?? 4096 }),
      spectrogram: displaySpectrogram(signal, sampleRate, { ...opts, maxFramesPerColumn: opts.ownFramesPerColumn ?? 2 }),
    };
  }
  const columns = new ColumnSums(plan, sampleRate);
  // welchPsdGrouped adds each group's periodogram into the array returned here (its column's sums)
  const welch = welchPsdGrouped(signal, sampleRate, plan.size, columns.groupSum);
  return { welch, spectrogram: columns.finish() };
}

/** How Welch's segments fall into the display's columns, for a clip long enough to share them. */
interface SharingPlan {
  layout: RowLayout;
  columns: number;
  size: number;
  hop: number;
  segments: number;
  /** Samples per column, n/columns. */
  span: number;
}

/**
 * The plan of welchSpectrogram for a clip of n samples, or null when it cannot share Welch's FFTs
 * with the display (every column must receive a group of segments). Validates the options.
 */
function sharingPlan(fn: string, n: number, sampleRate: number, opts: WelchSpectrogramOptions): SharingPlan | null {
  const size = opts.welchSize ?? 4096;
  const layout = rowLayout(fn, n, sampleRate, opts);
  if (!isPowerOfTwo(size) || size < 4) throw new RangeError(`${fn}: opts.welchSize must be a power of two ≥ 4, got ${size}`);
  const columns = layout.requested;
  const hop = size / 2;
  const segments = n < size ? 1 : Math.floor((n - size) / hop) + 1;
  const plan: SharingPlan = { layout, columns, size, hop, segments, span: n / columns };
  // Shared FFTs only if every column gets a group: groups' centres rise by `size`, so none may be
  // skipped, and the first and last columns must be reached.
  const groups = Math.ceil(segments / 2);
  const lastCount = segments % 2 === 0 ? 2 : 1;
  const shareable =
    n >= 2 * size &&
    size <= plan.span &&
    columnOf(plan, 0, segments > 1 ? 2 : 1) === 0 &&
    columnOf(plan, 2 * (groups - 1), lastCount) === columns - 1;
  return shareable ? plan : null;
}

/** The column of the group of segments first…first+count−1 (as welchPsd hands them over), by its centre. */
const columnOf = (p: SharingPlan, first: number, count: number): number =>
  Math.min(p.columns - 1, Math.floor((first * p.hop + (p.size + (count - 1) * p.hop) / 2) / p.span));

/**
 * The display's columns summed from Welch's groups of segments, which arrive in order:
 * `groupSum(first, count)` gives the sums the group's periodogram is to be added to (its column's,
 * the previous column written out when a new one begins); `finish()` writes the last and returns the
 * spectrogram.
 */
class ColumnSums {
  private readonly acc: Float64Array;
  private readonly means: Float64Array;
  private readonly timesS: Float64Array;
  private readonly db: Float32Array;
  /** Σ w² of the periodic Hann window of the plan's size (Welch's density scaling uses the same). */
  readonly sumW2: number;
  private readonly binHz: number;
  private column = 0;
  private frames = 0;
  private fewest = Infinity;

  constructor(
    private readonly plan: SharingPlan,
    private readonly sampleRate: number,
  ) {
    const { size, layout, columns } = plan;
    const w = hannWindow(size);
    let sumW2 = 0;
    for (let i = 0; i < size; i++) sumW2 += w[i] * w[i];
    this.sumW2 = sumW2;
    this.binHz = sampleRate / size;
    this.acc = new Float64Array(size / 2 + 1);
    this.means = new Float64Array(layout.rows);
    this.timesS = new Float64Array(columns);
    this.db = new Float32Array(columns * layout.rows);
  }

  private write(): void {
    const { plan, column } = this;
    writeColumn(this.acc, this.frames, this.sampleRate, this.sumW2, this.binHz, plan.layout, this.means, this.db, column);
    this.timesS[column] = ((column + 0.5) * plan.span) / this.sampleRate;
    this.fewest = Math.min(this.fewest, this.frames);
    this.acc.fill(0);
    this.frames = 0;
  }

  readonly groupSum = (first: number, count: 1 | 2): Float64Array => {
    const c = columnOf(this.plan, first, count);
    if (c !== this.column) {
      this.write();
      this.column = c;
    }
    this.frames += count;
    return this.acc;
  };

  finish(): DisplaySpectrogram {
    this.write();
    const { layout, columns, size } = this.plan;
    const { edgesHz, frequenciesHz, rows } = layout;
    return { timesS: this.timesS, frequenciesHz, edgesHz, db: this.db, columns, rows, framesPerColumn: this.fewest, size };
  }
}

/**
 * {@link welchSpectrogram} block by block, for a clip whose length is known in advance and whose
 * samples arrive in pieces (the modulation source of a file being decoded): `add` the next samples,
 * in blocks of any lengths, then read `result()`. When the clip shares Welch's FFTs with the display,
 * the segments go through the FFT in the same pairs, in the same order, into the same sums, as soon
 * as a stretch of them is complete, so both results equal welchSpectrogram's exactly; memory is one
 * stretch of 64 pairs of segments (~0.5 M samples at 4096). A clip too short to share (under ~93 s at
 * 44.1 kHz) is kept whole and handed to welchSpectrogram at the end.
 *
 * @example const s = new WelchSpectrogramStream(n, 44100); s.add(a); s.add(b); s.result().welch.segments
 */
export class WelchSpectrogramStream {
  private readonly plan: SharingPlan | null;
  /** Samples from the start of segment `next` on (or the whole clip when not sharing). */
  private buf: Float32Array;
  private filled = 0;
  private received = 0;
  /** First segment not yet transformed (even while pairs remain). */
  private next = 0;
  private readonly fft: RealFft | null = null;
  private readonly w: Float64Array = new Float64Array(0);
  private readonly z: Float64Array = new Float64Array(0);
  private readonly acc: Float64Array = new Float64Array(0);
  private readonly columns: ColumnSums | null = null;

  /** @throws RangeError as welchSpectrogram for bad options or an empty clip */
  constructor(
    private readonly sampleCount: number,
    private readonly sampleRate: number,
    private readonly opts: WelchSpectrogramOptions = {},
    /** Segment pairs per stretch. */
    pairsPerStretch = 64,
  ) {
    this.plan = sharingPlan('WelchSpectrogramStream', sampleCount, sampleRate, opts);
    const p = this.plan;
    if (p === null) {
      this.buf = new Float32Array(sampleCount);
      return;
    }
    this.buf = new Float32Array(p.size + (2 * pairsPerStretch - 1) * p.hop);
    this.fft = new RealFft(p.size);
    this.w = hannWindow(p.size);
    this.z = new Float64Array(2 * p.size);
    this.acc = new Float64Array(this.fft.bins);
    this.columns = new ColumnSums(p, sampleRate);
  }

  /** Adds the next `len` samples (x[0…len)). */
  add(x: Float32Array, len = x.length): void {
    if (this.received + len > this.sampleCount) {
      throw new RangeError(`WelchSpectrogramStream.add: more than the ${this.sampleCount} samples announced`);
    }
    let i = 0;
    while (i < len) {
      const take = Math.min(len - i, this.buf.length - this.filled);
      this.buf.set(x.subarray(i, i + take), this.filled);
      this.filled += take;
      this.received += take;
      i += take;
      if (this.filled === this.buf.length) this.transform();
    }
  }

  /** Transforms every whole pair of segments in the buffer, then keeps the samples from the next segment on. */
  private transform(): void {
    const p = this.plan;
    if (p === null) return;
    const start = this.next * p.hop; // sample index of buf[0]
    // pairs (s, s + 1) whose second segment has fully arrived, and never the lone last one
    let s1 = this.next;
    while (s1 + 1 < p.segments && (s1 + 1) * p.hop + p.size <= this.received) s1 += 2;
    if (s1 === this.next) return;
    segmentPairs(this.fft!, this.z, this.buf, start, p.hop, this.w, this.next, s1, this.acc, this.columns!.groupSum);
    const keepFrom = s1 * p.hop - start;
    this.buf.copyWithin(0, keepFrom, this.filled);
    this.filled -= keepFrom;
    this.next = s1;
  }

  /** Welch's spectrum and the display spectrogram; RangeError before every sample has arrived. */
  result(): { welch: WelchSpectrum; spectrogram: DisplaySpectrogram } {
    if (this.received !== this.sampleCount) throw new RangeError(`WelchSpectrogramStream.result: ${this.received} of ${this.sampleCount} samples added`);
    const p = this.plan;
    if (p === null) return welchSpectrogram(this.buf, this.sampleRate, this.opts);
    this.transform();
    if (this.next < p.segments) {
      loneSegment(this.fft!, this.buf, this.next * p.hop, this.next, p.hop, this.w, new Float64Array(this.fft!.bins), this.acc, undefined, this.columns!.groupSum);
    }
    return { welch: densityOf(this.acc, p.segments, this.sampleRate, this.columns!.sumW2, p.size), spectrogram: this.columns!.finish() };
  }
}
