import { describe, expect, it } from 'vitest';
import { ellipticKE } from '../../../shared/math/elliptic.ts';
import { toroidalP, toroidalQ } from '../../../shared/math/legendre-toroidal.ts';
import ref from '../../fixtures/coil/reference.json' with { type: 'json' };

const rel = (a: number, b: number): number => Math.abs(a / b - 1);

describe('toroidal functions P_{n−½}, Q_{n−½}', () => {
  it('match mpmath legenp/legenq (type 3, 30 digits) for x from 1.001 to 1e4, n = 0…5', () => {
    // Fixture from test/fixtures/coil/generate.py (mpmath, an independent hypergeometric route).
    // Tolerance 1e-14: a few ulp accumulated over five recurrence steps.
    for (const r of ref.toroidal) {
      const P = toroidalP(r.x, 6);
      const Q = toroidalQ(r.x, 6);
      for (let n = 0; n < 6; n++) {
        expect(rel(P[n], r.P[n])).toBeLessThan(1e-14);
        expect(rel(Q[n], r.Q[n])).toBeLessThan(1e-14);
      }
    }
  });

  it("Miller's Q_{½} matches its own closed form Q_{½}(x) = x k K − √(2(x+1)) E, k² = 2/(x+1)", () => {
    // Closed form from the elliptic representation of Q_{±½} [recalled], confirmed against mpmath at x = 2 to
    // 30 digits while writing generate.py. It cancels for large
    // x, so only x ≤ 10 and tolerance 1e-12.
    for (const x of [1.05, 1.5, 2, 4, 10]) {
      const m = 2 / (x + 1);
      const { K, E } = ellipticKE(m, (x - 1) / (x + 1));
      const closed = x * Math.sqrt(m) * K - Math.sqrt(2 * (x + 1)) * E;
      expect(rel(toroidalQ(x, 2)[1], closed)).toBeLessThan(1e-12);
    }
  });

  it('satisfy the Casoratian P_ν Q_{ν+1} − P_{ν+1} Q_ν = −1/(ν+1)', () => {
    // Wronskian-type identity of Legendre functions for x > 1 (Hobson 1931 [recalled]; checked
    // with mpmath at ν = ½, x = 2 to 30 digits). Ties the forward P and backward Q recurrences
    // together at every degree. Tolerance 1e-12 relative to 1/(ν+1).
    for (const x of [1.01, 1.3, 3, 30]) {
      const N = 12;
      const P = toroidalP(x, N);
      const Q = toroidalQ(x, N);
      for (let n = 0; n + 1 < N; n++) {
        const nu = n - 0.5;
        const cas = P[n] * Q[n + 1] - P[n + 1] * Q[n];
        expect(Math.abs(cas * (nu + 1) + 1)).toBeLessThan(1e-12);
      }
    }
  });

  it('P grows and Q decays like e^{±nη} (dominant and minimal solutions)', () => {
    // Large-degree behaviour P_{n−½} ~ e^{nη}/√(…), Q_{n−½} ~ e^{−nη}·√(…) (DLMF 14.15 [recalled]):
    // the ratio of successive terms tends to e^{±η}. Tolerance 2 % at n = 40.
    const x = 1.5;
    const eta = Math.acosh(x);
    const P = toroidalP(x, 42);
    const Q = toroidalQ(x, 42);
    expect(rel(P[41] / P[40], Math.exp(eta))).toBeLessThan(0.02);
    expect(rel(Q[41] / Q[40], Math.exp(-eta))).toBeLessThan(0.02);
  });
});
