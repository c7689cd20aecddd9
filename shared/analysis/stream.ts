/**
 * The clip analysis of shared/analysis block by block, for a clip whose length is known in advance
 * and whose samples arrive in pieces (a file being decoded), so that the clip is never held whole:
 * each measurement carries its state from block to block (the streams of shared/dsp), and the
 * figures equal analyzeClip's on the whole clip exactly, whatever the block lengths.
 *
 * Two parts: the channel part (levels, true peak and loudness of every channel, and the modulation
 * source's frame statistics, envelopes and histogram), fed the channels and the source; and the
 * source part (the source's own levels and true peak, Welch's spectrum with its features, the
 * display spectrogram and the pitch track), fed the source alone, so it can run on another thread
 * (server/analysis/analyze-stream.ts). The split balances the two threads' work, measured on the
 * 5-minute benchmark clip.
 */
import { rmsEnvelope, SourceStatsStream } from '../dsp/envelope.ts';
import { LevelsStream } from '../dsp/level.ts';
import { LoudnessStream } from '../dsp/loudness.ts';
import { PitchStream } from '../dsp/pitch.ts';
import { WelchSpectrogramStream } from '../dsp/spectrogram.ts';
import { TruePeakMeter, truePeakReport } from '../dsp/true-peak.ts';
import { type SourceTaskSettings, type TaskOutputs, channelFigures, pitchOptions, spectrogramOptions, spectrumFigures } from './tasks.ts';
import type { AnalyzeSettings, ChannelFigures, ClipShape, SpectrumFigures } from './types.ts';

/**
 * The channel part, block by block: `add(channels, len, source)` with the next `len` samples of every
 * channel and of the modulation source (modulationSource's samples for them), then `result(source)`
 * with the source's own levels from the source part (SourcePartStream; none for a mono clip's only
 * channel, analyzeClip's rule). Here: the channels' levels, true peaks and loudness, and the
 * source's frame statistics, envelopes and histogram.
 *
 * @example const p = new ChannelPartStream(shape, s); p.add([l, r], n, mix); p.result(sourcePart.result().levels).loudness
 */
export class ChannelPartStream {
  private readonly levels: LevelsStream;
  private readonly truePeaks: TruePeakMeter[];
  private readonly loudness: LoudnessStream;
  private readonly frames: SourceStatsStream;

  constructor(
    shape: ClipShape,
    private readonly s: AnalyzeSettings,
  ) {
    const { sampleCount: n, channelCount, sampleRate } = shape;
    this.levels = new LevelsStream(channelCount, n, { sampleRate });
    this.truePeaks = Array.from({ length: channelCount }, () => new TruePeakMeter());
    this.loudness = new LoudnessStream(channelCount, n, sampleRate);
    this.frames = new SourceStatsStream(n, sampleRate, { attackS: s.attackS, releaseS: s.releaseS, frameS: s.frameS });
  }

  /** Adds the next `len` samples of every channel (channels[c][0…len)) and of the source (source[0…len)). */
  add(channels: Float32Array[], len: number, source: Float32Array): void {
    this.levels.add(channels, len);
    for (let c = 0; c < channels.length; c++) this.truePeaks[c].add(len === channels[c].length ? channels[c] : channels[c].subarray(0, len));
    this.loudness.add(channels, len);
    this.frames.add(source, len);
  }

  /**
   * The channel part's figures, with the source's levels measured by the source part (undefined
   * when the source is a mono clip's only channel); RangeError before every sample has arrived,
   * or for NaN/±∞ samples.
   */
  result(sourceLevels: SourceLevels | undefined): ChannelFigures {
    const levels = this.levels.result();
    const tp = truePeakReport(this.truePeaks.map((m) => m.value()));
    const loudness = this.loudness.result();
    const { frames, peak, histogram } = this.frames.result();
    const rms = rmsEnvelope(frames, { windowS: this.s.rmsWindowS });
    return channelFigures(this.s, levels, tp, loudness, sourceLevels, { frames, peak, rms, histogram });
  }
}

/** The source's own level figures with its true peak, linear (the 'source levels' task's output). */
export type SourceLevels = TaskOutputs['source levels'];

/** What the source part gives: the source's levels (none for a mono clip's only channel) and the spectrum figures. */
export interface SourcePartFigures {
  levels: SourceLevels | undefined;
  spectrum: SpectrumFigures;
}

/**
 * The source part, block by block: `add` the modulation source's next samples, then `result()`:
 * the source's own levels and true peak (unless `separate` is false: a mono clip's only channel,
 * whose levels are the clip's), Welch's spectrum with its features, the display spectrogram and the
 * pitch track (WelchSpectrogramStream and PitchStream). Needs only plain data, so it can be built
 * in a worker thread.
 *
 * @example const p = new SourcePartStream(n, 44100, settings, true); p.add(mix); p.result().spectrum.pitch.medianHz
 */
export class SourcePartStream {
  private readonly spectrum: WelchSpectrogramStream;
  private readonly pitch: PitchStream;
  private readonly levels: LevelsStream | null;
  private readonly peak: TruePeakMeter | null;
  private readonly one: Float32Array[] = [new Float32Array(0)];

  constructor(
    sampleCount: number,
    sampleRate: number,
    private readonly s: SourceTaskSettings,
    separate: boolean,
  ) {
    this.spectrum = new WelchSpectrogramStream(sampleCount, sampleRate, spectrogramOptions(s));
    this.pitch = new PitchStream(sampleCount, sampleRate, pitchOptions(sampleRate));
    this.levels = separate ? new LevelsStream(1, sampleCount, { sampleRate }) : null;
    this.peak = separate ? new TruePeakMeter() : null;
  }

  /** Adds the source's next `len` samples (x[0…len)). */
  add(x: Float32Array, len = x.length): void {
    const block = len === x.length ? x : x.subarray(0, len);
    if (this.levels !== null) {
      this.one[0] = block;
      this.levels.add(this.one, len);
      this.peak!.add(block);
    }
    this.spectrum.add(block, len);
    this.pitch.add(block, len);
  }

  /** The source part's figures; RangeError before every sample has arrived. */
  result(): SourcePartFigures {
    const { welch, spectrogram } = this.spectrum.result();
    const levels = this.levels === null ? undefined : { ...this.levels.result().overall, truePeakLinear: this.peak!.value() };
    return { levels, spectrum: { ...spectrumFigures(welch, spectrogram, this.s.bands), pitch: this.pitch.result() } };
  }
}
