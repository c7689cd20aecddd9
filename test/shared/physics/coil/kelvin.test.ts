/**
 * R_ac, Q and the three demo coils against values the code did not make:
 * test/fixtures/coil/generate_kelvin.py (committed; numpy/scipy/mpmath, not needed to run the tests)
 * computes the round wire's skin effect by Kelvin functions (scipy.special ber/bei and their
 * derivatives) where the code uses a continued fraction of complex Bessel J, and every figure of the
 * demo coils by the textbook routes (scipy's elliptic integrals, the torus series in mpmath,
 * Medhurst's tables interpolated by hand).
 */
import { describe, expect, it } from 'vitest';
import { DEMO_COILS } from '../../../../shared/demo/coils.ts';
import { analyzeCoil } from '../../../../shared/physics/coil/analyze.ts';
import { roundWireAcResistanceRatio } from '../../../../shared/physics/coil/wire.ts';
import ref from '../../../fixtures/coil/kelvin.json' with { type: 'json' };

const rel = (a: number, b: number): number => Math.abs(a / b - 1);

describe('round-wire AC resistance against Kelvin functions', () => {
  it.each(ref.acResistanceRatioKelvin)('r/δ = $rOverDelta', ({ rOverDelta, ratio }) => {
    // Two exact routes to the same Bessel solution: agreement to 1e-10 (scipy's Kelvin functions
    // carry ~1e-14; the continued fraction is summed to machine precision).
    expect(rel(roundWireAcResistanceRatio(rOverDelta, 1), ratio)).toBeLessThan(1e-10);
  });
});

describe('demo coils against independent reference values', () => {
  it.each(Object.keys(ref.demo) as (keyof typeof ref.demo)[])('%s', (name) => {
    const d = ref.demo[name];
    const r = analyzeCoil(DEMO_COILS[name]);
    const s = r.secondary;
    // Textbook forms lose a few digits to cancellation: 1e-9 on the magnetics; geometry and the
    // DC resistance to 1e-12.
    expect(rel(s.inductanceH, d.inductanceH)).toBeLessThan(1e-9);
    expect(rel(s.selfCapacitanceF, d.selfCapacitanceF)).toBeLessThan(1e-9);
    expect(rel(r.topLoad.capacitanceF, d.topLoadCapacitanceF)).toBeLessThan(1e-9);
    expect(rel(r.resonanceHz, d.resonanceHz)).toBeLessThan(1e-9);
    expect(rel(s.wireLengthM, d.wireLengthM)).toBeLessThan(1e-12);
    expect(rel(s.dcResistanceOhm, d.dcResistanceOhm)).toBeLessThan(1e-12);
    expect(rel(s.dcResistanceHotOhm, d.dcResistanceHotOhm)).toBeLessThan(1e-12);
    expect(rel(s.skinDepthM, d.skinDepthM)).toBeLessThan(1e-9);
    expect(rel(s.acToDcRatio, d.acToDcRatio)).toBeLessThan(1e-9);
    expect(rel(s.proximityFactor, d.proximityFactor)).toBeLessThan(1e-12);
    expect(rel(s.acResistanceOhm, d.acResistanceOhm)).toBeLessThan(1e-9);
    expect(rel(r.qualityFactorSkinOnly, d.qualityFactorSkinOnly)).toBeLessThan(1e-9);
    expect(rel(r.qualityFactorComputed, d.qualityFactor)).toBeLessThan(1e-9);
    expect(rel(r.primary.inductanceH, d.primaryInductanceH)).toBeLessThan(1e-9);
    expect(rel(r.mutualInductanceH, d.mutualInductanceH)).toBeLessThan(1e-9);
    expect(rel(r.couplingK, d.couplingK)).toBeLessThan(1e-9);
  });
});
