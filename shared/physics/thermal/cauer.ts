/**
 * Foster → Cauer conversion of a junction-to-case thermal impedance.
 *
 * A Cauer ladder (shunt C₁ at the junction, series R₁, shunt C₂, series R₂, …, series Rₙ to the
 * case) has physical nodes, so unlike a Foster set it may be chained with case–sink and
 * sink–ambient elements (Infineon AN2008-03; NXP AN11261). Both forms have the same
 * driving-point impedance Z(s) = Σ Rᵢ/(1 + sτᵢ) when the case is held at a fixed temperature.
 *
 * Two equivalent syntheses (the tests check they agree):
 * - {@link fosterToCauer} (default): Stieltjes/Lanczos. With the case grounded, the ladder's
 *   scaled conductance matrix M = C^(−1/2)·G·C^(−1/2) is a Jacobi (symmetric tridiagonal)
 *   matrix, and Z(s) = e₁ᵀ(sC + G)⁻¹e₁ = Σ wₖ/(s + λₖ). The Foster set gives the poles
 *   λᵢ = 1/τᵢ and residues rᵢ = Rᵢ/τᵢ = 1/Cᵢ, so M is the Lanczos tridiagonalisation of diag(λ)
 *   started from qᵢ = √(rᵢ/Σr) (Golub & Welsch, Math. Comp. 23, 1969, for the spectral ↔ Jacobi
 *   correspondence; Gragg & Harrod, Numer. Math. 44, 1984, for its numerical stability). The
 *   element values follow from M without subtractive cancellation: C₁ = 1/Σrᵢ; the vector
 *   u = C^(1/2)·1 satisfies M·u ∝ eₙ, so Cⱼ = uⱼ² and Rⱼ = 1/(βⱼuⱼuⱼ₊₁), Rₙ from the same
 *   proportionality. Robust to ~12 stages with τ spread over many decades.
 * - {@link fosterToCauerPolynomial}: the textbook continued-fraction (Cauer I) expansion of
 *   Y(s) = D(s)/N(s) in float64 polynomial arithmetic, s scaled by the geometric-mean τ. Fine up
 *   to ~5 stages; kept as an independent cross-check.
 */
import { lanczos } from '../../math/linalg.ts';
import type { FosterStage } from './foster.ts';

/** One Cauer section: shunt heat capacity Cⱼ (J/K) at node j, then series resistance Rⱼ (K/W). */
export interface CauerStage {
  rKPerW: number;
  cJPerK: number;
}

/** Checks a Foster list (programming-error tier: profiles are validated upstream). */
function checkFoster(stages: readonly FosterStage[], fn: string): void {
  if (stages.length === 0) throw new RangeError(`${fn}: the Foster list is empty`);
  stages.forEach((s, i) => {
    if (!(s.rKPerW > 0) || !(s.tauS > 0) || !Number.isFinite(s.rKPerW) || !Number.isFinite(s.tauS)) {
      throw new RangeError(`${fn}: stage ${i} needs finite rKPerW > 0 and tauS > 0, got ${s.rKPerW} K/W, ${s.tauS} s`);
    }
  });
}

/**
 * Merges Foster stages whose time constants agree to 1e-12 relative (R₁/(1+sτ) + R₂/(1+sτ) is one
 * cell (R₁+R₂)/(1+sτ)); identical poles would otherwise make the synthesis degenerate.
 * Returns stages sorted by τ ascending.
 *
 * @example mergeEqualTaus([{ rKPerW: 1, tauS: 0.1 }, { rKPerW: 2, tauS: 0.1 }]) // → [{ rKPerW: 3, tauS: 0.1 }]
 */
export function mergeEqualTaus(stages: readonly FosterStage[]): FosterStage[] {
  const sorted = [...stages].sort((a, b) => a.tauS - b.tauS);
  const out: FosterStage[] = [];
  for (const s of sorted) {
    const last = out[out.length - 1];
    if (last && Math.abs(s.tauS - last.tauS) <= 1e-12 * s.tauS) {
      // Keep the time constant of the merged cell: weighted by R so Σ R·τ (the area) is kept.
      const r = last.rKPerW + s.rKPerW;
      out[out.length - 1] = { rKPerW: r, tauS: (last.rKPerW * last.tauS + s.rKPerW * s.tauS) / r };
    } else out.push({ ...s });
  }
  return out;
}

/**
 * Cauer I ladder with the same Z(s) as a Foster network, by Stieltjes/Lanczos synthesis (see the
 * module note for the method and sources). Returns sections from the junction outwards; the last
 * Rₙ connects to the case. ΣRⱼ = ΣRᵢ and Zth(t) are preserved to round-off; C₁ = 1/Σ(1/Cᵢ).
 * Stages with equal τ are merged first, so the ladder can be shorter than the Foster list.
 * Throws RangeError for an empty list or non-positive values.
 *
 * @example fosterToCauer([{ rKPerW: 1, tauS: 1 }, { rKPerW: 1, tauS: 0.1 }])
 * // → [{ rKPerW: 1.1980198, cJPerK: 0.0909091 }, { rKPerW: 0.8019802, cJPerK: 1.1448934 }]
 */
