/**
 * Capacitance of an isolated top load (far from the coil and from ground). Mounted on a coil, the
 * top load sees the coil's own field and nearby grounded objects, so its in-place capacitance differs
 * from the isolated value computed here. Use a measured resonance.
 */
import { toroidalP, toroidalQ } from '../../math/legendre-toroidal.ts';
import { EPS0_F_PER_M } from '../constants.ts';

/**
 * Isolated sphere: C = 4πε0·r (exact, any electrostatics text, e.g. Jackson, *Classical
 * Electrodynamics*, 3rd ed., §1.11). 111.265 pF per metre of radius.
 * Example: sphereCapacitanceF(0.12) = 6.676 pF.
 */
export function sphereCapacitanceF(diameterM: number): number {
  return 4 * Math.PI * EPS0_F_PER_M * (diameterM / 2);
}

/**
 * Isolated torus, exact series in toroidal coordinates (W. R. Smythe, *Static and Dynamic
 * Electricity*, 1950, §5.13; N. N. Lebedev, *Special Functions and Their Applications*, §8.12;
 * the expansion of 1/distance is DLMF 14.19.6). R = ring radius to the tube centre, r = tube
 * radius, cosh η0 = R/r, c = √(R² − r²):
 *   C = 8ε0·c·Σₙ εₙ·Q_{n−½}(cosh η0)/P_{n−½}(cosh η0),  ε0 = 1, εₙ = 2 for n ≥ 1.
 * Terms fall like e^{−2nη0}; summed until below 1e-17 of the total. P and Q from
 * shared/math/legendre-toroidal.ts (elliptic seeds, forward/Miller recurrences).
 * Needs R > r (a hole in the middle): tube diameter < outer diameter / 2.
 * Example: torusCapacitanceF(0.20, 0.05) = 8.6002 pF (R = 75 mm, r = 25 mm).
 */
export function torusCapacitanceF(outerDiameterM: number, tubeDiameterM: number): number {
  const r = tubeDiameterM / 2;
  const R = outerDiameterM / 2 - r;
  if (!(R > r) || !(r > 0)) {
    throw new RangeError(`torusCapacitanceF: need 0 < tube < outer/2, got outer ${outerDiameterM} m, tube ${tubeDiameterM} m`);
  }
  const x = R / r;
  const eta = Math.log(x + Math.sqrt((x - 1) * (x + 1)));
  const count = Math.ceil(40 / (2 * eta)) + 3;
  const P = toroidalP(x, count);
  const Q = toroidalQ(x, count);
  let sum = Q[0] / P[0];
  for (let n = 1; n < count; n++) {
    const term = (2 * Q[n]) / P[n];
    sum += term;
    if (term < 1e-17 * sum) break;
  }
  return 8 * EPS0_F_PER_M * Math.sqrt((R - r) * (R + r)) * sum;
}

/**
 * Thin-ring limit of the isolated torus, r ≪ R: C ≈ 4π²ε0·R/ln(8R/r) (the leading term of the
 * toroidal series as η0 → ∞; Smythe 1950). It reads LOW (below the exact series); the relative
 * error falls roughly like (r/R)² (−0.66 % at r/R = 0.1, −0.012 % at 0.01).
 * Example: thinRingCapacitanceF(1, 0.1) = 79.77 pF (exact series: 80.30 pF).
 */
export function thinRingCapacitanceF(ringRadiusM: number, tubeRadiusM: number): number {
  return (4 * Math.PI * Math.PI * EPS0_F_PER_M * ringRadiusM) / Math.log((8 * ringRadiusM) / tubeRadiusM);
}
