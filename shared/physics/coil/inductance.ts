/**
 * Self-inductance of a single-layer solenoid: the current-sheet formula (exact Nagaoka or Lundin),
 * Wheeler's handbook formula as a cross-check, and a turn-by-turn sum of circular loops that
 * includes the round-wire spacing the current sheet ignores.
 */
import { MU0_H_PER_M } from '../constants.ts';
import { lundinNagaokaCoefficient, nagaokaCoefficient } from './nagaoka.ts';
import { loopMutualInductanceH } from './mutual.ts';

/**
 * Current-sheet inductance L = K_N·μ0·N²·π·(D/2)²/l in H (Nagaoka 1909; Grover 1946). D is the
 * diameter of the sheet (for a wound coil, through the wire centres), l its length.
 * `method` 'exact' uses the elliptic-integral K_N, 'lundin' Lundin's 1985 closed form (≤ 3 ppm).
 * Example: currentSheetInductanceH(0.1, 0.3, 1000) = 28.695 mH.
 */
export function currentSheetInductanceH(
  diameterM: number,
  lengthM: number,
  turns: number,
  method: 'exact' | 'lundin' = 'exact',
): number {
  const x = diameterM / lengthM;
  const kN = method === 'exact' ? nagaokaCoefficient(x) : lundinNagaokaCoefficient(x);
  return (kN * MU0_H_PER_M * turns * turns * Math.PI * diameterM * diameterM) / (4 * lengthM);
}

/** Metres per inch (exact by definition, 1959 international yard). */
const M_PER_IN = 0.0254;

/**
 * Wheeler's formula (H. A. Wheeler, "Simple inductance formulas for radio coils", Proc. IRE 16(10),
 * 1928): L[µH] = r²N²/(9r + 10l) with r and l in inches. In SI: L = 1e-6·r²N²/(0.0254·(9r + 10l)).
 * Wheeler states about 1 % accuracy for l > 0.8r; it reads 4 % low for very short coils (l/D = 0.2).
 * Example: wheelerInductanceH(0.1, 0.3, 1000) = 28.529 mH.
 */
export function wheelerInductanceH(diameterM: number, lengthM: number, turns: number): number {
  const r = diameterM / 2;
  return (1e-6 * r * r * turns * turns) / (M_PER_IN * (9 * r + 10 * lengthM));
}

/**
 * Low-frequency self-inductance of a circular loop of round wire (uniform current over the wire's
 * section): L = μ0·a·(ln(8a/ρ) − 7/4), a loop radius, ρ wire radius, valid for ρ ≪ a
 * (Kirchhoff/Maxwell; Rosa & Grover, Bull. Bur. Stand. 8, 1912, formula (69); Grover 1946).
 * At high frequency the skin effect removes the internal inductance μ0·a/4, giving −2 instead of
 * −7/4; for the coils here that changes a 1000-turn secondary by under 0.1 %.
 * Example: loopSelfInductanceH(0.05, 0.0005) = 0.3101 µH.
 */
export function loopSelfInductanceH(loopRadiusM: number, wireRadiusM: number): number {
  return MU0_H_PER_M * loopRadiusM * (Math.log((8 * loopRadiusM) / wireRadiusM) - 1.75);
}

/**
 * Inductance of a single-layer coil as N separate coaxial round-wire loops evenly spaced at pitch
 * p = l/N: L = N·L_loop + 2·Σ_{d=1}^{N−1} (N − d)·M(a, a, d·p), M from Maxwell's formula.
 * This is the filament model behind Rosa's round-wire correction to the current sheet (E. B. Rosa,
 * Bull. Bur. Stand. 2, 1906): the mutual inductance of two round wires with uniform current equals
 * that of their centre filaments (the GMD of two circles is the centre distance). It ignores the
 * helix's pitch (each turn is a closed loop) and proximity redistribution of current.
 * O(N) because spacing is uniform. Example: D = 0.1 m, l = 0.3 m, N = 1000, d = 0.25 mm → within
 * 0.2 % of the current sheet.
 */
export function turnSumInductanceH(meanDiameterM: number, lengthM: number, turns: number, wireDiameterM: number): number {
  const a = meanDiameterM / 2;
  const p = lengthM / turns;
  let sum = turns * loopSelfInductanceH(a, wireDiameterM / 2);
  for (let d = 1; d < turns; d++) sum += 2 * (turns - d) * loopMutualInductanceH(a, a, d * p);
  return sum;
}
