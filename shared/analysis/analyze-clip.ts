/**
 * The clip analysis engine: one call turns a decoded clip into everything the models downstream
 * and the person at the coil need — levels and true peak, BS.1770 loudness, the modulation
 * source's frame statistics, envelopes and magnitude histogram, its spectrum, a display
 * spectrogram and a pitch track. Pure (no I/O); progress is reported through a callback.
 *
 * Which signal is which: `level.*` figures are over all channels together (peak: highest of any
 * channel; RMS: over every sample of every channel), as sox and audio meters report them;
 * loudness follows BS.1770 channel weighting; the modulation source (mix or one channel, the
 * signal that will drive the coil) gets its own level figures, and is what the frame statistics,
 * envelopes, histogram, spectrum and pitch track describe.
 */
import { type AudioClip, type ModulationChannel, clipDurationS, modulationSource } from '../audio/clip.ts';
import { peakEnvelopeFrames, rmsEnvelope } from '../dsp/envelope.ts';
import { type FrameStats, computeFrameStats } from '../dsp/frame-stats.ts';
import { type MagnitudeHistogram, magnitudeHistogram } from '../dsp/histogram.ts';
import { type ChannelLevels, measureLevels } from '../dsp/level.ts';
import { type LoudnessReport, measureLoudness } from '../dsp/loudness.ts';
import { type PitchTrack, yinPitchTrack } from '../dsp/pitch.ts';
import {
  type BandFraction,
  DEFAULT_BANDS,
  type FrequencyBand,
  bandEnergyFractions,
  dominantHz,
  rolloffHz,
  spectralCentroidHz,
} from '../dsp/spectral-features.ts';
import { type DisplaySpectrogram, displaySpectrogram } from '../dsp/spectrogram.ts';
import { measureTruePeak } from '../dsp/true-peak.ts';
import { type WelchSpectrum, welchPsd } from '../dsp/welch.ts';
import { ampToDb } from '../units.ts';

export interface AnalyzeOptions {
  /** The signal that drives the coil (default 'mix'). */
  channel?: ModulationChannel;
  /** Frame grid of the statistics, s (default 0.001). */
  frameS?: number;
  /** Peak follower attack / release time constants, s (defaults 0.001 / 0.05). */
  attackS?: number;
  releaseS?: number;
  /** RMS envelope window, s (default 0.01). */
  rmsWindowS?: number;
  /** Welch FFT size (default 4096). */
  fftSize?: number;
  /** Bands for the energy fractions (default DEFAULT_BANDS). */
  bands?: readonly FrequencyBand[];
  /** Called between stages with a fraction 0…1 of the work done. */
  onProgress?: (fraction: number, stage: string) => void;
}

/** Level figures with the true peak beside the sample peak. */
export interface LevelFigures extends ChannelLevels {
  /** True peak, dBTP (ITU-R BS.1770-4 Annex 2); for the mix source an upper bound (see analyzeClip). */
  truePeakDbtp: number;
}

export interface ClipAnalysis {
  sampleRate: number;
  channels: number;
  sampleCount: number;
  durationS: number;
  modulationChannel: ModulationChannel;
  /** All channels together, with per-channel and modulation-source figures beside. */
  level: LevelFigures & { perChannel: LevelFigures[]; modulation: LevelFigures };
  loudness: LoudnessReport;
  /** Frame statistics of the modulation source. */
  frames: FrameStats;
  /** Per-frame envelopes of the modulation source, linear full scale. */
  envelope: { attackS: number; releaseS: number; rmsWindowS: number; peak: Float64Array; rms: Float64Array };
  /** Magnitude histogram of the modulation source. */
  histogram: MagnitudeHistogram;
  spectrum: {
    welch: WelchSpectrum;
    centroidHz: number | null;
    rolloff95Hz: number | null;
    dominantHz: number | null;
    bands: BandFraction[];
    spectrogram: DisplaySpectrogram;
    pitch: PitchTrack;
  };
}

