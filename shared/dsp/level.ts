/**
 * Level report of a clip: sample peak, RMS, crest factor, DC offset, clipping and near-silence,
 * per channel and for all channels together.
 *
 * RMS convention: plain RMS relative to full scale, 20·log10(√(mean x²)). A full-scale square wave
 * reads 0 dBFS and a full-scale sine −3.01 dBFS (a sine's crest factor is √2). This is NOT the
 * AES17 convention (AES17-2015, definition of "decibels, full scale" [recalled]), which refers RMS
 * to a full-scale sine so that it reads 0 dB FS, 3.01 dB above this module's figure; it is what
 * sox's `stats` effect and most audio meters report as "RMS level" [recalled]. Sample peak is the
 * largest |x| of the stored samples (no inter-sample true peak: see true-peak.ts).
 */
import { ampToDb, dbToPower } from '../units.ts';
import { frameCount, frameStart } from './frame-stats.ts';
import { WholeUnits } from './whole-units.ts';

/**
 * Default clipping threshold, linear full scale: 1 − 1.5/32768 ≈ 0.999954 (−0.0004 dBFS), halfway
 * between the two largest positive 16-bit codes (32766 and 32767)/32768. Decoded 16-bit full scale
 * is +32767/32768 and −32768/32768, so both rails of a clipped 16-bit file count; 24-bit and float
 * sources count from 0.99995 up. (1 − 0.5/32768 would miss +32767/32768.) 8-bit sources, whose
 * positive full scale is 127/128, need clipThreshold = 1 − 1.5/128.
 */
export const DEFAULT_CLIP_THRESHOLD = 1 - 1.5 / 32768;

/** Levels of one channel, or of all channels together. Linear values are full-scale ratios. */
export interface ChannelLevels {
  /** Highest |x|, linear full scale. */
  samplePeak: number;
  /** 20·log10(samplePeak), dBFS; −Infinity for digital silence. */
  samplePeakDbfs: number;
  /** √(mean x²), linear full scale. */
  rms: number;
  /** 20·log10(rms), dBFS (full-scale sine −3.01 dBFS; not AES17). −Infinity for digital silence. */
  rmsDbfs: number;
  /** samplePeakDbfs − rmsDbfs, dB (sine 3.01 dB, square 0 dB); NaN for digital silence. */
  crestDb: number;
  /** Mean sample value, linear full scale. */
  dcOffset: number;
  /** Samples that belong to clipped runs (≥ minClipRun consecutive same-sign samples with |x| ≥ clipThreshold). */
  clippedSamples: number;
  /** Number of such runs. */
  clippedRuns: number;
  /** Fraction (0…1) of the clip's duration lying in silence windows whose RMS is below the silence threshold. */
  nearSilenceFraction: number;
}

/** Result of measureLevels. Serialise −Infinity / NaN levels with finiteOrNull (units.ts). */
export interface LevelReport {
  /** Hz. */
  sampleRate: number;
  /** Samples per channel. */
  sampleCount: number;
  /** sampleCount / sampleRate, s. */
  durationS: number;
  /** All channels together: peak of any channel, RMS over every sample of every channel, etc. */
  overall: ChannelLevels;
  perChannel: ChannelLevels[];
  /** The settings used, so a report says how it was measured. */
  settings: {
    silenceThresholdDbfs: number;
    silenceWindowS: number;
    clipThreshold: number;
    minClipRun: number;
  };
}

/** Options of measureLevels; only sampleRate is required. */
export interface MeasureLevelsOptions {
  /** Sample rate of the channels, Hz (required: it sets the silence windows). */
  sampleRate: number;
  /** A silence window is "near silent" when its RMS is below this, dBFS (default −60). */
  silenceThresholdDbfs?: number;
  /** Silence window length, s (default 0.05). */
  silenceWindowS?: number;
  /** |x| at or above this counts towards clipping, linear (default DEFAULT_CLIP_THRESHOLD). */
  clipThreshold?: number;
  /** Shortest run of consecutive same-sign samples at or beyond the threshold that counts as clipping (default 3). */
  minClipRun?: number;
}

function levelsFrom(
  peak: number,
  sum: number,
  sumSquares: number,
  n: number,
  clippedSamples: number,
  clippedRuns: number,
  nearSilenceFraction: number,
): ChannelLevels {
  const rms = Math.sqrt(sumSquares / n);
  const samplePeakDbfs = ampToDb(peak);
  const rmsDbfs = ampToDb(rms);
  return {
    samplePeak: peak,
    samplePeakDbfs,
    rms,
    rmsDbfs,
    crestDb: rms > 0 ? samplePeakDbfs - rmsDbfs : NaN,
    dcOffset: sum / n,
    clippedSamples,
    clippedRuns,
    nearSilenceFraction,
  };
}

