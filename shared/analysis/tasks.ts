/**
 * The clip analysis cut into independent tasks, each one call of a shared/dsp measurement, which
 * analyze-clip.ts runs in order in one thread on a whole clip, and the settings and figures they
 * share with the analysis block by block (stream.ts), which must give the same result. A task's
 * output depends only on its inputs.
 *
 * Channel tasks read every channel of the clip; source tasks read only the modulation source, one
 * Float32Array.
 */
import type { AudioClip } from '../audio/clip.ts';
import { rmsEnvelope, sourceStatsPass } from '../dsp/envelope.ts';
import type { FrameStats } from '../dsp/frame-stats.ts';
import type { MagnitudeHistogram } from '../dsp/histogram.ts';
import { type ChannelLevels, type LevelReport, measureLevels } from '../dsp/level.ts';
import { type LoudnessReport, measureLoudness } from '../dsp/loudness.ts';
import { type PitchTrack, type YinOptions, yinPitchTrack } from '../dsp/pitch.ts';
import { type FrequencyBand, bandEnergyFractions, dominantHz, rolloffHz, spectralCentroidHz } from '../dsp/spectral-features.ts';
import { type DisplaySpectrogram, type WelchSpectrogramOptions, welchSpectrogram } from '../dsp/spectrogram.ts';
import type { WelchSpectrum } from '../dsp/welch.ts';
import { type TruePeakReport, channelTruePeakLinear, measureTruePeak } from '../dsp/true-peak.ts';
import { ampToDb } from '../units.ts';
import type { AnalyzeSettings, ChannelFigures, SpectrumFigures } from './types.ts';

/** Tasks that read every channel. */
export const CHANNEL_TASKS = ['levels', 'true peak', 'loudness'] as const;
export type ChannelTask = (typeof CHANNEL_TASKS)[number];

/** Tasks that read only the modulation source. */
export const SOURCE_TASKS = ['source levels', 'frames', 'spectrum', 'pitch'] as const;
export type SourceTask = (typeof SOURCE_TASKS)[number];

/** What each task returns. */
export interface TaskOutputs {
  levels: LevelReport;
  'true peak': TruePeakReport;
  loudness: LoudnessReport;
  /** Level figures of the source alone, with its own true peak (BS.1770-4 Annex 2), linear. */
  'source levels': ChannelLevels & { truePeakLinear: number };
  /** Frame statistics, the two envelopes built on them and the magnitude histogram (one pass: sourceStatsPass). */
  frames: { frames: FrameStats; peak: Float64Array; rms: Float64Array; histogram: MagnitudeHistogram };
  /** Welch PSD, the features read from it, and the display spectrogram (welchSpectrogram). */
  spectrum: Omit<SpectrumFigures, 'pitch'>;
  pitch: PitchTrack;
}

/** The settings a source task reads: plain data (no functions), so it can be posted to a worker. */
/**
 * The dominant-pitch track covers 40 Hz to 1 kHz (bass to the top of the soprano range, C6 ≈ 1047 Hz)
 * on a 20 ms hop. It serves pitch-locked pulses, whose rate a driver's minimum off-time caps near
 * 1–2 kHz anyway; halving the range from 2 kHz lets YIN run on a signal decimated to ~5.5 kHz, which
 * takes ~40 % less time (measured on the 5-minute benchmark clip). Higher notes read as unvoiced or
 * as a subharmonic.
 */
export const PITCH_MAX_HZ = 1000;
export const PITCH_HOP_S = 0.02;

export type SourceTaskSettings = Omit<AnalyzeSettings, 'channel'>;

/**
 * Runs one channel task on the clip (levels: measureLevels; true peak: measureTruePeak, ITU-R
 * BS.1770-4 Annex 2; loudness: measureLoudness, BS.1770-4 and EBU Tech 3342).
 *
 * @example runChannelTask('loudness', clip).integratedLufs // −23.0 for the BS.1770 calibration tone
 */
export function runChannelTask<T extends ChannelTask>(task: T, clip: AudioClip): TaskOutputs[T] {
  const { channels, sampleRate } = clip;
  const out: { [K in ChannelTask]?: TaskOutputs[K] } = {};
  if (task === 'levels') out.levels = measureLevels(channels, { sampleRate });
  else if (task === 'true peak') out['true peak'] = measureTruePeak(channels, sampleRate);
  else if (task === 'loudness') out.loudness = measureLoudness(channels, sampleRate);
  else throw new RangeError(`runChannelTask: unknown task ${String(task)}`);
  return out[task] as TaskOutputs[T];
}

/**
 * Runs one source task on the modulation source: its levels (measureLevels), frame statistics with
 * the peak and RMS envelopes and the magnitude histogram (one pass), Welch spectrum with its
 * features (Welch 1967) and display spectrogram, or YIN pitch track (de Cheveigné & Kawahara
 * 2002). The choices analyzeClip makes are here: a spectrogram read off the Welch segments when the
 * clip fills every column with them (≥ ~93 s at 44.1 kHz), else of two FFT frames of its own per
 * column (welchSpectrogram), and a pitch hop of 20 ms (melodic notes last ≥ ~50 ms) up to
 * min(1 kHz, fs/4).
 *
 * @param source modulation source samples, full scale ±1
 * @param sampleRate Hz
 * @example runSourceTask('spectrum', mix, 44100, settings).dominantHz // ≈ 440 for an A4 tone
 */