const STAGES = ['levels', 'true peak', 'loudness', 'frames', 'histogram', 'spectrum', 'spectrogram', 'pitch'] as const;

/**
 * Analyses a clip (module comment). Throws RangeError for a clip with no channels or no samples
 * (the decoder rejects those with an InputError before this is reached).
 *
 * @example analyzeClip(synthDemoClip('harbour-lights')).loudness.integratedLufs // ≈ −16 LUFS
 */
export function analyzeClip(clip: AudioClip, opts: AnalyzeOptions = {}): ClipAnalysis {
  const { sampleRate, channels } = clip;
  if (channels.length === 0) throw new RangeError('analyzeClip: clip has no channels');
  if (channels[0].length === 0) throw new RangeError('analyzeClip: clip has no samples');
  const which = opts.channel ?? 'mix';
  if (which === 'right' && channels.length < 2) {
    throw new RangeError('analyzeClip: channel "right" asked of a mono clip');
  }
  const frameS = opts.frameS ?? 0.001;
  const attackS = opts.attackS ?? 0.001;
  const releaseS = opts.releaseS ?? 0.05;
  const rmsWindowS = opts.rmsWindowS ?? 0.01;
  let stage = 0;
  const progress = () => opts.onProgress?.(stage / STAGES.length, STAGES[stage++] ?? 'done');

  progress();
  const levels = measureLevels(channels, { sampleRate });
  progress();
  const tp = measureTruePeak(channels, sampleRate);
  const source = modulationSource(clip, which);
  const sourceLevels = source === channels[0] && channels.length === 1 ? levels.overall : measureLevels([source], { sampleRate }).overall;
  // The oversampling filter is linear, so the mix's true peak is at most the largest channel's
  // (|mean of channels| ≤ max |channel| at every oversampled instant): report that bound for the
  // mix instead of a third filter pass; a single channel's is exact.
  const sourceTp =
    which === 'mix' ? tp.truePeakDbtp : ampToDb(tp.perChannelLinear[which === 'right' ? 1 : 0]);
  progress();
  const loudness = measureLoudness(channels, sampleRate);
  progress();
  const frames = computeFrameStats(source, sampleRate, { frameS });
  const peak = peakEnvelopeFrames(source, sampleRate, { attackS, releaseS, frameS });
  const rms = rmsEnvelope(frames, { windowS: rmsWindowS });
  progress();
  const histogram = magnitudeHistogram(source);
  progress();
  const welch = welchPsd(source, sampleRate, { size: opts.fftSize ?? 4096 });
  progress();
  // Two FFT frames per column are plenty for a display and keep five minutes fast.
  const spectrogram = displaySpectrogram(source, sampleRate, { maxFramesPerColumn: 2 });
  progress();
  // A 20 ms hop follows melodic pitch (notes last ≥ ~50 ms) at half the cost of 10 ms.
  const pitch = yinPitchTrack(source, sampleRate, { hopS: 0.02, maxHz: Math.min(2000, sampleRate / 4) });
  progress();

  return {
    sampleRate,
    channels: channels.length,
    sampleCount: channels[0].length,
    durationS: clipDurationS(clip),
    modulationChannel: which,
    level: {
      ...levels.overall,
      truePeakDbtp: tp.truePeakDbtp,
      perChannel: levels.perChannel.map((l, i) => ({ ...l, truePeakDbtp: ampToDb(tp.perChannelLinear[i]) })),
      modulation: { ...sourceLevels, truePeakDbtp: sourceTp },
    },
    loudness,
    frames,
    envelope: { attackS, releaseS, rmsWindowS, peak, rms },
    histogram,
    spectrum: {
      welch,
      centroidHz: spectralCentroidHz(welch),
      rolloff95Hz: rolloffHz(welch, 0.95),
      dominantHz: dominantHz(welch),
      bands: bandEnergyFractions(welch, opts.bands ?? DEFAULT_BANDS),
      spectrogram,
      pitch,
    },
  };
}
