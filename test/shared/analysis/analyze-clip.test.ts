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

describe('the modulation source’s true peak', () => {
  // An fs/4 tone at phase π/4 has samples of ±A/√2 while its waveform peaks at A: the standard
  // case where the 4× oversampled true peak reads 3.01 dB above the sample peak (ITU-R BS.1770-4
  // Annex 2; 20·log10(√2) = 3.0103 dB). With the right channel −0.99 times the left, the mix is
  // 0.005 times the left: 46.02 dB below either channel (20·log10(0.005) = −46.02 dB).
  const n = 2 * FS;
  const left = Float32Array.from({ length: n }, (_, i) => 0.9 * Math.sin((Math.PI / 2) * i + Math.PI / 4));
  const right = left.map((v) => -0.99 * v);
  const a = analyzeClip({ sampleRate: FS, channels: [left, right] }, { channel: 'mix' });

  it('is measured on the mix, far below either channel when the channels cancel', () => {
    const channelTp = a.level.perChannel[0].truePeakDbtp;
    // Each channel: 0.9 → −0.915 dBTP; the Annex 2 interpolator's gain at fs/4 reads it 0.08 dB
    // high (measured), so 0.15 dB.
    expect(Math.abs(channelTp - 20 * Math.log10(0.9))).toBeLessThan(0.15);
    // The mix's own true peak: 0.9 × 0.005 → −46.94 dBTP, with the same interpolator error.
    expect(Math.abs(a.level.modulation.truePeakDbtp - 20 * Math.log10(0.9 * 0.005))).toBeLessThan(0.15);
    expect(a.level.modulation.truePeakDbtp).toBeLessThan(channelTp - 40);
    // and not below the mix's sample peak (true peak ≥ sample peak by construction of Annex 2)
    expect(a.level.modulation.truePeakDbtp).toBeGreaterThanOrEqual(a.level.modulation.samplePeakDbfs - 1e-9);
  });

  it('is the channel’s own for a single-channel source', () => {
    const b = analyzeClip({ sampleRate: FS, channels: [left, right] }, { channel: 'right' });
    expect(b.level.modulation.truePeakDbtp).toBeCloseTo(b.level.perChannel[1].truePeakDbtp, 9);
  });
});
