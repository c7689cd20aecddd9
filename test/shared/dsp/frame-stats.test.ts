import { describe, expect, it } from 'vitest';
import {
  computeFrameStats,
  decimateFrameStats,
  frameCount,
  frameLength,
  frameStart,
  type FrameStats,
} from '../../../shared/dsp/frame-stats.ts';

/** Deterministic uniform noise in [−amp, amp) (mulberry32). */
function noise(n: number, amp: number, seed: number): Float32Array {
  const x = new Float32Array(n);
  let s = seed >>> 0;
  for (let i = 0; i < n; i++) {
    s = (s + 0x6d2b79f5) >>> 0;
    let t = Math.imul(s ^ (s >>> 15), 1 | s);
    t = (t + Math.imul(t ^ (t >>> 7), 61 | t)) ^ t;
    x[i] = amp * (2 * (((t ^ (t >>> 14)) >>> 0) / 4294967296) - 1);
  }
  return x;
}

/** Brute-force statistics of x[a..b) in float64. */
function brute(x: Float32Array, a: number, b: number) {
  let s = 0;
  let s2 = 0;
  let lo = Infinity;
  let hi = -Infinity;
  for (let i = a; i < b; i++) {
    s += x[i];
    s2 += x[i] * x[i];
    lo = Math.min(lo, x[i]);
    hi = Math.max(hi, x[i]);
  }
  return { mean: s / (b - a), meanSquare: s2 / (b - a), min: lo, max: hi };
}

/** Checks every frame of `st` against brute force over the frame's samples. */
function expectMatchesBrute(st: FrameStats, x: Float32Array) {
  let a = 0;
  for (let k = 0; k < st.count; k++) {
    const b = a + frameLength(st, k);
    const r = brute(x, a, b);
    // 1e-14 absolute on values ≤ 1: both sides sum ≤ 45 float64 terms in the same order
    // (or 450 in another order for decimation), so they differ by a few ulps at most.
    expect(Math.abs(st.mean[k] - r.mean)).toBeLessThan(1e-14);
    expect(Math.abs(st.meanSquare[k] - r.meanSquare)).toBeLessThan(1e-14);
    // min and max are selected samples, not computed values: they must be the samples themselves.
    expect(st.min[k]).toBe(r.min);
    expect(st.max[k]).toBe(r.max);
    a = b;
  }
  expect(a).toBe(x.length);
}

describe('frame layout', () => {
  it('places 1 ms frames at 44.1 kHz at floor(44.1·k): 44 or 45 samples, no drift', () => {
    const spf = 44100 * 0.001;
    // floor(441·k/10) in exact integer arithmetic is the reference.
    let mismatches = 0;
    for (let k = 0; k <= 300 * 1000; k++) if (frameStart(k, spf) !== Math.floor((441 * k) / 10)) mismatches++;
    expect(mismatches).toBe(0);
    expect(frameStart(10, spf)).toBe(441);
    expect(frameCount(44100, spf)).toBe(1000);
    const st = computeFrameStats(new Float32Array(44100), 44100);
    const lengths = Array.from({ length: st.count }, (_, k) => frameLength(st, k));
    expect(st.samplesPerFrame).toBeCloseTo(44.1, 12);
    expect(lengths.filter((l) => l === 45).length).toBe(100); // 44100 = 44·1000 + 100
    expect(lengths.filter((l) => l === 44).length).toBe(900);
  });

  it('ends with a shorter tail frame', () => {
    // 100 samples of 48-sample frames: 48 + 48 + 4.
    expect(frameCount(100, 48)).toBe(3);
    expect(frameCount(96, 48)).toBe(2);
    expect(frameCount(97, 48)).toBe(3);
    expect(frameCount(0, 48)).toBe(0);
    const x = noise(100, 1, 7);
    const st = computeFrameStats(x, 48000);
    expect(st.count).toBe(3);
    expect([0, 1, 2].map((k) => frameLength(st, k))).toEqual([48, 48, 4]);
    const tail = brute(x, 96, 100);
    expect(st.mean[2]).toBeCloseTo(tail.mean, 14);
    expect(st.meanSquare[2]).toBeCloseTo(tail.meanSquare, 14);
  });
});

