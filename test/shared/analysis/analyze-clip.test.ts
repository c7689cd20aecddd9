import { describe, expect, it } from 'vitest';
import { analyzeClip } from '../../../shared/analysis/analyze-clip.ts';
import { summarizeAnalysis } from '../../../shared/analysis/summary.ts';

const FS = 48000;
const tone = (hz: number, amp: number, seconds: number, phase = 0) =>
  Float32Array.from({ length: Math.round(FS * seconds) }, (_, i) => amp * Math.sin((2 * Math.PI * hz * i) / FS + phase));

describe('analyzeClip', () => {
  // Stereo 997 Hz at −23 dBFS peak per channel, 5 s: BS.1770-4 calibration gives −23.0 LUFS
  // (the −0.691 offset cancels the K-weighting gain at 997 Hz; ITU-R BS.1770-4 §2.1 and Annex 1).
  const amp = Math.pow(10, -23 / 20);
  const clip = { sampleRate: FS, channels: [tone(997, amp, 5), tone(997, amp, 5)] };
  const a = analyzeClip(clip);
  const s = summarizeAnalysis(a);

  it('reports the calibrated loudness and the sine levels', () => {
    expect(s.loudness.integratedLufs!).toBeCloseTo(-23, 1);
    // A sine's RMS is A/√2, i.e. 3.0103 dB below its peak (crest factor √2; Harris 1978 [recalled]).
    expect(s.level.rmsDbfs!).toBeCloseTo(-23 - 3.0103, 2);
    expect(s.level.crestDb!).toBeCloseTo(3.0103, 2);
    expect(s.level.samplePeakDbfs!).toBeCloseTo(-23, 2);
    // True peak ≥ sample peak, and within the 4× under-read bound of 0.69 dB (BS.1770-4 Annex 2).
    expect(s.level.truePeakDbtp!).toBeGreaterThanOrEqual(s.level.samplePeakDbfs! - 1e-9);
    expect(s.level.truePeakDbtp!).toBeLessThan(s.level.samplePeakDbfs! + 0.7);
  });

  it('finds the tone in the spectrum and the pitch track', () => {
    expect(s.spectrum.dominantHz!).toBeCloseTo(997, 0);
    expect(s.spectrum.pitchMedianHz!).toBeGreaterThan(997 * 0.995);
    expect(s.spectrum.pitchMedianHz!).toBeLessThan(997 * 1.005);
    const mid = s.spectrum.bands.find((b) => b.lowHz <= 997 && b.highHz > 997)!;
    expect(mid.fraction).toBeGreaterThan(0.99);
  });

  it('keeps the keys other tools read and serialises to JSON', () => {
    const parsed = JSON.parse(JSON.stringify(s));
    for (const k of ['samplePeakDbfs', 'truePeakDbtp', 'rmsDbfs', 'crestDb', 'dcOffset', 'clippedSamples']) expect(parsed.level).toHaveProperty(k);
    for (const k of ['integratedLufs', 'loudnessRangeLu', 'maxMomentaryLufs', 'maxShortTermLufs']) expect(parsed.loudness).toHaveProperty(k);
    expect(parsed).toMatchObject({ sampleRate: FS, channels: 2, durationS: 5 });
    expect(parsed.spectrum).toHaveProperty('centroidHz');
    expect(parsed.spectrum).toHaveProperty('dominantHz');
  });

  it('gives overall, per-channel and modulation-source figures that agree with their definitions', () => {
    // Left at full amplitude, right silent: overall peak is the left's; overall RMS is over both
    // channels' samples (half the energy: −3.01 dB); the mix is the mean, half the left (−6.02 dB).
    const lopsided = analyzeClip({ sampleRate: FS, channels: [tone(440, 0.5, 2), new Float32Array(2 * FS)] });
    const l = lopsided.level;
    expect(l.samplePeakDbfs).toBeCloseTo(l.perChannel[0].samplePeakDbfs, 9);
    expect(l.rmsDbfs).toBeCloseTo(l.perChannel[0].rmsDbfs - 3.0103, 3);
    expect(l.modulation.samplePeakDbfs).toBeCloseTo(l.perChannel[0].samplePeakDbfs - 6.0206, 3);
    const left = analyzeClip({ sampleRate: FS, channels: [tone(440, 0.5, 2), new Float32Array(2 * FS)] }, { channel: 'left' });
    expect(left.level.modulation.rmsDbfs).toBeCloseTo(left.level.perChannel[0].rmsDbfs, 9);
  });

  it('refuses a clip without samples and a right channel of a mono clip', () => {
    expect(() => analyzeClip({ sampleRate: FS, channels: [new Float32Array(0)] })).toThrow(/no samples/);
    expect(() => analyzeClip({ sampleRate: FS, channels: [tone(440, 0.5, 1)] }, { channel: 'right' })).toThrow(/mono/);
  });
});
