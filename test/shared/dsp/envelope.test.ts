import { describe, expect, it } from 'vitest';
import { createPeakFollower, onePoleCoefficient, peakEnvelopeFrames, sourceStatsPass } from '../../../shared/dsp/envelope.ts';
import { computeFrameStats, frameCount, frameStart } from '../../../shared/dsp/frame-stats.ts';
import { magnitudeHistogram } from '../../../shared/dsp/histogram.ts';
import { uniformNoise } from './uniform-noise.ts';

const FS = 48000;

// Reference: the RC step response v(t) = 1 − e^(−t/τ) (charging) and e^(−t/τ) (discharge), the
// textbook first-order result (e.g. Horowitz & Hill, The Art of Electronics, §1.4 [recalled]). The
// follower is its impulse-invariant sampling, so it matches at every sample instant t = m/fs;
// tolerance 1e-12 covers float64 rounding accumulated over ≤ 10⁴ recursive steps.

describe('createPeakFollower: step responses', () => {
  it('rises as 1 − e^(−t/τa) on an attack step', () => {
    const tauS = 0.001;
    const f = createPeakFollower({ attackS: tauS, releaseS: 0.1, sampleRate: FS });
    let worst = 0;
    for (let m = 1; m <= 10 * 48; m++) {
      const y = f.next(1);
      worst = Math.max(worst, Math.abs(y - (1 - Math.exp(-m / FS / tauS))));
    }
    expect(worst).toBeLessThan(1e-12);
    // After one τ: 1 − 1/e = 0.6321 (definition of the time constant).
    f.reset();
    for (let m = 0; m < 48; m++) f.next(1);
    expect(f.value).toBeCloseTo(1 - Math.exp(-1), 12);
  });

  it('falls as e^(−t/τr) on a release step, independent of the attack', () => {
    const tauS = 0.05;
    const f = createPeakFollower({ attackS: 0.0001, releaseS: tauS, sampleRate: FS });
    f.reset(1);
    let worst = 0;
    for (let m = 1; m <= 10000; m++) {
      const y = f.next(0);
      worst = Math.max(worst, Math.abs(y - Math.exp(-m / FS / tauS)));
    }
    expect(worst).toBeLessThan(1e-12);
  });

  it('has a 10→90 % rise time of τ·ln 9', () => {
    // ln 9 ≈ 2.1972: from 1 − e^(−t/τ) = 0.1 and 0.9. ±1 sample for the sampling of the crossings.
    const tauS = 0.002;
    const f = createPeakFollower({ attackS: tauS, releaseS: 1, sampleRate: FS });
    let t10 = -1;
    let t90 = -1;
    for (let m = 1; t90 < 0; m++) {
      const y = f.next(1);
      if (t10 < 0 && y >= 0.1) t10 = m;
      if (y >= 0.9) t90 = m;
    }
    expect(Math.abs(t90 - t10 - tauS * Math.log(9) * FS)).toBeLessThanOrEqual(1);
  });

  it('follows |x|: a negative step gives the same envelope as a positive one', () => {
    const a = createPeakFollower({ attackS: 0.001, releaseS: 0.01, sampleRate: FS });
    const b = createPeakFollower({ attackS: 0.001, releaseS: 0.01, sampleRate: FS });
    for (let m = 0; m < 200; m++) expect(a.next(-0.5)).toBeCloseTo(b.next(0.5), 15);
    expect(a.value).toBeCloseTo(0.5 * (1 - Math.exp(-200 / 48)), 12);
  });

  it('treats τ = 0 as instant and τr = ∞ as hold', () => {
    expect(onePoleCoefficient(0, FS)).toBe(1);
    expect(onePoleCoefficient(Infinity, FS)).toBe(0);
    const f = createPeakFollower({ attackS: 0, releaseS: Infinity, sampleRate: FS });
    expect(f.next(0.7)).toBeCloseTo(0.7, 15);
    expect(f.next(0.1)).toBeCloseTo(0.7, 15);
    expect(f.next(-0.9)).toBeCloseTo(0.9, 15);
  });

  it('validates its options', () => {
    expect(() => createPeakFollower({ attackS: -1, releaseS: 1, sampleRate: FS })).toThrow(/attackS/);
    expect(() => createPeakFollower({ attackS: 0, releaseS: NaN, sampleRate: FS })).toThrow(/releaseS/);
    expect(() => createPeakFollower({ attackS: 0, releaseS: 1, sampleRate: 0 })).toThrow(/sampleRate/);
  });
});

