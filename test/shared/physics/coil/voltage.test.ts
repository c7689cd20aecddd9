import { describe, expect, it } from 'vitest';
import {
  AIR_BREAKDOWN_V_PER_M,
  COIL_CAUTIONS,
  airBreakdownGapM,
  arcReachM,
  energyBoundVoltageV,
} from '../../../../shared/physics/coil/voltage.ts';

describe('voltage bound, clearance and arc reach', () => {
  it('V = √(2E/C): 0.5 J into 14 pF is 267 kV, and ½CV² gives the energy back', () => {
    const v = energyBoundVoltageV(0.5, 14e-12);
    expect(Math.abs(v - 267.26e3)).toBeLessThan(10); // hand value √(1/14e-12) = 267 261 V
    expect(Math.abs((0.5 * 14e-12 * v * v) / 0.5 - 1)).toBeLessThan(1e-14);
  });

  it('dry air breaks down near 3 kV/mm: 300 kV needs 100 mm', () => {
    // AMS Glossary of Meteorology, "dielectric strength" [pub]: 3 MV/m.
    expect(AIR_BREAKDOWN_V_PER_M).toBe(3e6);
    expect(airBreakdownGapM(300e3)).toBeCloseTo(0.1, 12);
  });

  it('arc reach 1.7 in·√W: 100 W → 17 in = 0.4318 m', () => {
    // Builders' empirical rule (2005) for spark-gap coils [sec]; the inch is 0.0254 m exactly.
    expect(arcReachM(100)).toBeCloseTo(0.4318, 12);
    expect(arcReachM(400) / arcReachM(100)).toBeCloseTo(2, 12);
  });

  it('the cautions name the hazards: shock and burns, ozone, radio interference, fire, hearing, codes', () => {
    const text = COIL_CAUTIONS.join(' ').toLowerCase();
    for (const word of ['kill', 'burn', 'ozone', 'radio', 'ignite', 'hearing', 'codes', 'licensed']) expect(text).toContain(word);
  });
});
