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
 *
 * How it is built: independent tasks (tasks.ts), grouped into a channel part (levels, true peak,
 * loudness, and the source's frame statistics, envelopes and histogram) and a spectrum part (Welch
 * spectrum, spectrogram, pitch), which analyzeClip runs in order on one thread. On the server,
 * server/analysis/analyze-parallel.ts runs the same tasks on two threads for the same result.
 */
import { type AudioClip, type ModulationChannel, clipDurationS, modulationSource } from '../audio/clip.ts';
import type { FrameStats } from '../dsp/frame-stats.ts';
import type { MagnitudeHistogram } from '../dsp/histogram.ts';
import type { ChannelLevels } from '../dsp/level.ts';
import type { LoudnessReport } from '../dsp/loudness.ts';
import type { PitchTrack } from '../dsp/pitch.ts';
import { type BandFraction, DEFAULT_BANDS, type FrequencyBand } from '../dsp/spectral-features.ts';
import type { DisplaySpectrogram } from '../dsp/spectrogram.ts';
import type { WelchSpectrum } from '../dsp/welch.ts';
import { channelFigures, runChannelTask, runSourceTask, sourceIsTheClip } from './tasks.ts';

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

/** Stages of the channel part, in the order analyzeClip runs them. */
export const CHANNEL_STAGES = ['levels', 'true peak', 'loudness', 'frames'] as const;
/** Stages of the spectrum part, in the order analyzeClip runs them (after the channel part). */
export const SPECTRUM_STAGES = ['spectrum', 'pitch'] as const;
const STAGES = [...CHANNEL_STAGES, ...SPECTRUM_STAGES] as const;

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

/**
 * Fills in the defaults of `opts` and checks them against the clip. Throws RangeError for a clip
 * with no channels or no samples, or channel 'right' of a mono clip.
 *
 * @example resolveAnalyzeSettings(clip).frameS // 0.001
 */
export function resolveAnalyzeSettings(clip: AudioClip, opts: AnalyzeOptions = {}): AnalyzeSettings {
  const { channels } = clip;
  if (channels.length === 0) throw new RangeError('analyzeClip: clip has no channels');
  if (channels[0].length === 0) throw new RangeError('analyzeClip: clip has no samples');
  const channel = opts.channel ?? 'mix';
  if (channel === 'right' && channels.length < 2) {
    throw new RangeError('analyzeClip: channel "right" asked of a mono clip');
  }
  return {
    channel,
    frameS: opts.frameS ?? 0.001,
    attackS: opts.attackS ?? 0.001,
    releaseS: opts.releaseS ?? 0.05,
    rmsWindowS: opts.rmsWindowS ?? 0.01,
    fftSize: opts.fftSize ?? 4096,
    bands: opts.bands ?? DEFAULT_BANDS,
  };
}

/**
 * The channel part of the analysis: levels (all channels, each channel, the modulation source),
 * true peak, BS.1770 loudness, and the source's frame statistics, envelopes and magnitude histogram
 * (tasks.ts: levels, true peak, source levels, loudness, frames with the histogram). Pure; `onStage` is
 * called with each stage's name (CHANNEL_STAGES) as it starts.
 *
 * @param source the modulation source, `modulationSource(clip, s.channel)`, or an array holding the
 *   same samples (its level figures are measured unless it is the very array of a mono clip's
 *   channel; equal samples give equal figures either way)
 * @example analyzeChannelPart(clip, modulationSource(clip, 'mix'), resolveAnalyzeSettings(clip)).loudness.integratedLufs
 */
export function analyzeChannelPart(
  clip: AudioClip,
  source: Float32Array,
  s: AnalyzeSettings,
  onStage?: (stage: (typeof CHANNEL_STAGES)[number]) => void,
): ChannelFigures {
  const { sampleRate } = clip;
  onStage?.('levels');
  const levels = runChannelTask('levels', clip);
  onStage?.('true peak');
  const tp = runChannelTask('true peak', clip);
  const sourceLevels = sourceIsTheClip(clip, source) ? undefined : runSourceTask('source levels', source, sampleRate, s);
  onStage?.('loudness');
  const loudness = runChannelTask('loudness', clip);
  onStage?.('frames');
  const frames = runSourceTask('frames', source, sampleRate, s);
  return channelFigures(s, levels, tp, loudness, sourceLevels, frames);
}

/**
 * The spectrum part of the analysis: Welch PSD of the modulation source with its centroid, 95 %
 * roll-off, dominant frequency and band fractions, the display spectrogram and the YIN pitch track
 * (tasks.ts: spectrum, pitch). Pure and independent of the channel part; `onStage` is
 * called with each stage's name (SPECTRUM_STAGES) as it starts.
 *
 * @example analyzeSpectrumPart(source, 44100, resolveAnalyzeSettings(clip)).dominantHz
 */
export function analyzeSpectrumPart(
  source: Float32Array,
  sampleRate: number,
  s: Omit<AnalyzeSettings, 'channel'>,
  onStage?: (stage: (typeof SPECTRUM_STAGES)[number]) => void,
): SpectrumFigures {
  onStage?.('spectrum');
  const spectrum = runSourceTask('spectrum', source, sampleRate, s);
  onStage?.('pitch');
  const pitch = runSourceTask('pitch', source, sampleRate, s);
  return { ...spectrum, pitch };
}

/**
 * Puts the two parts together into a ClipAnalysis (the object analyzeClip returns).
 * @example combineAnalysis(clip, s, analyzeChannelPart(clip, src, s), analyzeSpectrumPart(src, fs, s))
 */
export function combineAnalysis(clip: AudioClip, s: AnalyzeSettings, part: ChannelFigures, spectrum: SpectrumFigures): ClipAnalysis {
  return {
    sampleRate: clip.sampleRate,
    channels: clip.channels.length,
    sampleCount: clip.channels[0].length,
    durationS: clipDurationS(clip),
    modulationChannel: s.channel,
    level: part.level,
    loudness: part.loudness,
    frames: part.frames,
    envelope: part.envelope,
    histogram: part.histogram,
    spectrum,
  };
}

/**
 * Analyses a clip (module comment): {@link analyzeChannelPart} then {@link analyzeSpectrumPart} on
 * the modulation source, in this thread. Throws RangeError for a clip with no channels or no
 * samples (the decoder rejects those with an InputError before this is reached), or channel
 * 'right' of a mono clip. `onProgress` gets (k/6, name of stage k) as each of the six stages
 * starts, then (1, 'done').
 *
 * @example analyzeClip(synthDemoClip('harbour-lights')).loudness.integratedLufs // ≈ −16 LUFS
 */
export function analyzeClip(clip: AudioClip, opts: AnalyzeOptions = {}): ClipAnalysis {
  const s = resolveAnalyzeSettings(clip, opts);
  let stage = 0;
  const progress = () => opts.onProgress?.(stage / STAGES.length, STAGES[stage++] ?? 'done');
  const source = modulationSource(clip, s.channel);
  const part = analyzeChannelPart(clip, source, s, progress);
  const spectrum = analyzeSpectrumPart(source, clip.sampleRate, s, progress);
  progress();
  return combineAnalysis(clip, s, part, spectrum);
}
