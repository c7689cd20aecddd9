// The analysis cut into tasks (shared/analysis/tasks.ts) and the two parts built on them
// (analyzeChannelPart, analyzeSpectrumPart): together they are analyzeClip, and each task measures
// what its module does.
import { describe, expect, it } from 'vitest';
import {
  analyzeChannelPart,
  analyzeClip,
  analyzeSpectrumPart,
  combineAnalysis,
  resolveAnalyzeSettings,
  shapeOf,
} from '../../../shared/analysis/analyze-clip.ts';
import { channelFigures, runChannelTask, runSourceTask, sourceIsTheClip } from '../../../shared/analysis/tasks.ts';
import { modulationSource } from '../../../shared/audio/clip.ts';

const FS = 48000;
const tone = (hz: number, amp: number, seconds: number) =>
  Float32Array.from({ length: Math.round(FS * seconds) }, (_, i) => amp * Math.sin((2 * Math.PI * hz * i) / FS));
const clip = { sampleRate: FS, channels: [tone(440, 0.5, 2), tone(660, 0.25, 2)] };

describe('parts and tasks compose to analyzeClip', () => {
  it('channel part + spectrum part = analyzeClip, exactly (the same calls in another order)', () => {
    for (const channel of ['mix', 'left', 'right'] as const) {
      const s = resolveAnalyzeSettings(clip, { channel });
      const src = modulationSource(clip, channel);
      const whole = combineAnalysis(shapeOf(clip), s, analyzeChannelPart(clip, src, s), analyzeSpectrumPart(src, FS, s));
      expect(whole).toEqual(analyzeClip(clip, { channel }));
    }
  });

  it('channelFigures from task outputs = the channel part', () => {
    const s = resolveAnalyzeSettings(clip);
    const src = modulationSource(clip, 'mix');
    const part = channelFigures(
      s,
      runChannelTask('levels', clip),
      runChannelTask('true peak', clip),
      runChannelTask('loudness', clip),
      runSourceTask('source levels', src, FS, s),
      runSourceTask('frames', src, FS, s),
    );
    expect(part).toEqual(analyzeChannelPart(clip, src, s));
  });

  it('resolveAnalyzeSettings fills the documented defaults and refuses what analyzeClip refuses', () => {
    expect(resolveAnalyzeSettings(clip)).toMatchObject({ channel: 'mix', frameS: 0.001, attackS: 0.001, releaseS: 0.05, rmsWindowS: 0.01, fftSize: 4096 });
    expect(() => resolveAnalyzeSettings({ sampleRate: FS, channels: [] })).toThrow(/no channels/);
    expect(() => resolveAnalyzeSettings({ sampleRate: FS, channels: [clip.channels[0]] }, { channel: 'right' })).toThrow(/mono/);
  });
});

describe('single tasks', () => {
  const s = resolveAnalyzeSettings(clip);

  it('source levels of a 0.5 FS sine: peak −6.02 dBFS, RMS −9.03 dBFS', () => {
    // A sine's RMS is A/√2, 3.0103 dB below its peak (Harris 1978 [recalled]); 1e-3 dB covers float32 samples.
    const l = runSourceTask('source levels', clip.channels[0], FS, s);
    expect(l.samplePeakDbfs).toBeCloseTo(-6.0206, 3);
    expect(l.rmsDbfs).toBeCloseTo(-9.0309, 3);
  });

  it('frames: 1 ms frames of 48 samples, and envelopes of the same length', () => {
    const f = runSourceTask('frames', clip.channels[0], FS, s);
    expect(f.frames.count).toBe(2000);
    expect(f.peak).toHaveLength(2000);
    expect(f.rms).toHaveLength(2000);
    // mean square of a sine over whole periods (440 Hz: 11 periods in 25 ms) is A²/2 = 0.125
    expect(f.rms[1000]).toBeCloseTo(Math.sqrt(0.125), 2);
  });

  it('spectrum and pitch find the tone', () => {
    const sp = runSourceTask('spectrum', clip.channels[1], FS, s);
    expect(Math.abs(sp.dominantHz! - 660)).toBeLessThan(sp.welch.binHz); // within one bin (11.7 Hz)
    const p = runSourceTask('pitch', clip.channels[1], FS, s);
    expect(Math.abs(p.medianHz! / 660 - 1)).toBeLessThan(0.005); // pitch module's tolerance
  });

  it('sourceIsTheClip: only the very channel array of a mono clip', () => {
    const mono = { sampleRate: FS, channels: [clip.channels[0]] };
    expect(sourceIsTheClip(mono, mono.channels[0])).toBe(true);
    expect(sourceIsTheClip(mono, mono.channels[0].slice())).toBe(false);
    expect(sourceIsTheClip(clip, clip.channels[0])).toBe(false);
  });

  it('unknown tasks are programming errors', () => {
    expect(() => runChannelTask('spectrum' as 'levels', clip)).toThrow(RangeError);
    expect(() => runSourceTask('levels' as 'frames', clip.channels[0], FS, s)).toThrow(RangeError);
  });
});