describe('peakEnvelopeFrames', () => {
  /** 1 s of a 220 Hz tone gated on and off every 100 ms, at 44.1 kHz. */
  function gatedTone(fs: number): Float32Array {
    const x = new Float32Array(fs);
    for (let i = 0; i < fs; i++) {
      const on = Math.floor(i / (0.1 * fs)) % 2 === 0;
      x[i] = on ? 0.8 * Math.sin((2 * Math.PI * 220 * i) / fs) : 0;
    }
    return x;
  }

  it('is the follower’s maximum within each frame (44.1 samples per frame)', () => {
    const fs = 44100;
    const x = gatedTone(fs);
    const opts = { attackS: 0.0005, releaseS: 0.02 };
    const env = peakEnvelopeFrames(x, fs, opts);
    expect(env.length).toBe(1000);
    const f = createPeakFollower({ ...opts, sampleRate: fs });
    let worst = 0;
    for (let k = 0; k < env.length; k++) {
      let m = 0;
      for (let i = frameStart(k, 44.1); i < (k === 999 ? fs : frameStart(k + 1, 44.1)); i++) m = Math.max(m, f.next(x[i]));
      worst = Math.max(worst, Math.abs(env[k] - m));
    }
    // Same recursion in the same order: identical up to rounding.
    expect(worst).toBeLessThan(1e-15);
    // During a gap the envelope decays as e^(−t/τr) from its last value (release only).
    const k0 = 110; // 10 ms into the first gap (gap starts at frame 100)
    expect(env[k0 + 20] / env[k0]).toBeCloseTo(Math.exp(-0.02 / 0.02), 2);
  });

  it('scales with gain: the envelope of g·x is g times the envelope of x', () => {
    const fs = 44100;
    const x = gatedTone(fs);
    const y = x.map((v) => 0.5 * v); // exact in float32 (power of two)
    const ex = peakEnvelopeFrames(x, fs, { attackS: 0.001, releaseS: 0.05 });
    const ey = peakEnvelopeFrames(y, fs, { attackS: 0.001, releaseS: 0.05 });
    let worst = 0;
    for (let k = 0; k < ex.length; k++) worst = Math.max(worst, Math.abs(ey[k] - 0.5 * ex[k]));
    expect(worst).toBeLessThan(1e-15);
  });

  it('uses the frame layout of frame-stats, with a shorter tail frame', () => {
    const x = new Float32Array(100).fill(1);
    const env = peakEnvelopeFrames(x, FS, { attackS: 0.001, releaseS: 0.01, frameS: 0.001 });
    expect(env.length).toBe(frameCount(100, 48));
    // Frame maxima are the follower at each frame's last sample: 1 − e^(−m/48) at m = 48, 96, 100.
    [48, 96, 100].forEach((m, k) => expect(env[k]).toBeCloseTo(1 - Math.exp(-m / 48), 12));
  });

  it('writes into a caller buffer', () => {
    const out = new Float64Array(8);
    const env = peakEnvelopeFrames(new Float32Array(100).fill(0.5), FS, { attackS: 0, releaseS: 0.01, out });
    expect(env.buffer).toBe(out.buffer);
    expect(out[2]).toBeCloseTo(0.5, 15);
    expect(() => peakEnvelopeFrames(new Float32Array(1000), FS, { attackS: 0, releaseS: 0, out })).toThrow(/out/);
  });
});

describe('sourceStatsPass: frame statistics, peak envelope and magnitude histogram in one pass', () => {
  it('equals computeFrameStats, peakEnvelopeFrames and magnitudeHistogram exactly, on any frame layout and length', () => {
    const bursts = uniformNoise(44100, 0.8, 5).map((v, i) => (Math.floor(i / 3000) % 2 === 0 ? v : v * 0.01));
    // zeros, magnitudes below −120 dBFS, above +6 dBFS and ±0 exercise every branch of the count
    const edges = Float32Array.of(0, -0, 1e-7, -3e-8, 2.5, -4, 1, -1, 0.5, 1e-6);
    const cases: [Float32Array, number, number][] = [
      [bursts, 44100, 0.001],
      [edges, 8000, 0.001],
      [bursts.subarray(0, 1003), 44100, 0.0025],
      [uniformNoise(7, 1, 9), 48000, 0.001],
      [Float32Array.of(0.5), 8000, 0.001],
      [new Float32Array(480), 48000, 0.001],
    ];
    for (const [x, fs, frameS] of cases) {
      const opts = { attackS: 0.001, releaseS: 0.05, frameS };
      const { frames, peak, histogram } = sourceStatsPass(x, fs, opts);
      expect(frames).toEqual(computeFrameStats(x, fs, { frameS }));
      expect(Array.from(peak)).toEqual(Array.from(peakEnvelopeFrames(x, fs, opts)));
      expect(histogram).toEqual(magnitudeHistogram(x));
      const coarse = sourceStatsPass(x, fs, { ...opts, histogram: { binDb: 0.5, minDb: -60, maxDb: 0 } }).histogram;
      expect(coarse).toEqual(magnitudeHistogram(x, { binDb: 0.5, minDb: -60, maxDb: 0 }));
    }
  });

  it('rejects NaN samples naming the frame, and bad follower options', () => {
    const x = new Float32Array(441);
    x[200] = Number.NaN;
    expect(() => sourceStatsPass(x, 44100, { attackS: 0.001, releaseS: 0.05 })).toThrow(/NaN or infinite sample in frame 4/);
    expect(() => sourceStatsPass(new Float32Array(10), 44100, { attackS: -1, releaseS: 0.05 })).toThrow(/attackS/);
  });
});