/**
 * Sums of one window x[start, end): out[0] = Σx, out[1] = Σx², out[2] = max|x| (float64, added in
 * sample order from 0, so the sums equal a plain loop's bit for bit). NaN samples leave max|x|
 * unchanged and make the sums NaN.
 * Kernel: trusts its inputs (0 ≤ start ≤ end ≤ x.length, out holds 3 values).
 */
function windowSums(x: Float32Array, start: number, end: number, out: Float64Array): void {
  let s = 0;
  let s2 = 0;
  let peak = 0;
  for (let i = start; i < end; i++) {
    const v = x[i];
    s += v;
    s2 += v * v;
    const a = Math.abs(v);
    if (a > peak) peak = a;
  }
  out[0] = s;
  out[1] = s2;
  out[2] = peak;
}

/**
 * windowSums of two channels in one loop, so that their four independent sums overlap in the CPU:
 * out[0..2] for x, out[3..5] for y, each bit-identical to windowSums of that channel alone.
 * Kernel: trusts its inputs (0 ≤ start ≤ end ≤ both lengths, out holds 6 values).
 */
function windowSumsPair(x: Float32Array, y: Float32Array, start: number, end: number, out: Float64Array): void {
  let sx = 0;
  let s2x = 0;
  let peakX = 0;
  let sy = 0;
  let s2y = 0;
  let peakY = 0;
  for (let i = start; i < end; i++) {
    const u = x[i];
    const v = y[i];
    sx += u;
    s2x += u * u;
    sy += v;
    s2y += v * v;
    const a = Math.abs(u);
    if (a > peakX) peakX = a;
    const b = Math.abs(v);
    if (b > peakY) peakY = b;
  }
  out[0] = sx;
  out[1] = s2x;
  out[2] = peakX;
  out[3] = sy;
  out[4] = s2y;
  out[5] = peakY;
}

/** Running totals of one channel over the windows measured so far. */
interface ChannelTotals {
  /** Highest |x|. */
  peak: number;
  /** Σx, float64, the windows' sums added in window order. */
  sum: number;
  /** Σx², likewise. */
  sumSquares: number;
  /** Samples in near-silent windows. */
  silentSamples: number;
  /** Length of the current run at or beyond the clip threshold, signed by its polarity; 0 for none. */
  run: number;
  /** Samples in finished runs of at least minClipRun. */
  clipped: number;
  /** Finished runs of at least minClipRun. */
  runs: number;
}

const newTotals = (): ChannelTotals => ({
  peak: 0,
  sum: 0,
  sumSquares: 0,
  silentSamples: 0,
  run: 0,
  clipped: 0,
  runs: 0,
});

/** Ends the current run of `st` (counting it if it holds ≥ minClipRun samples). */
function endClipRun(st: ChannelTotals, minClipRun: number): void {
  const len = Math.abs(st.run);
  if (len >= minClipRun) {
    st.clipped += len;
    st.runs++;
  }
  st.run = 0;
}

/**
 * Advances the clip-run state over x[start, end): a sample with |x| ≥ clipThreshold extends the
 * current run if it has the run's sign, else ends it and starts a new one; any other sample ends it.
 * Kernel: trusts its inputs (clipThreshold > 0, so a sample at or beyond it is nonzero).
 */
function trackClipRuns(
  x: Float32Array,
  start: number,
  end: number,
  clipThreshold: number,
  minClipRun: number,
  st: ChannelTotals,
): void {
  for (let i = start; i < end; i++) {
    const v = x[i];
    if (Math.abs(v) >= clipThreshold) {
      if (v > 0 ? st.run > 0 : st.run < 0) st.run += v > 0 ? 1 : -1;
      else {
        endClipRun(st, minClipRun);
        st.run = v > 0 ? 1 : -1;
      }
    } else if (st.run !== 0) endClipRun(st, minClipRun);
  }
}

