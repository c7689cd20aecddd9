import { describe, expect, it } from 'vitest';
import { fosterToCauer, fosterToCauerPolynomial, mergeEqualTaus } from '../../../../shared/physics/thermal/cauer.ts';

// The Foster → Cauer syntheses at their edges: the input checks, the merge of equal time
// constants at both ends of the τ range, and five stages over four decades.

describe('Foster → Cauer: input checks', () => {
  it('rejects an empty list and a stage without finite positive R and τ, naming the function and stage', () => {
    for (const [conv, fn] of [
      [fosterToCauer, 'fosterToCauer'],
      [fosterToCauerPolynomial, 'fosterToCauerPolynomial'],
    ] as const) {
      expect(() => conv([])).toThrow(new RangeError(`${fn}: the Foster list is empty`));
      for (const bad of [
        { rKPerW: 0, tauS: 1 },
        { rKPerW: -1, tauS: 1 },
        { rKPerW: Infinity, tauS: 1 },
        { rKPerW: Number.NaN, tauS: 1 },
        { rKPerW: 1, tauS: 0 },
        { rKPerW: 1, tauS: -0.1 },
        { rKPerW: 1, tauS: Infinity },
        { rKPerW: 1, tauS: Number.NaN },
      ]) {
        expect(() => conv([{ rKPerW: 1, tauS: 0.01 }, bad])).toThrow(
          new RangeError(`${fn}: stage 1 needs finite rKPerW > 0 and tauS > 0, got ${bad.rKPerW} K/W, ${bad.tauS} s`),
        );
      }
    }
  });
});

describe('mergeEqualTaus', () => {
  it('merges time constants that agree to 1e-12 relative, at a slow and at a fast τ alike', () => {
    // 10 s and 10 s + 1e-12 s differ by 1e-13 relative: one cell of R = 3 K/W.
    const slow = mergeEqualTaus([
      { rKPerW: 1, tauS: 10 },
      { rKPerW: 2, tauS: 10 + 1e-12 },
    ]);
    expect(slow).toHaveLength(1);
    expect(slow[0].rKPerW).toBe(3);
    // 1 ms and 1 ms + 1e-12 s differ by 1e-9 relative: two cells.
    expect(
      mergeEqualTaus([
        { rKPerW: 1, tauS: 1e-3 },
        { rKPerW: 2, tauS: 1e-3 + 1e-12 },
      ]),
    ).toHaveLength(2);
  });
});

describe('Foster → Cauer over four decades', () => {
  it('gives the same ladder by both syntheses for five stages from 1 µs to 10 ms', () => {
    // Two independent methods (Lanczos on the poles; continued fraction of the admittance): they
    // must agree. Tolerance 1e-10 relative: float64 round-off amplified by the 5-stage conditioning.
    const f = [1e-6, 1e-5, 1e-4, 1e-3, 1e-2].map((tauS, i) => ({ rKPerW: 0.1 * (i + 1), tauS }));
    const a = fosterToCauer(f);
    const b = fosterToCauerPolynomial(f);
    expect(a).toHaveLength(5);
    expect(b).toHaveLength(5);
    a.forEach((s, j) => {
      expect(Math.abs(s.rKPerW / b[j].rKPerW - 1)).toBeLessThan(1e-10);
      expect(Math.abs(s.cJPerK / b[j].cJPerK - 1)).toBeLessThan(1e-10);
    });
    // Both keep ΣR = 1.5 K/W (Zth(∞) of the Foster set) and C₁ = 1/Σ(1/Cᵢ) = 1/Σ(Rᵢ/τᵢ) (the
    // initial slope of Zth: dZ/dt at 0 = ΣRᵢ/τᵢ = 1/C₁).
    const c1 = 1 / f.reduce((acc, s) => acc + s.rKPerW / s.tauS, 0);
    for (const ladder of [a, b]) {
      expect(Math.abs(ladder.reduce((acc, s) => acc + s.rKPerW, 0) - 1.5)).toBeLessThan(1e-12);
      expect(Math.abs(ladder[0].cJPerK / c1 - 1)).toBeLessThan(1e-12);
    }
  });
});
