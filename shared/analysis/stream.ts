/**
 * The clip analysis of shared/analysis block by block, for a clip whose length is known in advance
 * and whose samples arrive in pieces (a file being decoded), so that the clip is never held whole:
 * each measurement carries its state from block to block (the streams of shared/dsp), and the
 * figures equal analyzeClip's on the whole clip exactly, whatever the block lengths.
 *
 * Two parts, as analyzeClip has: the channel part (levels, true peak and loudness of every channel,
 * and the modulation source's levels, true peak, frame statistics, envelopes and histogram), fed
 * the channels and the source; and the spectrum part (Welch's spectrum with its features, the
 * display spectrogram and the pitch track), fed the source alone, so it can run on another thread
 * (server/analysis/analyze-stream.ts).
 */
import { rmsEnvelope, SourceStatsStream } from '../dsp/envelope.ts';
import { LevelsStream } from '../dsp/level.ts';
import { LoudnessStream } from '../dsp/loudness.ts';
import { PitchStream } from '../dsp/pitch.ts';
import { WelchSpectrogramStream } from '../dsp/spectrogram.ts';
import { TruePeakMeter, truePeakReport } from '../dsp/true-peak.ts';
import { type SourceTaskSettings, channelFigures, pitchOptions, spectrogramOptions, spectrumFigures } from './tasks.ts';
import type { AnalyzeSettings, ChannelFigures, ClipShape, SpectrumFigures } from './types.ts';

/**
 * The channel part, block by block: `add(channels, len, source)` with the next `len` samples of every
 * channel and of the modulation source (modulationSource's samples for them), then `result()`.
 * The source's own levels are measured unless it is a mono clip's only channel (analyzeClip's rule).
 *
 * @example const p = new ChannelPartStream(shape, s); p.add([l, r], n, mix); p.result().loudness.integratedLufs
 */
export class ChannelPartStream {
  private readonly levels: LevelsStream;
  private readonly truePeaks: TruePeakMeter[];
  private readonly loudness: LoudnessStream;
  private readonly sourceLevels: LevelsStream | null;
  private readonly sourcePeak: TruePeakMeter | null;
  private readonly frames: SourceStatsStream;
  private readonly one: Float32Array[] = [new Float32Array(0)];

  constructor(
    private readonly shape: ClipShape,
    private readonly s: AnalyzeSettings,
  ) {
    const { sampleCount: n, channelCount, sampleRate } = shape;
    this.levels = new LevelsStream(channelCount, n, { sampleRate });
    this.truePeaks = Array.from({ length: channelCount }, () => new TruePeakMeter());
    this.loudness = new LoudnessStream(channelCount, n, sampleRate);
    const separate = channelCount > 1;
    this.sourceLevels = separate ? new LevelsStream(1, n, { sampleRate }) : null;
    this.sourcePeak = separate ? new TruePeakMeter() : null;
    this.frames = new SourceStatsStream(n, sampleRate, { attackS: s.attackS, releaseS: s.releaseS, frameS: s.frameS });
  }

  /** Adds the next `len` samples of every channel (channels[c][0…len)) and of the source (source[0…len)). */
  add(channels: Float32Array[], len: number, source: Float32Array): void {
    this.levels.add(channels, len);
    for (let c = 0; c < channels.length; c++) this.truePeaks[c].add(len === channels[c].length ? channels[c] : channels[c].subarray(0, len));
    this.loudness.add(channels, len);
    const src = len === source.length ? source : source.subarray(0, len);
    if (this.sourceLevels !== null) {
      this.one[0] = src;
      this.sourceLevels.add(this.one, len);
      this.sourcePeak!.add(src);
    }
    this.frames.add(src, len);
  }

  /** The channel part's figures; RangeError before every sample has arrived, or for NaN/±∞ samples. */
  result(): ChannelFigures {
    const levels = this.levels.result();
    const tp = truePeakReport(this.truePeaks.map((m) => m.value()));
    const loudness = this.loudness.result();
    const sourceLevels = this.sourceLevels === null ? undefined : { ...this.sourceLevels.result().overall, truePeakLinear: this.sourcePeak!.value() };
    const { frames, peak, histogram } = this.frames.result();
    const rms = rmsEnvelope(frames, { windowS: this.s.rmsWindowS });
    return channelFigures(this.s, levels, tp, loudness, sourceLevels, { frames, peak, rms, histogram });
  }
}

/**
 * The spectrum part, block by block: `add` the modulation source's next samples, then `result()`
 * (WelchSpectrogramStream and PitchStream; the features as analyzeClip reads them). Needs only
 * plain data, so it can be built in a worker thread.
 *
 * @example const p = new SpectrumPartStream(n, 44100, settings); p.add(mix); p.result().pitch.medianHz
 */
export class SpectrumPartStream {
  private readonly spectrum: WelchSpectrogramStream;
  private readonly pitch: PitchStream;

  constructor(
    sampleCount: number,
    sampleRate: number,
    private readonly s: SourceTaskSettings,
  ) {
    this.spectrum = new WelchSpectrogramStream(sampleCount, sampleRate, spectrogramOptions(s));
    this.pitch = new PitchStream(sampleCount, sampleRate, pitchOptions(sampleRate));
  }

  /** Adds the source's next `len` samples (x[0…len)). */
  add(x: Float32Array, len = x.length): void {
    this.spectrum.add(x, len);
    this.pitch.add(x, len);
  }

  /** The spectrum part's figures; RangeError before every sample has arrived. */
  result(): SpectrumFigures {
    const { welch, spectrogram } = this.spectrum.result();
    return { ...spectrumFigures(welch, spectrogram, this.s.bands), pitch: this.pitch.result() };
  }
}