export function runSourceTask<T extends SourceTask>(
  task: T,
  source: Float32Array,
  sampleRate: number,
  s: SourceTaskSettings,
): TaskOutputs[T] {
  const out: { [K in SourceTask]?: TaskOutputs[K] } = {};
  switch (task as SourceTask) {
    case 'source levels':
      out['source levels'] = { ...measureLevels([source], { sampleRate }).overall, truePeakLinear: channelTruePeakLinear(source) };
      break;
    case 'frames': {
      const { frames, peak, histogram } = sourceStatsPass(source, sampleRate, { attackS: s.attackS, releaseS: s.releaseS, frameS: s.frameS });
      const rms = rmsEnvelope(frames, { windowS: s.rmsWindowS });
      out.frames = { frames, peak, rms, histogram };
      break;
    }
    case 'spectrum': {
      const { welch, spectrogram } = welchSpectrogram(source, sampleRate, spectrogramOptions(s));
      out.spectrum = spectrumFigures(welch, spectrogram, s.bands);
      break;
    }
    case 'pitch':
      out.pitch = yinPitchTrack(source, sampleRate, pitchOptions(sampleRate));
      break;
    default:
      throw new RangeError(`runSourceTask: unknown task ${String(task)}`);
  }
  return out[task] as TaskOutputs[T];
}

/** The display spectrogram's settings (welchSpectrogram): Welch's FFT size, two own frames per column for a short clip. */
export const spectrogramOptions = (s: SourceTaskSettings): WelchSpectrogramOptions => ({ welchSize: s.fftSize, ownFramesPerColumn: 2 });

/** The pitch track's settings at a sample rate (PITCH_HOP_S, up to min(PITCH_MAX_HZ, fs/4)). */
export const pitchOptions = (sampleRate: number): YinOptions => ({ hopS: PITCH_HOP_S, maxHz: Math.min(PITCH_MAX_HZ, sampleRate / 4) });

/**
 * The spectrum figures read off Welch's spectrum: centroid, 95 % roll-off, dominant frequency and
 * band fractions (spectral-features.ts), beside the spectrum and the display spectrogram.
 *
 * @example spectrumFigures(welch, spectrogram, DEFAULT_BANDS).centroidHz
 */
export function spectrumFigures(welch: WelchSpectrum, spectrogram: DisplaySpectrogram, bands: readonly FrequencyBand[]): TaskOutputs['spectrum'] {
  return {
    welch,
    centroidHz: spectralCentroidHz(welch),
    rolloff95Hz: rolloffHz(welch, 0.95),
    dominantHz: dominantHz(welch),
    bands: bandEnergyFractions(welch, bands),
    spectrogram,
  };
}

/**
 * True when the source's level figures are the clip's overall ones, so 'source levels' need not run:
 * the source is the very array of a mono clip's only channel (analyzeClip's rule).
 *
 * @example sourceIsTheClip(monoClip, monoClip.channels[0]) // true
 */
export const sourceIsTheClip = (clip: AudioClip, source: Float32Array): boolean =>
  clip.channels.length === 1 && source === clip.channels[0];

/** The source's level figures without the linear true peak the task carries beside them. */
function withoutTruePeak(l: TaskOutputs['source levels']): ChannelLevels {
  const { truePeakLinear: _tp, ...rest } = l;
  return rest;
}

/**
 * The channel part's figures from its task outputs. The modulation source's true peak is measured
 * on the source itself (BS.1770-4 Annex 2 on the mix, or on the one channel): channels out of step
 * partly cancel in the mix, so its true peak can lie far below either channel's. `sourceLevels`
 * absent: the source is the clip itself (a mono clip's channel), whose true peak is the clip's.
 *
 * @example channelFigures(s, out.levels, out['true peak'], out.loudness, out['source levels'], out.frames).level.modulation.truePeakDbtp
 */
export function channelFigures(
  s: AnalyzeSettings,
  levels: LevelReport,
  tp: TruePeakReport,
  loudness: LoudnessReport,
  sourceLevels: TaskOutputs['source levels'] | undefined,
  frames: TaskOutputs['frames'],
): ChannelFigures {
  const sourceTp = sourceLevels ? ampToDb(sourceLevels.truePeakLinear) : tp.truePeakDbtp;
  return {
    level: {
      ...levels.overall,
      truePeakDbtp: tp.truePeakDbtp,
      perChannel: levels.perChannel.map((l, i) => ({ ...l, truePeakDbtp: ampToDb(tp.perChannelLinear[i]) })),
      modulation: { ...(sourceLevels ? withoutTruePeak(sourceLevels) : levels.overall), truePeakDbtp: sourceTp },
    },
    loudness,
    frames: frames.frames,
    envelope: { attackS: s.attackS, releaseS: s.releaseS, rmsWindowS: s.rmsWindowS, peak: frames.peak, rms: frames.rms },
    histogram: frames.histogram,
  };
}
