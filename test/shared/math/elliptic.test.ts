import { describe, expect, it } from 'vitest';
import { carlsonRD, carlsonRF, ellipticE, ellipticK, ellipticKE } from '../../../shared/math/elliptic.ts';

const rel = (a: number, b: number): number => Math.abs(a / b - 1);

describe('complete elliptic integrals by the AGM', () => {
  it('K(½) is the lemniscate value Γ(¼)²/(4√π)', () => {
    // The lemniscatic case K(1/√2) = Γ(1/4)²/(4√π), Γ(1/4) = 3.6256099082219083 [recalled]; the
    // same number, 1.8540746773014, is Carlson's 1995 test value R_F(0.5, 1, 0) [sec], which makes
    // the recalled constant trustworthy. Tolerance 1e-15: the AGM is accurate to rounding.
    const gamma14 = 3.6256099082219083;
    expect(rel(ellipticK(0.5), (gamma14 * gamma14) / (4 * Math.sqrt(Math.PI)))).toBeLessThan(1e-15);
  });

  it('end points: K(0) = E(0) = π/2, E(1) = 1, K(1) = ∞ (DLMF 19.6.1)', () => {
    expect(rel(ellipticK(0), Math.PI / 2)).toBeLessThan(1e-16);
    expect(rel(ellipticE(0), Math.PI / 2)).toBeLessThan(1e-16);
    expect(ellipticE(1)).toBe(1);
    expect(ellipticK(1)).toBe(Infinity);
  });

  it("satisfies Legendre's relation E K′ + E′ K − K K′ = π/2 across m (DLMF 19.7.1)", () => {
    // An identity, so it checks K and E against each other at every parameter, including near
    // m = 1 where mc is passed exactly. Tolerance 1e-14: three products of O(1…20) numbers.
    for (const mc of [1e-12, 1e-6, 0.01, 0.1, 0.3, 0.5, 0.7, 0.9, 0.99]) {
      const m = 1 - mc;
      const a = ellipticKE(m, mc);
      const b = ellipticKE(mc, m);
      expect(Math.abs(a.E * b.K + b.E * a.K - a.K * b.K - Math.PI / 2)).toBeLessThan(1e-14 * a.K);
    }
  });

  it('agrees with the independent Carlson route K = R_F(0, mc, 1), E = R_F − (m/3) R_D (DLMF 19.25.1)', () => {
    // Two algorithms sharing no code: K to 2e-15 relative (a few ulp each); E to 1e-14, because
    // both routes form E as a difference of O(K) terms and K ≈ ln(4/√mc) reaches 12 at mc = 1e-10.
    for (const mc of [1e-10, 1e-4, 0.05, 0.25, 0.5, 0.75, 0.95, 1]) {
      const m = 1 - mc;
      const { K, E } = ellipticKE(m, mc);
      const rf = carlsonRF(0, mc, 1);
      expect(rel(K, rf)).toBeLessThan(2e-15);
      expect(rel(E, rf - (m / 3) * carlsonRD(0, mc, 1))).toBeLessThan(1e-14);
    }
  });

  it('keeps K − E and (1 − m/2)K − E accurate for small m, where the subtraction cancels', () => {
    // K − E = (m/3)·R_D(0, 1 − m, 1) has no cancellation (DLMF 19.25.1): tolerance 4e-15.
    for (const m of [1e-12, 1e-8, 1e-4, 0.01]) {
      expect(rel(ellipticKE(m).kMinusE, (m / 3) * carlsonRD(0, 1 - m, 1))).toBeLessThan(4e-15);
    }
    // (1 − m/2)K − E = (π/32)·m²·(1 + (3/4)m + …) from the series of K and E (DLMF 19.5.1–19.5.2);
    // at m = 1e-6 the neglected terms are O(m²), so 1e-11 relative.
    const m = 1e-6;
    expect(rel(ellipticKE(m).kMinusEMinusHalfMK, (Math.PI / 32) * m * m * (1 + 0.75 * m))).toBeLessThan(1e-11);
  });
});

describe("Carlson's symmetric integrals", () => {
  // Test values from B. C. Carlson, Numer. Algorithms 10 (1995), as reproduced in the test suites
  // of two public elliptic-integral libraries [sec]; given to 14 significant digits, so 5e-14.
  it.each([
    [1, 2, 0, 1.3110287771461],
    [0.5, 1, 0, 1.8540746773014],
    [2, 3, 4, 0.58408284167715],
  ])('R_F(%d, %d, %d) = %d', (x, y, z, want) => {
    expect(rel(carlsonRF(x, y, z), want)).toBeLessThan(5e-14);
  });

  it.each([
    [0, 2, 1, 1.7972103521034],
    [2, 3, 4, 0.16510527294261],
  ])('R_D(%d, %d, %d) = %d', (x, y, z, want) => {
    expect(rel(carlsonRD(x, y, z), want)).toBeLessThan(5e-14);
  });

  it('are homogeneous: R_F(λx) = λ^{-1/2} R_F(x), R_D(λx) = λ^{-3/2} R_D(x) (DLMF 19.16.1, 19.16.5 with t → λt)', () => {
    // Follows from the integral definitions; tolerance 4e-15.
    const lam = 7.3;
    expect(rel(carlsonRF(lam * 0.2, lam * 1.1, lam * 3), carlsonRF(0.2, 1.1, 3) / Math.sqrt(lam))).toBeLessThan(4e-15);
    expect(rel(carlsonRD(lam * 0.2, lam * 1.1, lam * 3), carlsonRD(0.2, 1.1, 3) / lam ** 1.5)).toBeLessThan(4e-15);
  });
});
