import { describe, expect, it } from 'vitest';
import { carlsonRD, carlsonRF } from '../../../../shared/math/elliptic.ts';
import { MU0_H_PER_M } from '../../../../shared/physics/constants.ts';
import {
  couplingCoefficient,
  loopMutualInductanceH,
  turnPositionsM,
  windingMutualInductanceH,
} from '../../../../shared/physics/coil/mutual.ts';

const rel = (a: number, b: number): number => Math.abs(a / b - 1);

/**
 * Neumann's formula M = (μ0/4π)∮∮ dl1·dl2/|r1 − r2| integrated directly over two circles in 3-D
 * (loop 1 radius a in z = 0, loop 2 radius b in z = h), by the trapezoid rule in both angles:
 * for a smooth periodic integrand it converges geometrically (Trefethen & Weideman, SIAM Review
 * 56, 2014), so n = 256 per loop is far past convergence for loops not closer than ~a/4.
 */
function neumannH(a: number, b: number, h: number, n = 256): number {
  let sum = 0;
  const dphi = (2 * Math.PI) / n;
  for (let i = 0; i < n; i++) {
    const p = i * dphi;
    const r1 = [a * Math.cos(p), a * Math.sin(p), 0];
    const t1 = [-a * Math.sin(p), a * Math.cos(p), 0];
    for (let j = 0; j < n; j++) {
      const q = (j + 0.37) * dphi; // offset grid: no special alignment between the loops
      const r2 = [b * Math.cos(q), b * Math.sin(q), h];
      const t2 = [-b * Math.sin(q), b * Math.cos(q), 0];
      const dist = Math.hypot(r1[0] - r2[0], r1[1] - r2[1], r1[2] - r2[2]);
      sum += (t1[0] * t2[0] + t1[1] * t2[1] + t1[2] * t2[2]) / dist;
    }
  }
  return (MU0_H_PER_M / (4 * Math.PI)) * sum * dphi * dphi;
}

/** Maxwell's formula through Carlson's integrals: K = R_F(0, k′², 1), E = K − (k²/3) R_D(0, k′², 1). */
function carlsonMaxwellH(a: number, b: number, h: number): number {
  const s = (a + b) ** 2 + h * h;
  const m = (4 * a * b) / s;
  const mc = ((a - b) ** 2 + h * h) / s;
  const k = Math.sqrt(m);
  const K = carlsonRF(0, mc, 1);
  const E = K - (m / 3) * carlsonRD(0, mc, 1);
  return MU0_H_PER_M * Math.sqrt(a * b) * ((2 / k - k) * K - (2 / k) * E);
}

const TABLE: Array<[number, number, number, number]> = [
  [0.1, 0.1, 0.1, 4.940784631e-8],
  [0.1, 0.05, 0, 5.486179473e-8],
  [0.1, 0.05, 0.05, 3.493662317e-8],
  [1.0, 1.0, 0.5, 1.112610894e-6],
];

