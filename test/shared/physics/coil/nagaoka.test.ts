import { describe, expect, it } from 'vitest';
import { lundinNagaokaCoefficient, nagaokaCoefficient } from '../../../../shared/physics/coil/nagaoka.ts';
import ref from '../../../fixtures/coil/reference.json' with { type: 'json' };

describe("Nagaoka's coefficient (exact elliptic form)", () => {
  it.each([
    [0.1, 0.958807],
    [0.2, 0.920093],
    [0.5, 0.818136],
    [1, 0.688423],
    [2, 0.52551],
    [5, 0.319825],
    [10, 0.203324],
  ])('D/l = %d → %d', (x, want) => {
    // Nagaoka 1909's formula evaluated in float64 with scipy, quoted to 6 decimals: tolerance 6e-7.
    expect(Math.abs(nagaokaCoefficient(x) - want)).toBeLessThan(6e-7);
  });

  it("matches Grover's tabulated values to their 4 digits", () => {
    // Grover, Inductance Calculations (1946), table of K for single-layer coils [recalled]: D/l = 1 → 0.6884, 2 → 0.5255,
    // 0.5 → 0.8181. Tolerance: half a unit in the 4th decimal.
    expect(Math.abs(nagaokaCoefficient(1) - 0.6884)).toBeLessThan(5e-5);
    expect(Math.abs(nagaokaCoefficient(2) - 0.5255)).toBeLessThan(5e-5);
    expect(Math.abs(nagaokaCoefficient(0.5) - 0.8181)).toBeLessThan(5e-5);
  });

  it('matches the textbook form evaluated with scipy over D/l 0.05…50', () => {
    // test/fixtures/coil/generate.py, scipy ellipk/ellipe: an independent implementation of the same
    // formula. Tolerance 1e-12: the textbook K − E subtraction costs scipy a few digits at 0.05.
    for (const r of ref.nagaoka) expect(Math.abs(nagaokaCoefficient(r.dOverL) / r.K - 1)).toBeLessThan(1e-12);
  });

  it('tends to 1 − 4x/(3π) for long coils and to (2/(πx))(ln 4x − ½) for short ones', () => {
    // Leading terms of the long- and short-coil expansions (Lundin 1985 builds his formula on them;
    // A(0) = 1, B(0) = 0). Next terms are O(x²) and O(1/x²·ln x): tolerances 1e-6 at x = 1e-3
    // and 1e-5 at x = 1e3.
    const x = 1e-3;
    expect(Math.abs(nagaokaCoefficient(x) - (1 - (4 * x) / (3 * Math.PI)))).toBeLessThan(1e-6);
    const y = 1e3;
    expect(Math.abs(nagaokaCoefficient(y) / ((2 / (Math.PI * y)) * (Math.log(4 * y) - 0.5)) - 1)).toBeLessThan(1e-5);
  });

  it('falls monotonically with D/l (a shorter sheet loses more flux at its ends)', () => {
    let prev = 1;
    for (let e = -3; e <= 3; e += 0.1) {
      const k = nagaokaCoefficient(10 ** e);
      expect(k).toBeLessThan(prev);
      prev = k;
    }
  });

  it('rejects a non-positive shape', () => {
    expect(() => nagaokaCoefficient(0)).toThrow(RangeError);
    expect(() => nagaokaCoefficient(Number.NaN)).toThrow(/diameterOverLength/);
  });
});

describe("Lundin's approximation", () => {
  it('stays within 3 ppm of the exact coefficient over D/l 1e-3…1e3, with its worst near 2.5 ppm', () => {
    // Lundin, Proc. IEEE 73(9), 1985 claims ~3 ppm [sec]; the maximum over this range computed with
    // scipy is 2.5 ppm [calc]. Asserting a lower bound too shows the two routes are really distinct.
    let worst = 0;
    for (let e = -3; e <= 3; e += 0.005) {
      const x = 10 ** e;
      worst = Math.max(worst, Math.abs(lundinNagaokaCoefficient(x) / nagaokaCoefficient(x) - 1));
    }
    expect(worst).toBeLessThan(3e-6);
    expect(worst).toBeGreaterThan(2e-6);
  });

  it('is continuous where its two branches meet at D/l = 1', () => {
    // Both branches approximate the same function; the jump is within the 3 ppm error budget.
    expect(Math.abs(lundinNagaokaCoefficient(1) - lundinNagaokaCoefficient(1 + 1e-12))).toBeLessThan(3e-6);
  });
});
