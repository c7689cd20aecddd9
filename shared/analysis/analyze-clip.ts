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
 * spectrum, spectrogram, pitch), which analyzeClip runs in order on one thread. On the server, a
 * file is analysed block by block as it is decoded, on two threads (stream.ts,
 * server/analysis/analyze-stream.ts), for the same result bit for bit.
 */
import { type AudioClip, modulationSource } from '../audio/clip.ts';
import { DEFAULT_BANDS } from '../dsp/spectral-features.ts';
import { channelFigures, runChannelTask, runSourceTask, sourceIsTheClip } from './tasks.ts';
import type { AnalyzeOptions, AnalyzeSettings, ChannelFigures, ClipAnalysis, ClipShape, SpectrumFigures } from './types.ts';

export type { AnalyzeOptions, AnalyzeSettings, ChannelFigures, ClipAnalysis, ClipShape, LevelFigures, SpectrumFigures } from './types.ts';

/** Stages of the channel part, in the order analyzeClip runs them. */
export const CHANNEL_STAGES = ['levels', 'true peak', 'loudness', 'frames'] as const;
/** Stages of the spectrum part, in the order analyzeClip runs them (after the channel part). */
export const SPECTRUM_STAGES = ['spectrum', 'pitch'] as const;
const STAGES = [...CHANNEL_STAGES, ...SPECTRUM_STAGES] as const;

/**
 * Fills in the defaults of `opts` and checks them against the clip. Throws RangeError for a clip
 * with no channels or no samples, or channel 'right' of a mono clip.
 *
 * @example resolveAnalyzeSettings(clip).frameS // 0.001
 */
export function resolveAnalyzeSettings(clip: AudioClip, opts: AnalyzeOptions = {}): AnalyzeSettings {
  return settingsForShape(shapeOf(clip), opts);
}

/** The shape of a clip (its length, channels and rate). @example shapeOf(clip).sampleCount */
export const shapeOf = (clip: AudioClip): ClipShape => ({
  sampleCount: clip.channels.length === 0 ? 0 : clip.channels[0].length,
  channelCount: clip.channels.length,
  sampleRate: clip.sampleRate,
});

/**
 * {@link resolveAnalyzeSettings} for a clip known by its shape (a file about to be decoded block by
 * block): the same defaults and the same RangeErrors.
 *
 * @example settingsForShape({ sampleCount: 44100, channelCount: 2, sampleRate: 44100 }).fftSize // 4096
 */
export function settingsForShape(shape: ClipShape, opts: AnalyzeOptions = {}): AnalyzeSettings {
  if (shape.channelCount === 0) throw new RangeError('analyzeClip: clip has no channels');
  if (shape.sampleCount === 0) throw new RangeError('analyzeClip: clip has no samples');
  const channel = opts.channel ?? 'mix';
  if (channel === 'right' && shape.channelCount < 2) {
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
 * Puts the two parts together into a ClipAnalysis (the object analyzeClip returns), for a clip of
 * the given shape.
 * @example combineAnalysis(shapeOf(clip), s, analyzeChannelPart(clip, src, s), analyzeSpectrumPart(src, fs, s))
 */
export function combineAnalysis(shape: ClipShape, s: AnalyzeSettings, part: ChannelFigures, spectrum: SpectrumFigures): ClipAnalysis {
  return {
    sampleRate: shape.sampleRate,
    channels: shape.channelCount,
    sampleCount: shape.sampleCount,
    durationS: shape.sampleCount / shape.sampleRate,
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
  return combineAnalysis(shapeOf(clip), s, part, spectrum);
}
