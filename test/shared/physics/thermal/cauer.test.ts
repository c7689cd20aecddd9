import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { fosterToCauer, fosterToCauerPolynomial, mergeEqualTaus } from '../../../../shared/physics/thermal/cauer.ts';
import { fosterZthKPerW, type FosterStage } from '../../../../shared/physics/thermal/foster.ts';
import { ThermalNetwork } from '../../../../shared/physics/thermal/network.ts';
import reference from '../../../fixtures/thermal/reference.json';

/** Junction–case Zth(t) of a Cauer ladder with the case held at ambient (no external elements). */
const ladderZth = (cauer: ReturnType<typeof fosterToCauer>, t: number) =>
  ThermalNetwork.fromCauer(cauer, { caseToSinkKPerW: 0, sinkToAmbientKPerW: 0, sinkHeatCapacityJPerK: 0 }).zthKPerW(t);

describe('fosterToCauer', () => {
  it('converts a hand-checkable two-cell case', () => {
    // Cauer I continued-fraction synthesis of Z(s) (W. Cauer, 1926; the Foster-to-Cauer conversion of
    // Infineon AN2008-03 [recalled]) worked by hand [calc]: Foster R = [1, 1] K/W, C = [1, 0.1] J/K → Cauer R = [1.1980198, 0.8019802] K/W,
    // C = [0.0909091, 1.1448934] J/K. Tolerance 5e-8: the reference is rounded to 7 decimals.
    const f = [
      { rKPerW: 1, tauS: 1 },
      { rKPerW: 1, tauS: 0.1 },
    ];
    for (const conv of [fosterToCauer, fosterToCauerPolynomial]) {
      const c = conv(f);
      expect(c).toHaveLength(2);
      expect(Math.abs(c[0].rKPerW - 1.1980198)).toBeLessThan(5e-8);
      expect(Math.abs(c[1].rKPerW - 0.8019802)).toBeLessThan(5e-8);
      expect(Math.abs(c[0].cJPerK - 0.0909091)).toBeLessThan(5e-8);
      expect(Math.abs(c[1].cJPerK - 1.1448934)).toBeLessThan(5e-8);
    }
  });

  it('matches an exact rational continued-fraction synthesis (4 and 6 cells)', () => {
    // test/fixtures/thermal/make_reference.py: Cauer I expansion in Python Fractions (no rounding).
    // Tolerances: 1e-12 relative for 4 cells over 3 decades of τ; 1e-9 for 6 cells over 6 decades,
    // where the problem itself is less well conditioned (float64 input rounding is amplified).
    const cases: [keyof typeof reference.cauer, number][] = [
      ['hand', 1e-13],
      ['four', 1e-12],
      ['six', 1e-9],
    ];
    for (const [name, tol] of cases) {
      const ref = reference.cauer[name];
      const got = fosterToCauer(ref.foster);
      expect(got).toHaveLength(ref.cauer.length);
      got.forEach((s, j) => {
        expect(Math.abs(s.rKPerW / ref.cauer[j].rKPerW - 1)).toBeLessThan(tol);
        expect(Math.abs(s.cJPerK / ref.cauer[j].cJPerK - 1)).toBeLessThan(tol);
      });
    }
    // The float64 polynomial route is good to ~1e-10 at 4 cells (its stated range).
    const poly = fosterToCauerPolynomial(reference.cauer.four.foster);
    poly.forEach((s, j) => expect(Math.abs(s.rKPerW / reference.cauer.four.cauer[j].rKPerW - 1)).toBeLessThan(1e-10));
  });

  it('preserves ΣR and Zth(t) for random Foster sets of 1–10 cells', () => {
    // Both follow from Z(s) being preserved (Infineon AN2008-03): ΣR = Z(0), Zth(t) = inverse
    // Laplace of Z(s)/s. τ are drawn over 7 decades, at least 0.25 decade apart. Tolerance 1e-9 of
    // ΣR: the stiffest sets (10 cells) lose ~6 digits to conditioning, far below datasheet accuracy.
    const stages = fc.integer({ min: 1, max: 10 }).chain((n) =>
      fc.tuple(
        fc.array(fc.double({ min: 0.005, max: 2, noNaN: true }), { minLength: n, maxLength: n }),
        fc.array(fc.double({ min: 0, max: 0.45, noNaN: true }), { minLength: n, maxLength: n }),
        fc.double({ min: -6, max: -1, noNaN: true }),
      ),
    );
    fc.assert(
      fc.property(stages, ([rs, gaps, start]) => {
        let logTau = start;
        const foster: FosterStage[] = rs.map((r, i) => {
          logTau += 0.25 + gaps[i];
          return { rKPerW: r, tauS: 10 ** logTau };
        });
        const rSum = rs.reduce((a, b) => a + b, 0);
        const cauer = fosterToCauer(foster);
        expect(cauer).toHaveLength(foster.length);
        for (const s of cauer) {
          expect(s.rKPerW).toBeGreaterThan(0);
          expect(s.cJPerK).toBeGreaterThan(0);
        }
        expect(Math.abs(cauer.reduce((a, s) => a + s.rKPerW, 0) - rSum)).toBeLessThan(1e-9 * rSum);
        for (let e = -8; e <= 3; e += 0.5) {
          const t = 10 ** e;
          expect(Math.abs(ladderZth(cauer, t) - fosterZthKPerW(foster, t))).toBeLessThan(1e-9 * rSum);
        }
      }),
      { numRuns: 50 },
    );
  });

  it('keeps C₁ = 1/Σ(1/Cᵢ): the junction node sees all Foster capacities in series at t → 0', () => {
    // High-frequency limit of Y(s) (first step of the Cauer I expansion).
    const f = reference.cauer.four.foster;
    const c1 = 1 / f.reduce((a, s) => a + s.rKPerW / s.tauS, 0);
    expect(Math.abs(fosterToCauer(f)[0].cJPerK / c1 - 1)).toBeLessThan(1e-13);
  });

  it('merges cells of equal τ and rejects an empty list', () => {
    const merged = mergeEqualTaus([
      { rKPerW: 1, tauS: 0.1 },
      { rKPerW: 0.5, tauS: 0.01 },
      { rKPerW: 2, tauS: 0.1 },
    ]);
    expect(merged).toHaveLength(2);
    expect(merged[0]).toEqual({ rKPerW: 0.5, tauS: 0.01 });
    expect(merged[1].rKPerW).toBeCloseTo(3, 14);
    expect(merged[1].tauS).toBeCloseTo(0.1, 14);
    expect(fosterToCauer([{ rKPerW: 1, tauS: 0.1 }, { rKPerW: 2, tauS: 0.1 }])).toHaveLength(1);
    expect(() => fosterToCauer([])).toThrow(RangeError);
    expect(() => fosterToCauer([{ rKPerW: -1, tauS: 1 }])).toThrow(RangeError);
  });
});
