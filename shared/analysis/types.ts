/**
 * The types of the clip analysis: its options and settings, its result, and the figures of its two
 * parts. Here, apart from analyze-clip.ts (which runs the tasks) and tasks.ts (which computes each
 * part), so that both import these and analyze-clip.ts imports tasks.ts, never the other way.
 */
import type { ModulationChannel } from '../audio/clip.ts';
import type { FrameStats } from '../dsp/frame-stats.ts';
import type { MagnitudeHistogram } from '../dsp/histogram.ts';
import type { ChannelLevels } from '../dsp/level.ts';
import type { LoudnessReport } from '../dsp/loudness.ts';
import type { PitchTrack } from '../dsp/pitch.ts';
import type { BandFraction, FrequencyBand } from '../dsp/spectral-features.ts';
import type { DisplaySpectrogram } from '../dsp/spectrogram.ts';
import type { WelchSpectrum } from '../dsp/welch.ts';

/** A clip as known before its samples: its length, channels and rate. */
export interface ClipShape {
  /** Samples per channel. */
  sampleCount: number;
  channelCount: number;
  /** Hz. */
  sampleRate: number;
}

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
  /** True peak, dBTP (ITU-R BS.1770-4 Annex 2), measured on the signal these figures describe (the mix itself for a mixed source). */
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

/** The options of {@link analyzeClip} with every default filled in and checked against the clip. */
export interface AnalyzeSettings {
  channel: ModulationChannel;
  /** Frame grid of the statistics, s. */
  frameS: number;
  /** Peak follower time constants, s. */
  attackS: number;
  releaseS: number;
  /** RMS envelope window, s. */
  rmsWindowS: number;
  /** Welch FFT size, samples. */
  fftSize: number;
  bands: readonly FrequencyBand[];
}

/** Figures of the channel part: everything in ClipAnalysis but the spectrum. */
export type ChannelFigures = Pick<ClipAnalysis, 'level' | 'loudness' | 'frames' | 'envelope' | 'histogram'>;

/** Figures of the spectrum part: the spectrum of the modulation source. */
export type SpectrumFigures = ClipAnalysis['spectrum'];
