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
 * Measures sample peak, RMS, crest factor, DC offset, clipping and near-silence of each channel and
 * of all channels together, in one pass per channel, accumulating in float64 (per window, then per
 * clip, which keeps the rounding error near 1e-15 relative).
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
  const { sampleRate } = opts;
  const silenceThresholdDbfs = opts.silenceThresholdDbfs ?? -60;
  const silenceWindowS = opts.silenceWindowS ?? 0.05;
  const clipThreshold = opts.clipThreshold ?? DEFAULT_CLIP_THRESHOLD;
  const minClipRun = opts.minClipRun ?? 3;
  if (channels.length === 0) throw new RangeError(`${fn}: channels is empty; give at least one channel`);
  const n = channels[0].length;
  if (n === 0) throw new RangeError(`${fn}: channels hold no samples`);
  channels.forEach((c, i) => {
    if (c.length !== n) throw new RangeError(`${fn}: channel ${i} has ${c.length} samples, channel 0 has ${n}`);
  });
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

  const spw = sampleRate * silenceWindowS;
  const windows = frameCount(n, spw);
  const silentMeanSquare = dbToPower(silenceThresholdDbfs);
  const allWindowSums = new Float64Array(windows);
  const perChannel: ChannelLevels[] = [];
  let allPeak = 0;
  let allSum = 0;
  let allSumSquares = 0;
  let allClipped = 0;
  let allRuns = 0;

  for (let c = 0; c < channels.length; c++) {
    const x = channels[c];
    let peak = 0;
    let sum = 0;
    let sumSquares = 0;
    let silentSamples = 0;
    let clipped = 0;
    let runs = 0;
    let run = 0; // length of the current run at or beyond the threshold, signed by its polarity
    let start = 0;
    for (let w = 0; w < windows; w++) {
      const end = w + 1 === windows ? n : frameStart(w + 1, spw);
      let s = 0;
      let s2 = 0;
      for (let i = start; i < end; i++) {
        const v = x[i];
        const a = Math.abs(v);
        s += v;
        s2 += v * v;
        if (a > peak) peak = a;
        if (a >= clipThreshold) {
          if (v > 0 ? run > 0 : run < 0) run += v > 0 ? 1 : -1;
          else {
            if (Math.abs(run) >= minClipRun) {
              clipped += Math.abs(run);
              runs++;
            }
            run = v > 0 ? 1 : -1;
          }
        } else if (run !== 0) {
          if (Math.abs(run) >= minClipRun) {
            clipped += Math.abs(run);
            runs++;
          }
          run = 0;
        }
      }
      if (s2 < silentMeanSquare * (end - start)) silentSamples += end - start;
      allWindowSums[w] += s2;
      sum += s;
      sumSquares += s2;
      start = end;
    }
    if (Math.abs(run) >= minClipRun) {
      clipped += Math.abs(run);
      runs++;
    }
    if (!Number.isFinite(sumSquares) || !Number.isFinite(peak)) {
      throw new RangeError(`${fn}: channel ${c} contains NaN or infinite samples`);
    }
    perChannel.push(levelsFrom(peak, sum, sumSquares, n, clipped, runs, silentSamples / n));
    if (peak > allPeak) allPeak = peak;
    allSum += sum;
    allSumSquares += sumSquares;
    allClipped += clipped;
    allRuns += runs;
  }

  let allSilent = 0;
  const nc = channels.length;
  for (let w = 0; w < windows; w++) {
    const len = (w + 1 === windows ? n : frameStart(w + 1, spw)) - frameStart(w, spw);
    if (allWindowSums[w] < silentMeanSquare * len * nc) allSilent += len;
  }
  const overall = levelsFrom(allPeak, allSum, allSumSquares, n * nc, allClipped, allRuns, allSilent / n);
  return {
    sampleRate,
    sampleCount: n,
    durationS: n / sampleRate,
    overall,
    perChannel,
    settings: { silenceThresholdDbfs, silenceWindowS, clipThreshold, minClipRun },
  };
}