/**
 * Measures sample peak, RMS, crest factor, DC offset, clipping and near-silence of each channel and
 * of all channels together, accumulating in float64 (per window, then per clip, which keeps the
 * rounding error near 1e-15 relative). One pass sums two channels at a time; the clip-run tracker
 * then reads again only the windows that hold a sample at or beyond clipThreshold (each channel's
 * results are the same as when it is measured alone, bit for bit).
 *
 * - RMS = √((1/N)·Σ x²) (plain; full-scale sine −3.0103 dBFS, crest √2 = 3.0103 dB: see the
 *   module comment). Overall RMS is over every sample of every channel: √(mean of the channels'
 *   mean squares); overall peak is the highest |x| of any channel (as sox and meters report).
 * - Clipping: a run is ≥ minClipRun consecutive samples of one sign with |x| ≥ clipThreshold; the
 *   report counts the samples in such runs and the runs. Overall counts are channel sums.
 * - Near-silence: the clip is cut into windows laid out like frames (frame-stats.ts, frameS =
 *   silenceWindowS); a window is near-silent when its RMS (overall: over all channels in it) is below
 *   silenceThresholdDbfs. The fraction is by duration, so a short tail window weighs by its length.
 *
 * Throws RangeError for no channels, empty or unequal channels, bad options, or NaN/±∞ samples.
 *
 * @param channels  planar channels, linear full scale, all the same length
 * @example measureLevels([sine1k], { sampleRate: 48000 }).overall.rmsDbfs // −3.0103 for a full-scale sine
 */
export function measureLevels(channels: Float32Array[], opts: MeasureLevelsOptions): LevelReport {
  const fn = 'measureLevels';
  if (channels.length === 0) throw new RangeError(`${fn}: channels is empty; give at least one channel`);
  const n = channels[0].length;
  if (n === 0) throw new RangeError(`${fn}: channels hold no samples`);
  channels.forEach((c, i) => {
    if (c.length !== n) throw new RangeError(`${fn}: channel ${i} has ${c.length} samples, channel 0 has ${n}`);
  });
  const m = new LevelsStream(channels.length, n, opts, fn);
  m.add(channels, n);
  return m.result();
}

/**
 * {@link measureLevels} block by block, for a signal whose length is known in advance and whose
 * samples arrive in pieces (a file being decoded): `add` the channels' next samples, in blocks of
 * any lengths, then read `result()`. Every window's sums run over its samples in order (a window
 * cut by a block edge is gathered first: whole-units.ts), so the report equals measureLevels's of
 * the whole signal exactly. Memory: one float64 per 50 ms window and one window per channel.
 *
 * @example const m = new LevelsStream(2, n, { sampleRate: 44100 }); m.add([l, r], l.length); m.result()
 */
export class LevelsStream {
  private readonly units: WholeUnits;
  private readonly totals: ChannelTotals[];
  private readonly allWindowSums: Float64Array;
  private readonly sums = new Float64Array(6);
  private readonly spw: number;
  private readonly windows: number;
  private readonly silentMeanSquare: number;
  private readonly settings: LevelReport['settings'];

  /**
   * @param channelCount channels per block
   * @param sampleCount samples per channel in the whole signal (≥ 1)
   * @throws RangeError for bad options (as measureLevels)
   */
  constructor(
    private readonly channelCount: number,
    private readonly sampleCount: number,
    private readonly opts: MeasureLevelsOptions,
    private readonly fn = 'LevelsStream',
  ) {
    const { sampleRate } = opts;
    const silenceThresholdDbfs = opts.silenceThresholdDbfs ?? -60;
    const silenceWindowS = opts.silenceWindowS ?? 0.05;
    const clipThreshold = opts.clipThreshold ?? DEFAULT_CLIP_THRESHOLD;
    const minClipRun = opts.minClipRun ?? 3;
    if (!(Number.isInteger(channelCount) && channelCount >= 1)) throw new RangeError(`${fn}: channelCount must be an integer ≥ 1, got ${channelCount}`);
    if (!(Number.isInteger(sampleCount) && sampleCount >= 1)) throw new RangeError(`${fn}: channels hold no samples`);
    if (!(Number.isFinite(sampleRate) && sampleRate > 0)) {
      throw new RangeError(`${fn}: sampleRate must be a positive number of Hz, got ${sampleRate}`);
    }
    if (!Number.isFinite(silenceThresholdDbfs)) {
      throw new RangeError(`${fn}: silenceThresholdDbfs must be a finite dBFS value, got ${silenceThresholdDbfs}`);
    }
    if (!(Number.isFinite(silenceWindowS) && silenceWindowS * sampleRate >= 1)) {
      throw new RangeError(`${fn}: silenceWindowS must span at least one sample, got ${silenceWindowS}`);
    }
    if (!(clipThreshold > 0)) throw new RangeError(`${fn}: clipThreshold must be positive, got ${clipThreshold}`);
    if (!(Number.isInteger(minClipRun) && minClipRun >= 1)) {
      throw new RangeError(`${fn}: minClipRun must be an integer ≥ 1, got ${minClipRun}`);
    }
    this.settings = { silenceThresholdDbfs, silenceWindowS, clipThreshold, minClipRun };
    const spw = (this.spw = sampleRate * silenceWindowS);
    this.windows = frameCount(sampleCount, spw);
    this.silentMeanSquare = dbToPower(silenceThresholdDbfs);
    this.allWindowSums = new Float64Array(this.windows);
    this.totals = Array.from({ length: channelCount }, newTotals);
    this.units = new WholeUnits(channelCount, this.windows, sampleCount, (w) => frameStart(w, spw), Math.ceil(spw) + 1, (x, base, w0, w1) =>
      this.measureWindows(x, base, w0, w1),
    );
  }

