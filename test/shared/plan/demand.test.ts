import { describe, expect, it } from 'vitest';
import { dutyBudget, firstCrossing, logSpacedLengthsS, maxWindowMean } from '../../../shared/plan/demand.ts';

describe('maxWindowMean', () => {
  it('agrees with a brute-force search over every window', () => {
    let seed = 7;
    const rnd = () => ((seed = (seed * 1103515245 + 12345) % 2147483648) / 2147483648);
    const series = Float64Array.from({ length: 500 }, rnd);
    const lengths = Float64Array.of(0.001, 0.005, 0.037, 0.25, 0.5);
    const { meanMax } = maxWindowMean(series, 0.001, lengths);
    lengths.forEach((L, j) => {
      const w = Math.round(L / 0.001);
      let best = -Infinity;
      for (let k = 0; k + w <= series.length; k++) {
        let s = 0;
        for (let i = k; i < k + w; i++) s += series[i];
        best = Math.max(best, s / w);
      }
      expect(meanMax[j]).toBeCloseTo(best, 12);
    });
  });

  it('never exceeds the largest frame, and reaches it and the whole-clip mean at the extremes', () => {
    // Not monotone in length in general (a window may fit one more burst than a slightly longer one).
    const series = Float64Array.from({ length: 2000 }, (_, k) => (k % 300 < 20 ? 1 : 0.1));
    const lengths = logSpacedLengthsS(0.001, 2, 8);
    const { meanMax } = maxWindowMean(series, 0.001, lengths);
    const clipMean = series.reduce((a, b) => a + b, 0) / series.length;
    for (const m of meanMax) expect(m).toBeLessThanOrEqual(1 + 1e-12);
    expect(meanMax[0]).toBe(1);
    expect(meanMax[meanMax.length - 1]).toBeCloseTo(clipMean, 12);
  });
});

describe('dutyBudget', () => {
  it('follows ΔT/(P·Zth(T)) for a single RC thermal path', () => {
    // Single-pole Zth(t) = R(1 − e^(−t/τ)) (NXP AN11261, Foster network with one stage).
    const R = 2;
    const tau = 0.01;
    const zth = (t: number) => R * (1 - Math.exp(-t / tau));
    const lengths = Float64Array.of(0.001, 0.01, 0.1);
    const b = dutyBudget(lengths, 60, 50, zth);
    // 1 ms: Zth = 0.1903 K/W, 50 W → 9.52 K rise at full duty: budget capped at 1.
    expect(b[0]).toBe(1);
    // 10 ms: Zth = 1.2642 K/W → 63.2 K at full duty → 60/63.21 = 0.9492.
    expect(b[1]).toBeCloseTo(60 / (50 * 2 * (1 - Math.exp(-1))), 12);
    // Long bursts approach ΔT/(P·R) = 0.6.
    expect(b[2]).toBeCloseTo(60 / (50 * 2 * (1 - Math.exp(-10))), 12);
  });

  it('reports the first length where demand crosses budget', () => {
    const L = Float64Array.of(0.001, 0.01, 0.1);
    expect(firstCrossing(L, Float64Array.of(0.5, 0.5, 0.5), Float64Array.of(1, 0.6, 0.4))?.lengthS).toBe(0.1);
    expect(firstCrossing(L, Float64Array.of(0.1, 0.1, 0.1), Float64Array.of(1, 0.6, 0.4))).toBeNull();
  });
});
