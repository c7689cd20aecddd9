import { describe, expect, it } from 'vitest';
import { dutyBudget, firstCrossing, logSpacedLengthsS, maxWindowMean } from '../../../shared/plan/demand.ts';

// Edges of the duty-budget helpers, each against a hand value (shared/plan/demand.ts module note:
// sliding-window maxima on the frame grid; the single-pulse Zth budget of NXP AN11261).

describe('logSpacedLengthsS', () => {
  it('spaces lengths evenly in the log, both ends included, perDecade per decade', () => {
    // 1 ms … 1 s at 3 per decade: 3 decades → 9 steps → 10 points, ratio 10^(1/3) (hand value).
    const l = logSpacedLengthsS(0.001, 1, 3);
    expect(l).toHaveLength(10);
    expect(l[0]).toBe(0.001);
    expect(Math.abs(l[9] - 1)).toBeLessThan(1e-15);
    for (let i = 1; i < l.length; i++) expect(Math.abs(l[i] / l[i - 1] - Math.cbrt(10))).toBeLessThan(1e-12);
    // A part of a decade rounds the step count up: 1 ms … 2 ms at 6/decade → ceil(1.806) = 2 steps.
    const p = logSpacedLengthsS(0.001, 0.002, 6);
    expect(p).toHaveLength(3);
    expect(p[0]).toBe(0.001);
    expect(Math.abs(p[1] - 0.001 * Math.SQRT2)).toBeLessThan(1e-15);
    expect(Math.abs(p[2] - 0.002)).toBeLessThan(1e-15);
    // Equal ends: one step, both points the same length.
    expect(Array.from(logSpacedLengthsS(0.5, 0.5))).toEqual([0.5, 0.5]);
    // The default is 6 per decade: 1 ms … 1 s → 19 points.
    expect(logSpacedLengthsS(0.001, 1)).toHaveLength(19);
  });

  it('refuses a zero, negative or reversed range', () => {
    expect(() => logSpacedLengthsS(0, 1)).toThrow(/logSpacedLengthsS: need 0 < minS ≤ maxS, got 0, 1/);
    expect(() => logSpacedLengthsS(-1, 1)).toThrow(RangeError);
    expect(() => logSpacedLengthsS(1, 0.5)).toThrow(RangeError);
  });
});

describe('maxWindowMean: where and how long', () => {
  it('finds the worst window and where it starts; a too-short length uses one frame, a too-long one the clip', () => {
    // Frames of 10 ms: 0 0 3 1 0 5 0 → best single frame 5 at 50 ms; best pair (0+5)/2 = 2.5 starting at
    // 40 ms (the pair (3+1)/2 = 2 is smaller); whole clip 9/7 (hand values).
    const s = Float64Array.of(0, 0, 3, 1, 0, 5, 0);
    const r = maxWindowMean(s, 0.01, Float64Array.of(0.001, 0.01, 0.02, 0.03, 1));
    expect(Array.from(r.meanMax)).toEqual([5, 5, 2.5, 2, 9 / 7]);
    expect(r.atS[0]).toBeCloseTo(0.05, 12);
    expect(r.atS[1]).toBeCloseTo(0.05, 12);
    expect(r.atS[2]).toBeCloseTo(0.04, 12);
    // Length 3: windows 3 (0,0,3)/3=1, (0,3,1)=4/3, (3,1,0)=4/3, (1,0,5)=2, (0,5,0)=5/3 → 2 at 30 ms.
    expect(r.atS[3]).toBeCloseTo(0.03, 12);
    expect(r.atS[4]).toBe(0);
  });

  it('keeps the first of equal windows and handles an empty series', () => {
    const r = maxWindowMean(Float64Array.of(1, 0, 1), 0.001, Float64Array.of(0.001));
    expect(r.meanMax[0]).toBe(1);
    expect(r.atS[0]).toBe(0);
    // All-negative series: the maximum is still found (the search starts from −∞, not 0).
    expect(maxWindowMean(Float64Array.of(-3, -1, -2), 0.001, Float64Array.of(0.001)).meanMax[0]).toBe(-1);
    expect(maxWindowMean(new Float64Array(0), 0.001, Float64Array.of(0.001)).meanMax[0]).toBe(0);
  });
});

describe('dutyBudget and firstCrossing at their edges', () => {
  const zth = () => 2;
  it('gives 0 with no allowed rise, 1 for a device that never heats, and caps at 1', () => {
    const L = Float64Array.of(0.01, 1);
    expect(Array.from(dutyBudget(L, 0, 10, zth))).toEqual([0, 0]);
    expect(Array.from(dutyBudget(L, -5, 10, zth))).toEqual([0, 0]);
    expect(Array.from(dutyBudget(L, 50, 0, zth))).toEqual([1, 1]);
    // 50 K over 10 W·2 K/W = 2.5 → capped at 1; 10 K → 0.5 (hand values).
    expect(Array.from(dutyBudget(L, 50, 10, zth))).toEqual([1, 1]);
    expect(Array.from(dutyBudget(L, 10, 10, zth))).toEqual([0.5, 0.5]);
    // No allowed rise wins over a lossless device (0, not 1); a negative loss (nonsense) never heats.
    expect(Array.from(dutyBudget(L, 0, 0, zth))).toEqual([0, 0]);
    expect(Array.from(dutyBudget(L, 10, -5, zth))).toEqual([1, 1]);
    // Zth is read at each length.
    expect(Array.from(dutyBudget(L, 10, 10, (t) => t * 100))).toEqual([1, 0.01]);
  });

  it('crosses only where demand is strictly above budget, and reports that length with both values', () => {
    const L = Float64Array.of(0.001, 0.01, 0.1);
    expect(firstCrossing(L, Float64Array.of(0.6, 0.6, 0.6), Float64Array.of(1, 0.6, 0.5))).toEqual({ lengthS: 0.1, demand: 0.6, budget: 0.5 });
    expect(firstCrossing(L, Float64Array.of(2, 0.1, 0.1), Float64Array.of(1, 1, 1))).toEqual({ lengthS: 0.001, demand: 2, budget: 1 });
    expect(firstCrossing(L, Float64Array.of(1, 1, 1), Float64Array.of(1, 1, 1))).toBeNull();
  });
});
