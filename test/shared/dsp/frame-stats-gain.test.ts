import { describe, expect, it } from 'vitest';
import {
  computeFrameStats,
  frameLength,
  railFrameMoments,
  scaledFrameMoments,
} from '../../../shared/dsp/frame-stats.ts';

const FS = 44100;

/** Music-like test signal: two tones under a slow amplitude swell plus a DC offset. */
function testSignal(n: number): Float32Array {
  const x = new Float32Array(n);
  for (let i = 0; i < n; i++) {
    const t = i / FS;
    const swell = 0.5 + 0.45 * Math.sin(2 * Math.PI * 1.7 * t);
    x[i] = swell * (0.6 * Math.sin(2 * Math.PI * 110 * t) + 0.3 * Math.sin(2 * Math.PI * 1234.5 * t)) + 0.02;
  }
  return x;
}

/**
 * Brute force over the samples of every frame, in float64, of f(x[i]) averaged per frame.
 */
function perFrame(x: Float32Array, stats: ReturnType<typeof computeFrameStats>, f: (v: number) => number) {
  const out = new Float64Array(stats.count);
  let a = 0;
  for (let k = 0; k < stats.count; k++) {
    const b = a + frameLength(stats, k);
    let s = 0;
    for (let i = a; i < b; i++) s += f(x[i]);
    out[k] = s / (b - a);
    a = b;
  }
  return out;
}

/** Largest |a[k] − b[k]| / scale. */
function maxRelDiff(a: Float64Array, b: Float64Array, scale: number): number {
  let m = 0;
  for (let k = 0; k < a.length; k++) m = Math.max(m, Math.abs(a[k] - b[k]) / scale);
  return m;
}

// The identities are exact in real arithmetic (linearity of expectation: mean(g·x) = g·mean(x),
// E[(g·x)²] = g²·E[x²]; E[(V/2)²(1 + g·x)²] expands term by term). Tolerance 1e-13 relative to the
// quantity's scale: both sides are float64 sums of ≤ 45 terms, so they differ by a few ulps.
const TOL = 1e-13;

describe('scaledFrameMoments: mean(g·x) = g·mean, E[(g·x)²] = g²·E[x²]', () => {
  const x = testSignal(FS); // 1 s, 1000 frames of 44.1 samples
  const st = computeFrameStats(x, FS);
  for (const g of [0.25, 1, 1.8, -0.7]) {
    it(`holds at gain ${g} against brute force over the scaled samples`, () => {
      const m = scaledFrameMoments(st, g);
      expect(m.mean.length).toBe(1000);
      expect(maxRelDiff(m.mean, perFrame(x, st, (v) => g * v), Math.abs(g))).toBeLessThan(TOL);
      expect(maxRelDiff(m.meanSquare, perFrame(x, st, (v) => (g * v) * (g * v)), g * g)).toBeLessThan(TOL);
    });
  }

  it('writes into caller buffers', () => {
    const out = { mean: new Float64Array(1200), meanSquare: new Float64Array(1200) };
    const m = scaledFrameMoments(st, 2, out);
    expect(m.meanSquare.buffer).toBe(out.meanSquare.buffer);
    expect(m.meanSquare.length).toBe(1000);
    expect(out.meanSquare[123]).toBeCloseTo(4 * st.meanSquare[123], 14);
    const short = { mean: new Float64Array(10), meanSquare: new Float64Array(10) };
    expect(() => scaledFrameMoments(st, 2, short)).toThrow(/1000 frames/);
  });
});

describe('railFrameMoments: v = (V/2)(1 + g·x)', () => {
  const x = testSignal(2 * FS);
  const st = computeFrameStats(x, FS);
  const railV = 48;

  for (const g of [0.5, 1]) {
    it(`gives E[v] = (V/2)(1 + g·mean), E[v²] = (V²/4)(1 + 2g·mean + g²·E[x²]) at gain ${g}`, () => {
      const r = railFrameMoments(st, g, railV);
      const v = (s: number) => (railV / 2) * (1 + g * s);
      expect(maxRelDiff(r.meanV, perFrame(x, st, v), railV)).toBeLessThan(TOL);
      expect(maxRelDiff(r.meanSquareV2, perFrame(x, st, (s) => v(s) * v(s)), railV * railV)).toBeLessThan(TOL);
      // Peak |x| ≈ 0.95·0.9 + 0.02 < 1: no frame leaves the rail at these gains.
      expect(r.saturatedFrames).toBe(0);
    });
  }

  it('E[v²] exceeds E[v]² by (V²/4)·g²·var(x): the envelope alone under-counts dissipation', () => {
    // Var(v) = (V/2)²·g²·(E[x²] − E[x]²) > 0 whenever the audio varies within the frame.
    const g = 0.8;
    const r = railFrameMoments(st, g, railV);
    for (const k of [10, 500, 1999]) {
      const varX = st.meanSquare[k] - st.mean[k] ** 2;
      const excess = r.meanSquareV2[k] - r.meanV[k] ** 2;
      expect(varX).toBeGreaterThan(1e-3);
      // 1e-9 V²: difference of two ~1e3 V² quantities, ulps ~1e-13 each.
      expect(Math.abs(excess - (railV / 2) ** 2 * g * g * varX)).toBeLessThan(1e-9);
    }
  });

  it('counts frames where g·x leaves [−1, 1] (the rail would clip)', () => {
    const g = 1.6;
    const r = railFrameMoments(st, g, railV);
    let expected = 0;
    for (let k = 0; k < st.count; k++) if (g * st.max[k] > 1 || g * st.min[k] < -1) expected++;
    // Sanity: with peak |x| ≈ 0.87 some, not all, frames saturate at g = 1.6.
    expect(expected).toBeGreaterThan(0);
    expect(expected).toBeLessThan(st.count);
    expect(r.saturatedFrames).toBe(expected);
  });
});
