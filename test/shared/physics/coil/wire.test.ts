import { describe, expect, it } from 'vitest';
import {
  COPPER_RESISTIVITY_20C_OHM_M,
  COPPER_TEMP_COEFF_20C_PER_K,
  EPS0_F_PER_M,
  MU0_H_PER_M,
} from '../../../../shared/physics/constants.ts';
import {
  copperDcResistanceOhm,
  copperResistivityOhmM,
  helicalWireLengthM,
  roundWireAcResistanceRatio,
  skinDepthM,
} from '../../../../shared/physics/coil/wire.ts';
import ref from '../../../fixtures/coil/reference.json' with { type: 'json' };

const rel = (a: number, b: number): number => Math.abs(a / b - 1);

describe('constants', () => {
  it('μ0 and ε0 are CODATA 2018, and c = 1/√(μ0 ε0) = 299 792 458 m/s', () => {
    // CODATA 2018 recommended values [pub]; c is exact by SI definition, so the pair must
    // reproduce it to their ~1e-10 uncertainty.
    expect(MU0_H_PER_M).toBe(1.25663706212e-6);
    expect(EPS0_F_PER_M).toBe(8.8541878128e-12);
    expect(rel(1 / Math.sqrt(MU0_H_PER_M * EPS0_F_PER_M), 299792458)).toBeLessThan(2e-10);
  });

  it('annealed copper: ρ20 = 1.7241e-8 Ω·m (58.0 MS/m, 100 % IACS), α20 = 0.00393 /K', () => {
    // IEC 60028 [sec]; 1/ρ = 58.0 MS/m to the 3 digits quoted.
    expect(COPPER_RESISTIVITY_20C_OHM_M).toBe(1.7241e-8);
    expect(Math.abs(1 / COPPER_RESISTIVITY_20C_OHM_M / 1e6 - 58.0)).toBeLessThan(0.05);
    expect(COPPER_TEMP_COEFF_20C_PER_K).toBe(0.00393);
    expect(rel(copperResistivityOhmM(60), 1.7241e-8 * 1.1572)).toBeLessThan(1e-12);
  });
});

describe('wire length and DC resistance', () => {
  it('helix length N√((πD)² + p²): just above N·πD for a close-wound coil', () => {
    // Geometry of the developed helix. D = 0.1 m, l = 0.3 m, N = 1000: 314.159 m plus 0.14 mm.
    const len = helicalWireLengthM(0.1, 0.3, 1000);
    expect(len).toBeGreaterThan(1000 * Math.PI * 0.1);
    expect(rel(len, 1000 * Math.PI * 0.1 * Math.sqrt(1 + (0.0003 / (Math.PI * 0.1)) ** 2))).toBeLessThan(1e-15);
    // One turn with pitch equal to its circumference: √2 times the circumference.
    expect(rel(helicalWireLengthM(1 / Math.PI, 1, 1), Math.SQRT2)).toBeLessThan(1e-15);
  });

  it('1 m of 1 mm² copper is 17.241 mΩ at 20 °C, 15.7 % more at 60 °C', () => {
    // R = ρL/A with IEC 60028 values; d chosen so π d²/4 = 1 mm² exactly.
    const d = Math.sqrt(4e-6 / Math.PI);
    expect(rel(copperDcResistanceOhm(1, d), 17.241e-3)).toBeLessThan(1e-12);
    expect(rel(copperDcResistanceOhm(1, d, 60), 17.241e-3 * 1.1572)).toBeLessThan(1e-12);
  });
});

describe('skin effect', () => {
  it.each([
    [100e3, 0.209e-3],
    [200e3, 0.148e-3],
    [1e6, 66.1e-6],
  ])('copper skin depth at %d Hz is %d m', (f, want) => {
    // δ = √(ρ/(π f μ0)) with ρ20 [calc]; quoted to 3 digits: tolerance 0.25 %.
    expect(rel(skinDepthM(COPPER_RESISTIVITY_20C_OHM_M, f), want)).toBeLessThan(2.5e-3);
  });

  it('isolated round wire: the Bessel solution matches scipy from r/δ = 0.1 to 100', () => {
    // Fixture: Re[(w/2)J0(w)/J1(w)], w = (1 − j)r/δ, scipy complex jv (generate.py). Tolerance 1e-12.
    for (const r of ref.acResistanceRatio) expect(rel(roundWireAcResistanceRatio(r.rOverDelta, 1), r.ratio)).toBeLessThan(1e-12);
  });

  it('has the textbook limits: 1 + (r/δ)⁴/48 when thin, r/(2δ) + ¼ + 3δ/(32r) when thick', () => {
    // Low-frequency series and the large-argument asymptote of the same solution (Ramo, Whinnery &
    // Van Duzer §5.12 [recalled]). Next terms O((r/δ)⁸) and O((δ/r)²): tolerances 1e-10 and 1e-8.
    expect(Math.abs(roundWireAcResistanceRatio(0.1, 1) - (1 + 1e-4 / 48))).toBeLessThan(1e-10);
    const s = 500;
    expect(rel(roundWireAcResistanceRatio(s, 1), s / 2 + 0.25 + 3 / (32 * s))).toBeLessThan(1e-8);
  });

  it('rises monotonically and is continuous where the asymptote takes over (r/δ = 1000)', () => {
    let prev = 1;
    for (let e = -1; e <= 3.5; e += 0.05) {
      const v = roundWireAcResistanceRatio(10 ** e, 1);
      expect(v).toBeGreaterThanOrEqual(prev);
      prev = v;
    }
    // Across the switch the argument moves by 1e-13 relative (so does the value); the asymptote's own
    // error there is ~1e-13: tolerance 5e-13.
    expect(rel(roundWireAcResistanceRatio(1000, 1), roundWireAcResistanceRatio(1000 * (1 + 1e-13), 1))).toBeLessThan(5e-13);
  });
});
