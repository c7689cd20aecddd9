import { describe, expect, it } from 'vitest';
import {
  binEdgeLinear,
  fractionAbove,
  magnitudeHistogram,
  percentileMagnitude,
  type MagnitudeHistogram,
} from '../../../shared/dsp/histogram.ts';

/** mulberry32: deterministic uniform [0, 1). */
function rng(seed: number): () => number {
  let s = seed >>> 0;
  return () => {
    s = (s + 0x6d2b79f5) >>> 0;
    let t = Math.imul(s ^ (s >>> 15), 1 | s);
    t = (t + Math.imul(t ^ (t >>> 7), 61 | t)) ^ t;
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
  };
}

/** Music-like magnitudes: Gaussian (Box–Muller) noise at 0.2 RMS under a slow swell. */
function gaussianSignal(n: number, seed: number): Float32Array {
  const r = rng(seed);
  const x = new Float32Array(n);
  for (let i = 0; i < n; i++) {
    const g = Math.sqrt(-2 * Math.log(1 - r())) * Math.cos(2 * Math.PI * r());
    x[i] = 0.2 * g * (0.55 + 0.45 * Math.sin(i / 5000));
  }
  return x;
}

/** A·sin at f/fs = (√5 − 1)/20 (a quadratic irrational: phases equidistribute fastest). */
function goldenSine(n: number, amp: number): Float32Array {
  const step = (2 * Math.PI * (Math.sqrt(5) - 1)) / 20;
  const x = new Float32Array(n);
  for (let i = 0; i < n; i++) x[i] = amp * Math.sin(step * i);
  return x;
}

/** Brute-force P(|x| > level) by binary search over the sorted magnitudes. */
function exactAbove(x: Float32Array): (level: number) => number {
  const sorted = Float64Array.from(x, Math.abs).sort();
  return (level: number) => {
    let lo = 0;
    let hi = sorted.length; // first index with sorted[i] > level
    while (lo < hi) {
      const mid = (lo + hi) >> 1;
      if (sorted[mid] > level) hi = mid;
      else lo = mid + 1;
    }
    return (sorted.length - lo) / sorted.length;
  };
}

/** Share of all samples in the bin holding `level` (the documented worst-case error). */
function binShare(h: MagnitudeHistogram, level: number): number {
  const j = Math.floor((20 * Math.log10(level) - h.minDb) / h.binDb);
  let share = 0;
  for (const k of [j - 1, j, j + 1]) {
    if (k < 0 || k >= h.counts.length) continue;
    if (level >= binEdgeLinear(h, k) && level < binEdgeLinear(h, k + 1)) share = h.counts[k] / h.total;
  }
  return share;
}

describe('fractionAbove', () => {
  const x = gaussianSignal(300_000, 3);
  const h = magnitudeHistogram(x);
  const exact = exactAbove(x);

  it('is within one bin’s share of a brute-force count at levels from −100 to +3 dBFS', () => {
    let worstRatio = 0;
    for (let db = -100; db <= 3; db += 0.37) {
      const level = Math.pow(10, db / 20);
      const err = Math.abs(fractionAbove(h, level) - exact(level));
      const bound = binShare(h, level) + 1e-12;
      expect(err).toBeLessThanOrEqual(bound);
      if (bound > 1e-6) worstRatio = Math.max(worstRatio, err / bound);
    }
    // Interpolation in dB does better than the bound on a smooth distribution.
    expect(worstRatio).toBeLessThan(0.5);
  });

  it('is exact on bin edges and non-increasing', () => {
    for (const i of [0, 3000, 9000, 11000, 12000]) {
      const level = binEdgeLinear(h, i);
      // On an edge nothing is interpolated except the (empty) below-edge part: exact up to
      // samples equal to the edge itself, which float32 makes vanishingly rare.
      expect(Math.abs(fractionAbove(h, level) - exact(level))).toBeLessThan(1e-9);
    }
    // Coarse scan over the whole range, then fine scans across bin edges (where the
    // interpolation changes bins and a discontinuity would show).
    const scan = (fromDb: number, toDb: number, stepDb: number) => {
      let prev = 1;
      let rises = 0;
      for (let db = fromDb; db <= toDb; db += stepDb) {
        const f = fractionAbove(h, Math.pow(10, db / 20));
        if (f > prev + 1e-15) rises++;
        prev = f;
      }
      return rises;
    };
    expect(scan(-125, 7, 0.0517)).toBe(0);
    for (const edgeDb of [-60, -30.01, -20, -14.37, -10, -3]) expect(scan(edgeDb - 0.03, edgeDb + 0.03, 0.0007)).toBe(0);
  });

  it('gives the over-modulation fraction at gain g as fractionAbove(hist, 1/g)', () => {
    for (const g of [1, 2, 3.7, 8]) {
      let over = 0;
      for (let i = 0; i < x.length; i++) if (Math.abs(g * x[i]) > 1) over++;
      const err = Math.abs(fractionAbove(h, 1 / g) - over / x.length);
      expect(err).toBeLessThanOrEqual(binShare(h, 1 / g) + 1e-12);
    }
  });

  it('handles the ends: negative, zero, at and above the peak, empty', () => {
    const y = Float32Array.from([0, 0, 0.5, -0.25]);
    const hy = magnitudeHistogram(y);
    expect(fractionAbove(hy, -1)).toBe(1);
    expect(fractionAbove(hy, 0)).toBeCloseTo(0.5, 15);
    expect(fractionAbove(hy, 0.5)).toBe(0);
    expect(fractionAbove(hy, 2)).toBe(0);
    expect(fractionAbove(hy, 0.3)).toBeCloseTo(0.25, 15);
    // In the peak's bin the interpolation runs from the bin's lower edge to the peak, so it is
    // continuous down to 0 at the peak; there the error reaches its bound, the bin's share (0.25).
    const j = Math.floor((20 * Math.log10(0.5) + 120) / 0.01);
    expect(fractionAbove(hy, binEdgeLinear(hy, j))).toBeCloseTo(0.25, 12);
    expect(fractionAbove(hy, 0.5 * (1 - 1e-9))).toBeLessThan(1e-6);
    expect(fractionAbove(magnitudeHistogram(new Float32Array(0)), 0.1)).toBeNaN();
    expect(() => fractionAbove(hy, NaN)).toThrow(/NaN/);
  });
});