describe("Maxwell's formula for coaxial loops", () => {
  it.each(TABLE)('a %d m, b %d m, h %d m → %d H', (a, b, h, want) => {
    // Reference table (three routes agreeing to 10 digits, [calc] after Maxwell's Treatise §701 and
    // DLMF §19.34). All four entries match μ0 = 4π·1e-7 exactly, so rescale ours from the CODATA
    // 2018 μ0 (5.4e-10 higher). Tolerance 5e-10: half a unit in the 10th digit of 1.112…
    const scaled = (loopMutualInductanceH(a, b, h) * (4e-7 * Math.PI)) / MU0_H_PER_M;
    expect(rel(scaled, want)).toBeLessThan(5e-10);
  });

  it.each(TABLE)('matches direct integration of Neumann’s formula (a %d, b %d, h %d)', (a, b, h) => {
    // Independent route: a 3-D double line integral, no elliptic integrals. Tolerance 1e-12.
    expect(rel(loopMutualInductanceH(a, b, h), neumannH(a, b, h))).toBeLessThan(1e-12);
  });

  it('matches the Carlson-integral route (DLMF 19.25.1) for near, middle and far loops', () => {
    // Shares no code with the AGM route. Tolerance 1e-12: the textbook bracket (2/k − k)K − (2/k)E
    // cancels like 1/k² (k² = 0.04 for the last pair), which costs the Carlson route ~2 digits.
    for (const [a, b, h] of [[0.05, 0.0376, 0.0001], [0.05, 0.05, 0.0003], [0.1, 0.07, 0.2], [0.2, 0.05, 1]]) {
      expect(rel(loopMutualInductanceH(a, b, h), carlsonMaxwellH(a, b, h))).toBeLessThan(1e-12);
    }
  });

  it('tends to the dipole limit μ0 π a² b²/(2h³) with error ∝ 1/h², keeping precision far out', () => {
    // Far field of two coaxial loops (magnetic dipole coupling; any EM text). Expanding Maxwell's
    // formula with the series of K and E (DLMF 19.5.1–19.5.2), (1 − k²/2)K − E = (π/32)k⁴(1 + ¾k²),
    // gives M = dipole·(1 − (3/2)(a² + b²)/h² + O(h⁻⁴)); so (ratio − 1)·h² must stay at
    // −(3/2)(a² + b²) from h = 10 m to 10 km. At 10 km k² = 2e-10: the textbook bracket would have
    // lost 10 digits there. Tolerance 1 % of the correction (the O(h⁻⁴) term is 1e-4 of it at 10 m).
    const a = 0.1;
    const b = 0.05;
    const c = -(3 / 2) * (a * a + b * b);
    for (const h of [10, 100, 1000, 10000]) {
      const dipole = (MU0_H_PER_M * Math.PI * a * a * b * b) / (2 * h ** 3);
      const r = (loopMutualInductanceH(a, b, h) / dipole - 1) * h * h;
      expect(Math.abs(r / c - 1)).toBeLessThan(0.01);
    }
  });

  it('is symmetric in a, b and in ±h, and falls with separation', () => {
    expect(rel(loopMutualInductanceH(0.1, 0.03, 0.02), loopMutualInductanceH(0.03, 0.1, 0.02))).toBeLessThan(1e-15);
    expect(loopMutualInductanceH(0.1, 0.03, -0.02)).toBe(loopMutualInductanceH(0.1, 0.03, 0.02));
    expect(loopMutualInductanceH(0.1, 0.03, 0.03)).toBeLessThan(loopMutualInductanceH(0.1, 0.03, 0.02));
  });
});

describe('mutual inductance of windings and the coupling coefficient', () => {
  it('spreads turns evenly over the length, one at the middle of each segment', () => {
    expect(Array.from(turnPositionsM({ radiusM: 0.05, centreM: 0, lengthM: 0.01, turns: 2 }))).toEqual([-0.0025, 0.0025]);
    const z = turnPositionsM({ radiusM: 0.05, centreM: 0.15, lengthM: 0.3, turns: 1000 });
    expect(z[0]).toBeCloseTo(0.00015, 15);
    expect(z[999]).toBeCloseTo(0.29985, 15);
  });

  it('is the sum over turn pairs: one-turn windings reproduce the loop formula, and it is symmetric', () => {
    const one = windingMutualInductanceH({ radiusM: 0.05, centreM: 0, lengthM: 0.001, turns: 1 }, { radiusM: 0.04, centreM: 0.03, lengthM: 0.001, turns: 1 });
    expect(rel(one, loopMutualInductanceH(0.05, 0.04, 0.03))).toBeLessThan(1e-15);
    const w1 = { radiusM: 0.0376, centreM: 0.15, lengthM: 0.3, turns: 1000 };
    const w2 = { radiusM: 0.05, centreM: 0.02, lengthM: 0.012, turns: 4 };
    expect(rel(windingMutualInductanceH(w1, w2), windingMutualInductanceH(w2, w1))).toBeLessThan(1e-12);
  });

  it('k = M/√(L1 L2)', () => {
    expect(couplingCoefficient(1e-6, 4e-6, 1e-6)).toBeCloseTo(0.5, 15);
  });
});