describe('computeFrameStats', () => {
  it('matches brute force per frame at 44.1 kHz (fractional frames)', () => {
    const x = noise(44100 + 17, 0.8, 1);
    const st = computeFrameStats(x, 44100);
    expect(st.count).toBe(1001);
    expect(st.sampleCount).toBe(44117);
    expectMatchesBrute(st, x);
  });

  it('matches brute force with 2.5 ms frames at 48 kHz', () => {
    const x = noise(10000, 1, 2);
    const st = computeFrameStats(x, 48000, { frameS: 0.0025 });
    expect(st.count).toBe(Math.ceil(10000 / 120));
    expectMatchesBrute(st, x);
  });

  it('gives a sine of amplitude A a mean square of A²/2 over whole periods', () => {
    // 1 kHz at 48 kHz: a 1 ms frame is exactly one period; mean(sin²) = 1/2 exactly (textbook).
    const A = 0.6;
    const x = new Float32Array(4800);
    for (let i = 0; i < x.length; i++) x[i] = A * Math.sin((2 * Math.PI * 1000 * i) / 48000);
    const st = computeFrameStats(x, 48000);
    for (let k = 0; k < st.count; k++) {
      // 1e-8: float32 rounding of the samples (≤ 3e-8 relative each, averaging down).
      expect(st.meanSquare[k]).toBeCloseTo((A * A) / 2, 8);
      expect(st.mean[k]).toBeCloseTo(0, 8);
    }
  });

  it('writes into caller buffers', () => {
    const x = noise(480, 1, 3);
    const out = {
      mean: new Float64Array(16),
      meanSquare: new Float64Array(16),
      min: new Float32Array(16),
      max: new Float32Array(16),
    };
    const st = computeFrameStats(x, 48000, { out });
    expect(st.count).toBe(10);
    expect(st.mean.buffer).toBe(out.mean.buffer);
    expect(st.mean.length).toBe(10);
    expect(out.meanSquare[3]).toBeCloseTo(brute(x, 144, 192).meanSquare, 14);
    expect(() => computeFrameStats(noise(4800, 1, 3), 48000, { out })).toThrow(/100 frames/);
  });

  it('validates its arguments and rejects NaN samples', () => {
    const x = new Float32Array(100);
    expect(() => computeFrameStats(x, 0)).toThrow(/sampleRate/);
    expect(() => computeFrameStats(x, 48000, { frameS: -1 })).toThrow(/frameS/);
    expect(() => computeFrameStats(x, 48000, { frameS: 1e-5 })).toThrow(/at least one sample/);
    x[60] = NaN;
    expect(() => computeFrameStats(x, 48000)).toThrow(/NaN or infinite sample in frame 1/);
  });
});

describe('decimateFrameStats', () => {
  it('combines 1 ms frames into 10 ms frames as if computed directly', () => {
    // 44.1 kHz: 10 frames of 44/45 samples make one of 441; weighting by sample count is required.
    const x = noise(3 * 44100 + 123, 1, 4);
    const fine = computeFrameStats(x, 44100);
    const coarse = decimateFrameStats(fine, 10);
    const direct = computeFrameStats(x, 44100, { frameS: 0.01 });
    expect(coarse.count).toBe(direct.count);
    expect(coarse.frameS).toBeCloseTo(0.01, 15);
    expectMatchesBrute(coarse, x);
    for (let k = 0; k < direct.count; k++) expect(frameLength(coarse, k)).toBe(frameLength(direct, k));
  });

  it('keeps a ragged last group', () => {
    // 1001 frames in groups of 7: 143 groups, the last holding frames 994…1000.
    const x = noise(44100 + 17, 1, 5);
    const fine = computeFrameStats(x, 44100);
    const coarse = decimateFrameStats(fine, 7);
    expect(coarse.count).toBe(143);
    expectMatchesBrute(coarse, x);
    expect(decimateFrameStats(fine, 1).meanSquare[500]).toBeCloseTo(fine.meanSquare[500], 15);
    expect(() => decimateFrameStats(fine, 1.5)).toThrow(/factor/);
  });

  it('weights by sample count: a plain mean of means would be wrong', () => {
    // At 44.1 kHz frames 8 and 9 hold 44 (352…395) and 45 (396…440) samples. With 0 in the first
    // and 1 in the second, their combined mean is 45/89, not the plain mean of means 1/2.
    const x = new Float32Array(441);
    x.fill(1, 396);
    const fine = computeFrameStats(x, 44100);
    expect([frameLength(fine, 8), frameLength(fine, 9)]).toEqual([44, 45]);
    const st = decimateFrameStats(fine, 2);
    expect(st.mean[4]).toBeCloseTo(45 / 89, 14);
    expect(st.meanSquare[4]).toBeCloseTo(45 / 89, 14);
    expect(Math.abs(st.mean[4] - 0.5)).toBeGreaterThan(1e-3);
  });
});
