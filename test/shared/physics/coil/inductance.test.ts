import { describe, expect, it } from 'vitest';
import { MU0_H_PER_M } from '../../../../shared/physics/constants.ts';
import {
  currentSheetInductanceH,
  loopSelfInductanceH,
  turnSumInductanceH,
  wheelerInductanceH,
} from '../../../../shared/physics/coil/inductance.ts';
import { loopMutualInductanceH } from '../../../../shared/physics/coil/mutual.ts';

const rel = (a: number, b: number): number => Math.abs(a / b - 1);

describe('current-sheet inductance', () => {
  it('D = 100 mm, l = 300 mm, N = 1000 → 28.695 mH', () => {
    // Nagaoka's current sheet, float64 with scipy [calc], quoted to 5 digits: tolerance 2e-5.
    expect(rel(currentSheetInductanceH(0.1, 0.3, 1000), 28.695e-3)).toBeLessThan(2e-5);
  });

  it('Lundin and exact methods agree to 3 ppm; L scales as N² and as size at fixed shape', () => {
    const L = currentSheetInductanceH(0.08, 0.25, 700);
    expect(rel(currentSheetInductanceH(0.08, 0.25, 700, 'lundin'), L)).toBeLessThan(3e-6);
    // Dimensional analysis: L = μ0·N²·(length)·f(shape): exact up to rounding.
    expect(rel(currentSheetInductanceH(0.08, 0.25, 1400), 4 * L)).toBeLessThan(1e-14);
    expect(rel(currentSheetInductanceH(0.16, 0.5, 700), 2 * L)).toBeLessThan(1e-14);
  });

  it('approaches the infinite solenoid μ0 N² A / l for a very long coil', () => {
    // K_N → 1 as D/l → 0 (first correction −4D/(3πl)): D/l = 1e-3 → within 5e-4.
    const D = 0.01;
    const l = 10;
    const ideal = (MU0_H_PER_M * 1000 * 1000 * Math.PI * D * D) / (4 * l);
    expect(rel(currentSheetInductanceH(D, l, 1000), ideal)).toBeLessThan(5e-4);
  });
});

describe("Wheeler's formula", () => {
  it('D = 100 mm, l = 300 mm, N = 1000 → 28.529 mH', () => {
    // Wheeler, Proc. IRE 16(10), 1928, in SI [calc]: tolerance 2e-5.
    expect(rel(wheelerInductanceH(0.1, 0.3, 1000), 28.529e-3)).toBeLessThan(2e-5);
  });

  it.each([
    [0.2, -4.06],
    [0.4, -0.54],
    [1, -0.1],
    [2, -0.49],
    [10, -0.47],
  ])('at l/D = %d its error against the exact sheet is %d %%', (lOverD, errPct) => {
    // [calc] errors (float64, scipy) quoted to 0.01 %: tolerance 0.006 percentage points.
    const err = (wheelerInductanceH(0.1, 0.1 * lOverD, 500) / currentSheetInductanceH(0.1, 0.1 * lOverD, 500) - 1) * 100;
    expect(Math.abs(err - errPct)).toBeLessThan(0.006);
  });

  it("keeps Wheeler's stated 1 % for l > 0.8 r, and breaks it for short coils", () => {
    // Wheeler 1928 claims about 1 % accuracy for l > 0.8 r [recalled]; l/D from 0.4 to 100.
    for (let e = Math.log10(0.4); e <= 2; e += 0.02) {
      const lOverD = 10 ** e;
      expect(rel(wheelerInductanceH(0.1, 0.1 * lOverD, 300), currentSheetInductanceH(0.1, 0.1 * lOverD, 300))).toBeLessThan(0.01);
    }
    expect(rel(wheelerInductanceH(0.1, 0.02, 300), currentSheetInductanceH(0.1, 0.02, 300))).toBeGreaterThan(0.03);
  });
});

describe('turn-by-turn sum of round-wire loops', () => {
  it("falls short of the current sheet by Rosa's round-wire correction μ0·a·N·(A + B)", () => {
    // E. B. Rosa, Bull. Bur. Stand. 2 (1906) [recalled]: L = L_sheet − μ0·a·N·(A + B) in SI, with
    // A = 5/4 − ln(2p/d) (p pitch, d wire diameter) and B → 0.3365 for many turns (his table's
    // value for N ≳ 1000). Independent of our code: a closed form vs. 500 000 Maxwell terms.
    // Tolerance 1 % of the correction (Rosa's B is tabulated to 4 digits and slowly varies with N).
    const D = 0.1;
    const l = 0.3;
    const N = 1000;
    const d = 0.00025;
    const p = l / N;
    const A = 1.25 - Math.log((2 * p) / d);
    const correction = MU0_H_PER_M * (D / 2) * N * (A + 0.3365);
    const diff = currentSheetInductanceH(D, l, N) - turnSumInductanceH(D, l, N, d);
    expect(Math.abs(diff / correction - 1)).toBeLessThan(0.01);
  });

  it('a single turn is the loop self-inductance; two turns add twice their mutual', () => {
    const a = 0.05;
    const rho = 0.0005;
    expect(rel(turnSumInductanceH(2 * a, 0.01, 1, 2 * rho), loopSelfInductanceH(a, rho))).toBeLessThan(1e-15);
    const two = turnSumInductanceH(2 * a, 0.01, 2, 2 * rho);
    expect(rel(two, 2 * loopSelfInductanceH(a, rho) + 2 * loopMutualInductanceH(a, a, 0.005))).toBeLessThan(1e-15);
  });

  it('loop self-inductance μ0 a (ln(8a/ρ) − 7/4): a = 50 mm, ρ = 0.5 mm → 0.3100 µH', () => {
    // Rosa & Grover 1912, formula for a circular ring of round wire [recalled]; hand value
    // 4π·1e-7 · 0.05 · (ln 800 − 1.75) = 3.1006e-7 H: tolerance 1e-4 (hand arithmetic to 5 digits).
    expect(rel(loopSelfInductanceH(0.05, 0.0005), 3.1006e-7)).toBeLessThan(1e-4);
  });
});
