import { describe, expect, it } from 'vitest';
import {
  AIR_BREAKDOWN_V_PER_M,
  COIL_CAUTIONS,
  LONG_GAP_BREAKDOWN_V_PER_M,
  airBreakdownGapM,
  capacitanceFromResonanceF,
  keepOutDistance,
  arcReachM,
  energyBoundVoltageV,
} from '../../../../shared/physics/coil/voltage.ts';

describe('voltage bound, clearance and arc reach', () => {
  it('V = √(2E/C): 0.5 J into 14 pF is 267 kV, and ½CV² gives the energy back', () => {
    const v = energyBoundVoltageV(0.5, 14e-12);
    expect(Math.abs(v - 267.26e3)).toBeLessThan(10); // hand value √(1/14e-12) = 267 261 V
    expect(Math.abs((0.5 * 14e-12 * v * v) / 0.5 - 1)).toBeLessThan(1e-14);
  });

  it('a uniform millimetre gap holds 3 kV/mm, a long gap only 0.5 MV/m: 300 kV needs 0.6 m', () => {
    // AMS Glossary of Meteorology, "dielectric strength" [pub]: 3 MV/m for a uniform field.
    expect(AIR_BREAKDOWN_V_PER_M).toBe(3e6);
    // Long rod–plane gaps, positive impulse: mean gradient near 0.5–0.6 MV/m (Les Renardières Group,
    // Electra 53, 1977; Kuffel, Zaengl & Kuffel §5.9 [recalled]); the lower end gives the longer gap.
    expect(LONG_GAP_BREAKDOWN_V_PER_M).toBe(0.5e6);
    expect(airBreakdownGapM(300e3)).toBeCloseTo(0.6, 12);
    expect(airBreakdownGapM(300e3, AIR_BREAKDOWN_V_PER_M)).toBeCloseTo(0.1, 12);
  });

  it('C = 1/((2π f)²L): 30 mH at 300 kHz is 9.38 pF', () => {
    // Hand value: (2π·3e5)² = 3.5531e12; ×0.03 = 1.0659e11; 1/that = 9.3816e-12 F.
    expect(Math.abs(capacitanceFromResonanceF(300e3, 30e-3) - 9.3816e-12)).toBeLessThan(1e-15);
  });

  it('keep-out is the factor times the larger of gap and arc reach, and says which', () => {
    expect(keepOutDistance(0.6, 0.4)).toEqual({ keepOutM: 1.2, setBy: 'breakdown-gap' });
    expect(keepOutDistance(0.3, 0.4)).toEqual({ keepOutM: 0.8, setBy: 'arc-reach' });
    expect(keepOutDistance(null, 0.4, 3)!.setBy).toBe('arc-reach');
    expect(keepOutDistance(0.5, null)!.keepOutM).toBe(1);
    expect(keepOutDistance(null, null)).toBeNull();
  });

  it('the cautions name the hazards: shock and burns, ozone, radio interference, fire, hearing, codes', () => {
    const text = COIL_CAUTIONS.join(' ').toLowerCase();
    for (const word of ['kill', 'burn', 'ozone', 'radio', 'ignite', 'hearing', 'codes', 'licensed']) expect(text).toContain(word);
  });
});