  /** Adds the next `len` samples of every channel (channels[c][0…len)). */
  add(channels: Float32Array[], len: number): void {
    if (channels.length !== this.channelCount) {
      throw new RangeError(`${this.fn}: ${channels.length} channels given, ${this.channelCount} announced`);
    }
    this.units.add(channels, len);
  }

  /**
   * Windows w0…w1−1 of every channel, channels in pairs (the last one alone when their number is
   * odd): each channel's sums are accumulated exactly as when it is measured alone, and
   * allWindowSums in channel order.
   */
  private measureWindows(x: Float32Array[], base: number, w0: number, w1: number): void {
    const { sums, spw, windows, sampleCount } = this;
    for (let c = 0; c < x.length; c += 2) {
      const a = x[c];
      const b = c + 1 < x.length ? x[c + 1] : undefined;
      const ta = this.totals[c];
      const tb = this.totals[c + 1];
      for (let w = w0; w < w1; w++) {
        const start = frameStart(w, spw) - base;
        const end = (w + 1 === windows ? sampleCount : frameStart(w + 1, spw)) - base;
        if (b === undefined) windowSums(a, start, end, sums);
        else windowSumsPair(a, b, start, end, sums);
        this.addWindow(ta, a, w, start, end, sums[0], sums[1], sums[2]);
        if (b !== undefined) this.addWindow(tb, b, w, start, end, sums[3], sums[4], sums[5]);
      }
    }
  }

  /** Adds window w = x[start, end) of one channel, with its sums s, s2 and peak, to its totals t. */
  private addWindow(t: ChannelTotals, x: Float32Array, w: number, start: number, end: number, s: number, s2: number, windowPeak: number): void {
    const { clipThreshold, minClipRun } = this.settings;
    if (windowPeak > t.peak) t.peak = windowPeak;
    // Only a window holding a sample at or beyond the threshold needs the run tracker; any other
    // (non-empty) window ends a run carried into it at its first sample.
    if (windowPeak >= clipThreshold) trackClipRuns(x, start, end, clipThreshold, minClipRun, t);
    else if (t.run !== 0 && end > start) endClipRun(t, minClipRun);
    if (s2 < this.silentMeanSquare * (end - start)) t.silentSamples += end - start;
    this.allWindowSums[w] += s2;
    t.sum += s;
    t.sumSquares += s2;
  }

  /** The level report of every sample added; RangeError before they have all arrived, or for NaN/±∞ samples. */
  result(): LevelReport {
    const { fn, sampleCount: n, settings, spw, windows } = this;
    this.units.end(fn);
    const perChannel: ChannelLevels[] = [];
    let allPeak = 0;
    let allSum = 0;
    let allSumSquares = 0;
    let allClipped = 0;
    let allRuns = 0;
    this.totals.forEach((t, c) => {
      // a run reaching the end counts
      endClipRun(t, settings.minClipRun);
      if (!Number.isFinite(t.sumSquares) || !Number.isFinite(t.peak)) {
        throw new RangeError(`${fn}: channel ${c} contains NaN or infinite samples`);
      }
      perChannel.push(levelsFrom(t.peak, t.sum, t.sumSquares, n, t.clipped, t.runs, t.silentSamples / n));
      if (t.peak > allPeak) allPeak = t.peak;
      allSum += t.sum;
      allSumSquares += t.sumSquares;
      allClipped += t.clipped;
      allRuns += t.runs;
    });
    let allSilent = 0;
    const nc = this.channelCount;
    for (let w = 0; w < windows; w++) {
      const len = (w + 1 === windows ? n : frameStart(w + 1, spw)) - frameStart(w, spw);
      if (this.allWindowSums[w] < this.silentMeanSquare * len * nc) allSilent += len;
    }
    const overall = levelsFrom(allPeak, allSum, allSumSquares, n * nc, allClipped, allRuns, allSilent / n);
    return {
      sampleRate: this.opts.sampleRate,
      sampleCount: n,
      durationS: n / this.opts.sampleRate,
      overall,
      perChannel,
      settings,
    };
  }
}
