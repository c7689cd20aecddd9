import { describe, expect, it } from 'vitest';
import { binEdgeLinear, magnitudeHistogram, type MagnitudeHistogram } from '../../../shared/dsp/histogram.ts';

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

/**
 * Brute-force histogram, independent of the implementation: linear edges e_i = 10^((minDb + i·binDb)/20)
 * and a binary search on them for each |x| (as stored in float32). Returns [below, bins…, above]
 * plus zeros.
 */
function bruteHistogram(x: Float32Array, binDb: number, minDb: number, maxDb: number) {
  const nBins = Math.round((maxDb - minDb) / binDb);
  const edges = Array.from({ length: nBins + 1 }, (_, i) => Math.pow(10, (minDb + i * binDb) / 20));
  const counts = new Float64Array(nBins);
  let zeros = 0;
  let below = 0;
  let above = 0;
  for (const v of x) {
    const m = Math.abs(v);
    if (m === 0) zeros++;
    else if (m < edges[0]) below++;
    else if (m >= edges[nBins]) above++;
    else {
      let lo = 0;
      let hi = nBins; // invariant edges[lo] ≤ m < edges[hi]
      while (hi - lo > 1) {
        const mid = (lo + hi) >> 1;
        if (m >= edges[mid]) lo = mid;
        else hi = mid;
      }
      counts[lo]++;
    }
  }
  return { counts, zeros, below, above };
}

/** Counts are integers: they must agree exactly, bin by bin. */
function expectSameCounts(h: MagnitudeHistogram, x: Float32Array) {
  const b = bruteHistogram(x, h.binDb, h.minDb, h.maxDb);
  let mismatched = 0;
  for (let i = 0; i < b.counts.length; i++) if (h.counts[i] !== b.counts[i]) mismatched++;
  expect(mismatched).toBe(0);
  expect([h.zeros, h.below, h.above]).toEqual([b.zeros, b.below, b.above]);
  expect(h.total).toBe(x.length);
}

describe('magnitudeHistogram: exact binning', () => {
  it('matches a brute-force count over a wide range of random magnitudes', () => {
    // Log-uniform magnitudes from −140 to +12 dBFS with random sign, so every bin and both
    // out-of-range buckets get samples.
    const r = rng(11);
    const x = new Float32Array(400_000);
    for (let i = 0; i < x.length; i++) x[i] = (r() < 0.5 ? -1 : 1) * Math.pow(10, (-140 + 152 * r()) / 20);
    x.fill(0, 0, 1000);
    const h = magnitudeHistogram(x);
    expect(h.counts.length).toBe(12600);
    expectSameCounts(h, x);
    expect(h.zeros).toBe(1000);
    expect(h.below).toBeGreaterThan(0);
    expect(h.above).toBeGreaterThan(0);
  });

  it('places magnitudes on and next to every bin edge exactly', () => {
    // For each edge e_i of a 0.01 dB layout: the float32 nearest e_i and its two neighbours.
    const opts = { binDb: 0.01, minDb: -30, maxDb: 3 };
    const vals: number[] = [];
    const f = new Float32Array(1);
    const u = new Uint32Array(f.buffer);
    for (let i = 0; i <= 3300; i++) {
      f[0] = binEdgeLinear(opts, i);
      const b = u[0];
      for (const d of [-1, 0, 1]) {
        u[0] = b + d;
        vals.push(f[0], -f[0]);
      }
    }
    const x = Float32Array.from(vals);
    const h = magnitudeHistogram(x, opts);
    expectSameCounts(h, x);
  });

  it('matches brute force on a sine and at other bin widths', () => {
    const n = 200_000;
    const x = new Float32Array(n);
    for (let i = 0; i < n; i++) x[i] = 0.9 * Math.sin((2 * Math.PI * 997 * i) / 44100);
    expectSameCounts(magnitudeHistogram(x), x);
    expectSameCounts(magnitudeHistogram(x, { binDb: 0.1, minDb: -60, maxDb: 0 }), x);
    expectSameCounts(magnitudeHistogram(x, { binDb: 0.001, minDb: -10, maxDb: 1 }), x);
    expectSameCounts(magnitudeHistogram(x, { binDb: 1, minDb: -96, maxDb: 0 }), x);
  });

  it('keeps the peak and counts ±∞ above range; rejects NaN', () => {
    const x = Float32Array.from([0, -0.25, 0.5, -0.75, Infinity]);
    const h = magnitudeHistogram(x);
    expect(h.peak).toBe(Infinity);
    expect(h.above).toBe(1);
    expect(magnitudeHistogram(x.subarray(0, 4)).peak).toBe(0.75);
    const bad = Float32Array.from([0.1, NaN, 0.2]);
    expect(() => magnitudeHistogram(bad)).toThrow(/NaN sample at index 1/);
  });

  it('reads subarrays with an offset and merges chunks with `into`', () => {
    const r = rng(5);
    const x = new Float32Array(30_001);
    for (let i = 0; i < x.length; i++) x[i] = 2 * r() - 1;
    const whole = magnitudeHistogram(x);
    const h = magnitudeHistogram(x.subarray(0, 10_000));
    const same = magnitudeHistogram(x.subarray(10_000), { into: h });
    expect(same).toBe(h);
    expect(h.total).toBe(whole.total);
    let diff = 0;
    for (let i = 0; i < h.counts.length; i++) diff += Math.abs(h.counts[i] - whole.counts[i]);
    expect(diff).toBe(0);
    expect(h.peak).toBe(whole.peak);
    expectSameCounts(magnitudeHistogram(x.subarray(7, 20_007)), x.subarray(7, 20_007));
    expect(() => magnitudeHistogram(x, { into: h, binDb: 0.1 })).toThrow(/different layout/);
  });

  it('validates the layout', () => {
    const x = new Float32Array(10);
    expect(() => magnitudeHistogram(x, { binDb: 0 })).toThrow(/binDb/);
    expect(() => magnitudeHistogram(x, { minDb: -800 })).toThrow(/minDb/);
    expect(() => magnitudeHistogram(x, { maxDb: -130 })).toThrow(/maxDb/);
    expect(() => magnitudeHistogram(x, { binDb: 0.011 })).toThrow(/whole number/);
  });
});
