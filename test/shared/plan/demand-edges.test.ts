/**
 * How the duty-budget helpers of shared/plan/demand.ts use what they are given: dutyBudget reads the
 * transient thermal impedance Zth once at each burst length and not at all when the answer does not
 * depend on it (no allowed rise, or a device that never heats: d = 0 or 1 by the module note), and
 * firstCrossing looks only at the burst lengths it is given. Expected values by hand.
 */
import { describe, expect, it } from 'vitest';
import { dutyBudget, firstCrossing } from '../../../shared/plan/demand.ts';

/** A single-pole Zth(t) = R(1 − e^(−t/τ)) (NXP AN11261, one Foster stage) that records where it was read. */
function recordingZth(rKPerW: number, tauS: number) {
  const readAt: unknown[] = [];
  const zth = (tS: number) => {
    readAt.push(tS);
    if (!(typeof tS === 'number' && tS >= 0)) throw new RangeError(`zth: t must be a time ≥ 0 s, got ${tS}`);
    return rKPerW * (1 - Math.exp(-tS / tauS));
  };
  return { zth, readAt };
}

describe('dutyBudget: where Zth is read', () => {
  it('reads Zth once at each burst length, in order, and nowhere else', () => {
    const L = Float64Array.of(0.001, 0.01, 0.1);
    const { zth, readAt } = recordingZth(2, 0.01);
    const b = dutyBudget(L, 60, 50, zth);
    expect(readAt).toEqual([0.001, 0.01, 0.1]);
    // 10 ms: 60 K / (50 W · 2·(1 − e^−1) K/W) = 0.9492 (hand value, as in demand.test.ts).
    expect(b[1]).toBeCloseTo(60 / (50 * 2 * (1 - Math.exp(-1))), 12);
  });

  it('does not need Zth for a device that never heats (P_full = 0: budget 1) or with no allowed rise (budget 0)', () => {
    const L = Float64Array.of(0.001, 0.01);
    const lossless = recordingZth(2, 0.01);
    expect(Array.from(dutyBudget(L, 60, 0, lossless.zth))).toEqual([1, 1]);
    expect(lossless.readAt).toEqual([]);
    const noRise = recordingZth(2, 0.01);
    expect(Array.from(dutyBudget(L, 0, 50, noRise.zth))).toEqual([0, 0]);
    expect(noRise.readAt).toEqual([]);
  });

  it('gives 1 for a lossless device even when its Zth is unbounded (0 W times any impedance is no rise)', () => {
    // A device with no path to ambient has no finite Zth; with no loss it still never heats.
    expect(Array.from(dutyBudget(Float64Array.of(0.01, 1), 60, 0, () => Infinity))).toEqual([1, 1]);
  });
});

describe('firstCrossing: only the lengths given', () => {
  it('ignores demand and budget entries past the last length (a caller passing a prefix of the lengths)', () => {
    // Demand crosses budget only at the fourth entry, which has no length in the prefix: no crossing.
    const all = Float64Array.of(0.001, 0.01, 0.1, 1);
    const demand = Float64Array.of(0.1, 0.1, 0.1, 0.9);
    const budget = Float64Array.of(1, 0.5, 0.3, 0.2);
    expect(firstCrossing(all.subarray(0, 3), demand, budget)).toBeNull();
    expect(firstCrossing(all, demand, budget)).toEqual({ lengthS: 1, demand: 0.9, budget: 0.2 });
  });
});
