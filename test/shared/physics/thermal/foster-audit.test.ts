import { describe, expect, it } from 'vitest';
import { fosterPeriodicPeakKPerW, fosterZthKPerW } from '../../../../shared/physics/thermal/foster.ts';

// The edges of the Foster formulas (NXP AN11261 "Using RC Thermal Models": Zth(t) = Σ Rᵢ(1 − e^(−t/τᵢ))
// from a power step at t = 0, so nothing before it), against hand values.
const CELLS = [
  { rKPerW: 1, tauS: 1 },
  { rKPerW: 0.5, tauS: 0.01 },
];

describe('Foster edges', () => {
  it('Zth is 0 before the step and for a time that is not a number', () => {
    expect(fosterZthKPerW(CELLS, -1)).toBe(0);
    expect(fosterZthKPerW(CELLS, 0)).toBe(0);
    expect(fosterZthKPerW(CELLS, Number.NaN)).toBe(0);
    expect(fosterZthKPerW(CELLS, Infinity)).toBe(1.5);
  });

  it('the periodic peak is 0 without a pulse and ΣR once the pulse fills or overfills the period', () => {
    expect(fosterPeriodicPeakKPerW(CELLS, 0, 0.01)).toBe(0);
    expect(fosterPeriodicPeakKPerW(CELLS, -0.001, 0.01)).toBe(0);
    expect(fosterPeriodicPeakKPerW(CELLS, 0.01, 0.01)).toBe(1.5);
    expect(fosterPeriodicPeakKPerW(CELLS, 0.02, 0.01)).toBe(1.5);
  });
});