export function fosterToCauer(stages: readonly FosterStage[]): CauerStage[] {
  checkFoster(stages, 'fosterToCauer');
  const f = mergeEqualTaus(stages);
  const n = f.length;
  // Work in a time unit of the geometric-mean τ so the numbers stay near 1.
  let logSum = 0;
  for (const s of f) logSum += Math.log(s.tauS);
  const tRef = Math.exp(logSum / n);
  const lam = f.map((s) => tRef / s.tauS); // scaled poles
  const res = f.map((s) => (s.rKPerW * tRef) / s.tauS); // scaled residues (K/W per scaled time)
  const rSum = res.reduce((a, b) => a + b, 0);
  const a = new Float64Array(n * n);
  const q = new Float64Array(n);
  for (let i = 0; i < n; i++) {
    a[i * n + i] = lam[i];
    q[i] = Math.sqrt(res[i] / rSum);
  }
  const { alpha, beta, basis } = lanczos(a, n, q);
  const m = alpha.length;
  // w = T⁻¹·e_m = Qᵀ·diag(1/λ)·q_m (T = QᵀAQ with A Q = Q T exactly in the Krylov space).
  const w = new Float64Array(m);
  for (let j = 0; j < m; j++) {
    let s = 0;
    for (let i = 0; i < n; i++) s += (basis[i * m + j] * basis[i * m + m - 1]) / lam[i];
    w[j] = Math.abs(s);
  }
  const c1 = 1 / rSum; // scaled capacity of node 1
  const kappa = Math.sqrt(c1) / w[0];
  const u = Array.from(w, (x) => kappa * x); // u = C^(1/2)·1
  const out: CauerStage[] = [];
  for (let j = 0; j < m; j++) {
    const r = j < m - 1 ? 1 / (beta[j] * u[j] * u[j + 1]) : 1 / (kappa * u[m - 1]);
    out.push({ rKPerW: r, cJPerK: u[j] * u[j] * tRef });
  }
  return out;
}

/**
 * Cauer I ladder by continued-fraction expansion of the input admittance Y(s) = D(s)/N(s), with
 * D = Π(1 + sτᵢ) and N = Σ Rᵢ Π_{j≠i}(1 + sτⱼ): alternately remove the shunt capacity
 * Cₖ = lim Y/s (s → ∞) and the series resistance Rₖ = lim Z (s → ∞) (Cauer 1926; Infineon
 * AN2008-03). Float64 polynomial arithmetic in s scaled by the geometric-mean τ; accurate for
 * up to ~5 stages whose τ are not too close. Kept as an independent check of {@link fosterToCauer}.
 *
 * @example fosterToCauerPolynomial([{ rKPerW: 2, tauS: 0.01 }]) // → [{ rKPerW: 2, cJPerK: 0.005 }]
 */
export function fosterToCauerPolynomial(stages: readonly FosterStage[]): CauerStage[] {
  checkFoster(stages, 'fosterToCauerPolynomial');
  const f = mergeEqualTaus(stages);
  const n = f.length;
  let logSum = 0;
  for (const s of f) logSum += Math.log(s.tauS);
  const tRef = Math.exp(logSum / n);
  const t = f.map((s) => s.tauS / tRef);
  // Polynomials as ascending coefficient arrays.
  const mul = (p: number[], ti: number): number[] => {
    const r = new Array<number>(p.length + 1).fill(0);
    for (let k = 0; k < p.length; k++) {
      r[k] += p[k];
      r[k + 1] += p[k] * ti;
    }
    return r;
  };
  let d = [1];
  for (const ti of t) d = mul(d, ti);
  let num = new Array<number>(n).fill(0);
  for (let i = 0; i < n; i++) {
    let p = [f[i].rKPerW];
    for (let j = 0; j < n; j++) if (j !== i) p = mul(p, t[j]);
    for (let k = 0; k < p.length; k++) num[k] += p[k];
  }
  const out: CauerStage[] = [];
  // Invariant at loop start: deg d = k+1... i.e. d has one more coefficient than num.
  for (let k = 0; k < n; k++) {
    const degN = num.length - 1;
    const cK = d[degN + 1] / num[degN];
    const dNew = d.slice(0, degN + 1); // d − cK·s·num, leading term cancels exactly
    for (let i = 0; i <= degN; i++) if (i >= 1) dNew[i] -= cK * num[i - 1];
    // Now Z_rest = num/dNew, equal degrees.
    const rK = num[degN] / dNew[degN];
    const numNew = num.slice(0, degN); // num − rK·dNew, leading term cancels exactly
    for (let i = 0; i < degN; i++) numNew[i] -= rK * dNew[i];
    out.push({ rKPerW: rK, cJPerK: cK * tRef });
    d = dNew;
    num = numNew;
    if (num.length === 0) break;
  }
  return out;
}
