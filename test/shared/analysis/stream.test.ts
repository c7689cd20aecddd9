// The analysis block by block (shared/analysis/stream.ts and the streams of shared/dsp it is built
// on): for any cut of the clip into blocks, the figures are analyzeClip's on the whole clip,
// exactly. Equality is exact (toEqual on every number and typed array): each stream carries its
// state across block edges and gathers a frame, window or segment cut by an edge before measuring
// it, so every sum runs over the same samples in the same order as in one pass.
import { describe, expect, it } from 'vitest';
import { analyzeClip, settingsForShape, shapeOf, combineAnalysis } from '../../../shared/analysis/analyze-clip.ts';
import { ChannelPartStream, SourcePartStream } from '../../../shared/analysis/stream.ts';
import type { AnalyzeOptions, ClipAnalysis } from '../../../shared/analysis/types.ts';
import { type AudioClip, modulationSource } from '../../../shared/audio/clip.ts';
import { synthLongDemo } from '../../../shared/demo/clips.ts';
import { LevelsStream, measureLevels } from '../../../shared/dsp/level.ts';
import { LoudnessStream, measureLoudness } from '../../../shared/dsp/loudness.ts';
import { SourceStatsStream, sourceStatsPass } from '../../../shared/dsp/envelope.ts';
import { PitchStream, yinPitchTrack } from '../../../shared/dsp/pitch.ts';
import { WelchSpectrogramStream, welchSpectrogram } from '../../../shared/dsp/spectrogram.ts';
import { TruePeakMeter, channelTruePeakLinear } from '../../../shared/dsp/true-peak.ts';

/** The clip's analysis fed in blocks of the given lengths (repeated to the end). */
function streamed(clip: AudioClip, blocks: number[], opts: AnalyzeOptions = {}): ClipAnalysis {
  const shape = shapeOf(clip);
  const s = settingsForShape(shape, opts);
  const source = modulationSource(clip, s.channel);
  const channel = new ChannelPartStream(shape, s);
  const sourcePart = new SourcePartStream(shape.sampleCount, clip.sampleRate, s, shape.channelCount > 1);
  for (let at = 0, k = 0; at < shape.sampleCount; k++) {
    const len = Math.min(blocks[k % blocks.length], shape.sampleCount - at);
    // each block in arrays of its own, as a decoder hands them over
    const chs = clip.channels.map((c) => c.slice(at, at + len));
    const src = source.slice(at, at + len);
    channel.add(chs, len, src);
    sourcePart.add(src);
    at += len;
  }
  const { levels, spectrum } = sourcePart.result();
  return combineAnalysis(shape, s, channel.result(levels), spectrum);
}

const FS = 44100;

describe('the analysis block by block equals analyzeClip exactly', () => {
  // 100 s of the demo music: long enough for the spectrogram to be read off Welch's own segments
  const long = synthLongDemo(100, FS);
  it('100 s stereo, mix, blocks of 2^18 (the decoder’s) and of awkward lengths', () => {
    const whole = analyzeClip(long);
    expect(streamed(long, [1 << 18])).toEqual(whole);
    expect(streamed(long, [100_003, 7, 44_101, 1])).toEqual(whole);
  });

  // 6 s: the spectrogram has frames of its own (the source is kept whole for it), every option
  const short: AudioClip = { sampleRate: FS, channels: synthLongDemo(6, FS).channels };
  for (const opts of [{ channel: 'left' }, { channel: 'right', frameS: 0.002 }, { channel: 'mix', fftSize: 1024 }] as const) {
    it(`6 s stereo, ${JSON.stringify(opts)}, blocks of 4410 and 333`, () => {
      expect(streamed(short, [4410, 333], opts)).toEqual(analyzeClip(short, opts));
    });
  }

  it('mono: the source is the clip, so its levels are the clip’s', () => {
    const mono: AudioClip = { sampleRate: 48000, channels: [synthLongDemo(5, 48000).channels[0]] };
    expect(streamed(mono, [65_536, 1000])).toEqual(analyzeClip(mono));
  });
});

describe('each stream equals its whole-signal measurement for any split', () => {
  // A signal with clipped runs across block edges, digital silence and a loud burst.
  const n = 3 * FS + 17;
  const x = Float32Array.from({ length: n }, (_, i) => (i > FS && i < FS + 2000 ? 0 : 0.5 * Math.sin(i * 0.031) + 0.2 * Math.sin(i * 0.77)));
  for (let i = 2 * FS - 5; i < 2 * FS + 5; i++) x[i] = 1;
  const y = x.map((v, i) => (i % 3 === 0 ? -v : 0.5 * v));
  const cuts = [[1], [44], [2 * FS - 2, 3], [4096, 4097, 13]];
  const feed = (len: number[], add: (from: number, to: number) => void) => {
    for (let at = 0, k = 0; at < n; k++) {
      const to = Math.min(n, at + len[k % len.length]);
      add(at, to);
      at = to;
    }
  };
  for (const cut of cuts) {
    it(`blocks of ${cut.join(', ')}`, () => {
      const levels = new LevelsStream(2, n, { sampleRate: FS });
      const loud = new LoudnessStream(2, n, FS);
      const stats = new SourceStatsStream(n, FS, { attackS: 0.001, releaseS: 0.05 });
      const tp = new TruePeakMeter();
      feed(cut, (a, b) => {
        levels.add([x.slice(a, b), y.slice(a, b)], b - a);
        loud.add([x.slice(a, b), y.slice(a, b)], b - a);
        stats.add(x.slice(a, b));
        tp.add(y.slice(a, b));
      });
      expect(levels.result()).toEqual(measureLevels([x, y], { sampleRate: FS }));
      expect(loud.result()).toEqual(measureLoudness([x, y], FS));
      expect(stats.result()).toEqual(sourceStatsPass(x, FS, { attackS: 0.001, releaseS: 0.05 }));
      expect(tp.value()).toBe(channelTruePeakLinear(y));
    });
  }

  it('the spectrogram and the pitch track, split anywhere, over a clip long enough to share FFTs', () => {
    const src = modulationSource(synthLongDemo(95, FS), 'mix');
    const wantSpec = welchSpectrogram(src, FS);
    const wantPitch = yinPitchTrack(src, FS, { hopS: 0.02, maxHz: 1000 });
    for (const len of [262_144, 77_777, 3000]) {
      const spec = new WelchSpectrogramStream(src.length, FS);
      const pitch = new PitchStream(src.length, FS, { hopS: 0.02, maxHz: 1000 });
      for (let at = 0; at < src.length; at += len) {
        const part = src.slice(at, Math.min(src.length, at + len));
        spec.add(part);
        pitch.add(part);
      }
      expect(spec.result()).toEqual(wantSpec);
      expect(pitch.result()).toEqual(wantPitch);
    }
  });

  it('asks for every announced sample before it answers, and refuses more', () => {
    const levels = new LevelsStream(1, 10, { sampleRate: FS });
    levels.add([new Float32Array(4)], 4);
    expect(() => levels.result()).toThrow(/4 of 10 samples/);
    expect(() => levels.add([new Float32Array(7)], 7)).toThrow(/more than the 10 samples/);
    expect(() => new PitchStream(10, FS).result()).toThrow(/0 of 10 samples/);
    expect(() => new WelchSpectrogramStream(10, FS).result()).toThrow(/0 of 10 samples/);
  });
});
