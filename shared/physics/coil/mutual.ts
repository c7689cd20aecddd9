/**
 * Mutual inductance of coaxial circular loops (Maxwell) and of two coaxial single-layer coils as
 * the sum over all turn pairs.
 */
import { ellipticKE } from '../../math/elliptic.ts';
import { MU0_H_PER_M } from '../constants.ts';

/**
 * Mutual inductance of two coaxial circular filaments of radii a and b, axial separation h, in H
 * (J. C. Maxwell, *A Treatise on Electricity and Magnetism*, 1873, §701; DLMF §19.34):
 *   M = μ0·√(ab)·[(2/k − k)·K(k) − (2/k)·E(k)],  k² = 4ab/((a + b)² + h²).
 * Written as M = μ0√(ab)·(2/k)·[(1 − k²/2)K − E] with the bracket summed from positive AGM terms,
 * so the far field (k → 0, where the textbook form cancels) keeps full precision and tends to
 * μ0·π·a²b²/(2h³). The complementary k′² = ((a − b)² + h²)/((a + b)² + h²) is formed directly, so
 * nearly touching loops keep their digits too. Coincident loops (a = b, h = 0) give Infinity.
 * Example: loopMutualInductanceH(0.1, 0.1, 0.1) = 4.940784631e-8 H.
 */
export function loopMutualInductanceH(aM: number, bM: number, hM: number): number {
  const s = (aM + bM) * (aM + bM) + hM * hM;
  const d = aM - bM;
  const m = (4 * aM * bM) / s;
  const mc = (d * d + hM * hM) / s;
  const k = Math.sqrt(m);
  return MU0_H_PER_M * Math.sqrt(aM * bM) * (2 / k) * ellipticKE(m, mc).kMinusEMinusHalfMK;
}

/** A single-layer coil for turn-pair sums: turns spread evenly over its length, centred on centreM. */
export interface CoaxialWinding {
  /** Radius through the wire centres, m. */
  radiusM: number;
  /** Axial position of the winding's centre, m (any common origin). */
  centreM: number;
  /** Axial length of the winding, m (pitch = lengthM/turns). */
  lengthM: number;
  turns: number;
}

/**
 * Axial positions of a winding's turns, m: N equal segments of the length, one turn at the middle
 * of each, z_i = centre − l/2 + (i + ½)·l/N (the filament picture of a uniform current sheet).
 * Example: turnPositionsM({ radiusM: 0.05, centreM: 0, lengthM: 0.01, turns: 2 }) → [−0.0025, 0.0025].
 */
export function turnPositionsM(w: CoaxialWinding): Float64Array {
  const out = new Float64Array(w.turns);
  const pitch = w.lengthM / w.turns;
  const z0 = w.centreM - w.lengthM / 2 + pitch / 2;
  for (let i = 0; i < w.turns; i++) out[i] = z0 + i * pitch;
  return out;
}

/**
 * Mutual inductance of two coaxial windings, H: Maxwell's formula summed over every turn pair,
 * M = Σᵢ Σⱼ M_loop(a, b, |zᵢ − zⱼ|). Exact for the filament model (each turn a closed coaxial loop,
 * current at the wire centre); neglects the helix pitch, which for a few-turn primary shifts M by
 * well under 1 %. Cost N₁·N₂ elliptic evaluations (1000 × 4 is 4000: a millisecond).
 * Example: one-turn loops reproduce loopMutualInductanceH.
 */
export function windingMutualInductanceH(w1: CoaxialWinding, w2: CoaxialWinding): number {
  const z1 = turnPositionsM(w1);
  const z2 = turnPositionsM(w2);
  let m = 0;
  for (let i = 0; i < z1.length; i++) {
    for (let j = 0; j < z2.length; j++) m += loopMutualInductanceH(w1.radiusM, w2.radiusM, Math.abs(z1[i] - z2[j]));
  }
  return m;
}

/**
 * Coupling coefficient k = M/√(L1·L2), dimensionless, 0 ≤ k ≤ 1 for any physical pair.
 * Example: couplingCoefficient(1e-6, 4e-6, 1e-6) = 0.5.
 */
export const couplingCoefficient = (mutualH: number, l1H: number, l2H: number): number => mutualH / Math.sqrt(l1H * l2H);
