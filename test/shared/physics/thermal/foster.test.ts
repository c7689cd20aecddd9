import { describe, expect, it } from 'vitest';
import {
  fosterPeriodicPeakKPerW,
  fosterStep,
  fosterZthKPerW,
  totalResistanceKPerW,
  type FosterStage,
} from '../../../../shared/physics/thermal/foster.ts';

const FOUR: FosterStage[] = [
  { rKPerW: 0.04, tauS: 3e-5 },
  { rKPerW: 0.12, tauS: 4e-4 },
  { rKPerW: 0.3, tauS: 4e-3 },
  { rKPerW: 0.24, tauS: 3e-2 },
];

describe('fosterZthKPerW', () => {
  it('is the step response Σ Rᵢ(1 − e^(−t/τᵢ))', () => {
    // NXP AN11261 / Infineon AN2008-03, evaluated here term by term with Math.exp.
    // Tolerance 1e-14 relative: expm1 vs 1 − exp differ only by round-off at these t.
    for (const t of [1e-5, 1e-4, 1e-3, 0.01, 0.1, 1]) {
      const direct = FOUR.reduce((z, s) => z + s.rKPerW * (1 - Math.exp(-t / s.tauS)), 0);
      expect(Math.abs(fosterZthKPerW(FOUR, t) / direct - 1)).toBeLessThan(1e-13);
    }
  });

  it('starts at 0, rises monotonically and settles at ΣR', () => {
    // Limits of the formula above (NXP AN11261): Zth(0) = 0, Zth(∞) = ΣRᵢ = 0.70 K/W.
    expect(fosterZthKPerW(FOUR, 0)).toBe(0);
    expect(Math.abs(fosterZthKPerW(FOUR, 100) - 0.7)).toBeLessThan(1e-12);
    expect(Math.abs(totalResistanceKPerW(FOUR) - 0.7)).toBeLessThan(1e-15);
    let prev = 0;
    for (let e = -7; e <= -0.5; e += 0.25) {
      const z = fosterZthKPerW(FOUR, 10 ** e);
      expect(z).toBeGreaterThan(prev);
      prev = z;
    }
  });

  it('keeps full relative precision at very short times (≈ t·Σ Rᵢ/τᵢ)', () => {
    // First-order Taylor term of the formula; at t = 1e-12 s the second-order term is 1e-7 relative.
    const slope = FOUR.reduce((a, s) => a + s.rKPerW / s.tauS, 0);
    expect(Math.abs(fosterZthKPerW(FOUR, 1e-12) / (1e-12 * slope) - 1)).toBeLessThan(1e-6);
  });
});

describe('fosterStep', () => {
  it('reproduces the single-RC reference: 63.2121 K after 10 ms on, 23.2544 K after 10 ms off', () => {
    // One Foster RC, Zth(t) = R(1 − e^(−t/τ)) (NXP AN11261 "Using RC Thermal Models"), R = 2 K/W,
    // τ = 10 ms, P = 50 W [calc]: 2·50·(1 − e⁻¹) and that times e⁻¹.
    // Tolerance 5e-5 K: the reference is given to 4 decimals.
    const st = [{ rKPerW: 2, tauS: 0.01 }];
    const th = new Float64Array(1);
    expect(Math.abs(fosterStep(st, th, 50, 0.01) - 63.2121)).toBeLessThan(5e-5);
    expect(Math.abs(fosterStep(st, th, 0, 0.01) - 23.2544)).toBeLessThan(5e-5);
  });

  it('is exact for any step size: one 10 ms step equals ten 1 ms steps at constant power', () => {
    // Zero-order-hold exactness (NXP AN11261). Tolerance 1e-12 relative (round-off of ten updates).
    const a = new Float64Array(4);
    const b = new Float64Array(4);
    const one = fosterStep(FOUR, a, 7, 0.01);
    let ten = 0;
    for (let i = 0; i < 10; i++) ten = fosterStep(FOUR, b, 7, 0.001);
    expect(Math.abs(ten / one - 1)).toBeLessThan(1e-12);
    expect(Math.abs(one - 7 * fosterZthKPerW(FOUR, 0.01))).toBeLessThan(1e-12);
  });
});

describe('fosterPeriodicPeakKPerW', () => {
  it('matches the exact steady peak of a long pulse train stepped pulse by pulse', () => {
    // Superposed single-pulse responses of the Foster model (NXP AN11261), a geometric series per cell
    // [calc]: ΔT/P = Σ Rᵢ(1 − e^(−tp/τᵢ))/(1 − e^(−T/τᵢ)). Foster [(1 K/W, 1 s),
    // (0.5 K/W, 10 ms)], tp = 2 ms, T = 10 ms → 0.344182662 K/W (numpy, float64).
    // After 3000 periods (30 s = 30 τ_max) the transient is e^-30 ≈ 1e-13 of ΣR: tolerance 1e-9.
    const st = [
      { rKPerW: 1, tauS: 1 },
      { rKPerW: 0.5, tauS: 0.01 },
    ];
    const formula = fosterPeriodicPeakKPerW(st, 0.002, 0.01);
    expect(Math.abs(formula - 0.34418266208255077)).toBeLessThan(1e-12);
    const th = new Float64Array(2);
    let peak = 0;
    for (let i = 0; i < 3000; i++) {
      peak = fosterStep(st, th, 1, 0.002);
      fosterStep(st, th, 0, 0.008);
    }
    expect(Math.abs(peak - formula)).toBeLessThan(1e-9);
  });

  it('tends to ΣR for continuous power and to Zth(tp) for rare pulses', () => {
    // Limits of the same formula: tp = T is DC; T ≫ τ_max leaves each pulse alone.
    expect(fosterPeriodicPeakKPerW(FOUR, 1, 1)).toBeCloseTo(0.7, 12);
    expect(Math.abs(fosterPeriodicPeakKPerW(FOUR, 1e-3, 100) - fosterZthKPerW(FOUR, 1e-3))).toBeLessThan(1e-12);
  });
});
