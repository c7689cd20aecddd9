import { describe, expect, it } from 'vitest';
import { medhurstProximityFactor } from '../../../../shared/physics/coil/proximity.ts';

describe("Medhurst's proximity factor (Wireless Engineer 24, 1947)", () => {
  it('returns the published table at its points', () => {
    // Spot values of Medhurst's table (rows l/D, columns d/p), as reproduced by D. W. Knight
    // (g3ynh.info) and S. Stroobandt (hamwaves.com). Tolerance 1e-9: exact at the grid.
    const spots: Array<[lOverD: number, dOverP: number, phi: number]> = [
      [0.2, 1, 5.45],
      [1, 0.8, 3.17],
      [2, 0.5, 1.74],
      [4, 0.9, 3.05],
      [4, 0.8, 2.6],
      [10, 0.3, 1.35],
      [0.6, 0.1, 1.03],
      [6, 0.7, 2.29],
    ];
    for (const [x, q, phi] of spots) expect(Math.abs(medhurstProximityFactor(x, 1 / q) - phi)).toBeLessThan(1e-9);
  });

  it('interpolates between points and tends to 1 for widely spaced turns', () => {
    // Halfway between d/p = 0.9 and 0.8 at l/D = 4: (3.05 + 2.60)/2 = 2.825; halfway between l/D = 4
    // and 6 at d/p = 0.5: (1.78 + 1.80)/2 = 1.79 (hand values).
    expect(Math.abs(medhurstProximityFactor(4, 1 / 0.85) - 2.825)).toBeLessThan(1e-9);
    expect(Math.abs(medhurstProximityFactor(5, 2) - 1.79)).toBeLessThan(1e-9);
    expect(Math.abs(medhurstProximityFactor(3, 1e6) - 1)).toBeLessThan(1e-5);
    // l/D → ∞ row (3.41 at d/p = 1); l/D = 20 sits halfway in D/l between 10 (3.23) and ∞.
    expect(Math.abs(medhurstProximityFactor(20, 1) - (3.23 + 3.41) / 2)).toBeLessThan(1e-9);
    // Touching turns (p < d cannot be) clamp to the d/p = 1 column.
    expect(medhurstProximityFactor(4, 0.9)).toBe(medhurstProximityFactor(4, 1));
    expect(() => medhurstProximityFactor(0, 1)).toThrow(RangeError);
    expect(() => medhurstProximityFactor(1, 0)).toThrow(RangeError);
  });
});