describe('the arcsine law for a sine (outside check)', () => {
  // A sine at uniformly distributed phase: P(|A sin θ| > a) = 1 − (2/π)·asin(a/A) (the arcsine
  // distribution; Feller, An Introduction to Probability Theory, vol. II [recalled]; it follows
  // from θ uniform on [0, 2π)). Sampling at an irrational frequency ratio makes the phases
  // equidistribute; for 2^20 samples their discrepancy is below 1e-4.
  const A = 0.8;
  const x = goldenSine(1 << 20, A);
  const h = magnitudeHistogram(x);

  it('fractionAbove matches 1 − (2/π)·asin(a/A) from 0.05 A to 0.95 A', () => {
    let worst = 0;
    for (let r = 0.05; r <= 0.951; r += 0.05) {
      const expected = 1 - (2 / Math.PI) * Math.asin(r);
      const err = Math.abs(fractionAbove(h, r * A) - expected);
      // 1e-4: phase discrepancy; interpolation error is far smaller (see the brute-force test).
      expect(err).toBeLessThan(1e-4);
      worst = Math.max(worst, err);
    }
    expect(worst).toBeGreaterThan(0); // a real comparison, not an identity
  });

  it('percentileMagnitude matches A·sin(π·p/200)', () => {
    for (const p of [5, 10, 25, 50, 75, 90, 95]) {
      const expected = A * Math.sin((Math.PI * p) / 200);
      const got = percentileMagnitude(h, p);
      // 0.01 dB: one bin; phase discrepancy moves the percentile by < 0.002 dB here.
      expect(Math.abs(20 * Math.log10(got / expected))).toBeLessThan(0.01);
    }
    // 100 % is the peak: the sample closest to the crest, within 1e-6 of A at 2^20 samples.
    expect(percentileMagnitude(h, 100)).toBeCloseTo(A, 5);
    expect(percentileMagnitude(h, 100)).toBe(h.peak);
  });
});

describe('percentileMagnitude', () => {
  const x = gaussianSignal(200_000, 9);
  const h = magnitudeHistogram(x);

  it('inverts fractionAbove', () => {
    for (const p of [0.5, 1, 10, 33.3, 50, 90, 99, 99.99]) {
      // Exact in real arithmetic (both interpolate the same bin linearly in dB); 1e-9 covers the
      // dB ↔ linear round trip.
      expect(fractionAbove(h, percentileMagnitude(h, p))).toBeCloseTo(1 - p / 100, 9);
    }
  });

  it('is within one bin of the sorted-sample percentile', () => {
    const sorted = Float64Array.from(x, Math.abs).sort();
    for (const p of [1, 25, 50, 75, 99]) {
      const exact = sorted[Math.ceil((p / 100) * sorted.length) - 1];
      expect(Math.abs(20 * Math.log10(percentileMagnitude(h, p) / exact))).toBeLessThanOrEqual(0.01 + 1e-9);
    }
  });

  it('handles zeros, the ends and bad input', () => {
    const y = Float32Array.from([0, 0, 0, 0.5]);
    const hy = magnitudeHistogram(y);
    expect(percentileMagnitude(hy, 50)).toBe(0);
    expect(percentileMagnitude(hy, 100)).toBeCloseTo(0.5, 12);
    // Without zeros, 0 % is the lowest occupied bin's lower edge: within a bin of the minimum.
    const p0Db = 20 * Math.log10(percentileMagnitude(magnitudeHistogram(Float32Array.from([0.25, -0.5])), 0) / 0.25);
    expect(p0Db).toBeGreaterThan(-0.01);
    expect(p0Db).toBeLessThanOrEqual(0);
    // Inside the below-range samples it returns the range's lower edge (this noise reaches −134 dBFS).
    expect(h.below).toBeGreaterThan(0);
    expect(percentileMagnitude(h, 0)).toBeCloseTo(1e-6, 15);
    expect(percentileMagnitude(magnitudeHistogram(new Float32Array(0)), 50)).toBeNaN();
    expect(() => percentileMagnitude(h, 101)).toThrow(/percent/);
  });
});
