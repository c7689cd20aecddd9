/**
 * Small dense linear algebra for the thermal model: a symmetric eigen-solver (cyclic Jacobi) and
 * Lanczos tridiagonalisation with full re-orthogonalisation. Sizes here are tiny (≤ ~16), so the
 * O(n³) dense methods are the right choice: simple, and accurate to float64 round-off.
 *
 * Storage: an n×n matrix is a row-major Float64Array of length n², element (i, j) at i·n + j.
 */

/** Result of {@link symmetricEigen}: eigenvalues ascending; eigenvector k is column k. */
export interface SymmetricEigen {
  /** Eigenvalues in ascending order. */
  values: Float64Array;
  /** Row-major n×n: component i of eigenvector k at i·n + k. Columns are orthonormal. */
  vectors: Float64Array;
}

/**
 * Eigen-decomposition A = V·diag(λ)·Vᵀ of a real symmetric matrix by the cyclic Jacobi method
 * with Rutishauser's rotation formulas (Golub & Van Loan, *Matrix Computations*, 4th ed., §8.5;
 * Rutishauser, Numer. Math. 9, 1966). Off-diagonal elements are annihilated until each satisfies
 * |a_pq| ≤ ε·√(|a_pp·a_qq|) — the stopping rule of Demmel & Veselić (SIAM J. Matrix Anal. Appl.
 * 13(4), 1992) under which Jacobi finds even the small eigenvalues of a positive-definite matrix
 * to high relative accuracy (what stiff thermal networks need: rates spread over many decades).
 *
 * Only the upper triangle of `a` is read; `a` is not modified. Cost O(n³) per sweep, usually
 * 5–10 sweeps. Throws RangeError if `a.length` is not n² or it does not converge in 60 sweeps
 * (only with NaN/∞ input).
 *
 * @example symmetricEigen(Float64Array.of(2, 1, 1, 2), 2).values // → [1, 3]
 */
export function symmetricEigen(a: Float64Array, n: number): SymmetricEigen {
  if (!Number.isInteger(n) || n < 1 || a.length !== n * n) {
    throw new RangeError(`symmetricEigen: matrix must be ${n}×${n} (length ${n * n}), got length ${a.length}`);
  }
  const m = new Float64Array(n * n);
  for (let i = 0; i < n; i++) {
    for (let j = i; j < n; j++) {
      m[i * n + j] = a[i * n + j];
      m[j * n + i] = a[i * n + j];
    }
  }
  const v = new Float64Array(n * n);
  for (let i = 0; i < n; i++) v[i * n + i] = 1;
  const eps = Number.EPSILON;
  let converged = n === 1;
  for (let sweep = 0; sweep < 60 && !converged; sweep++) {
    converged = true;
    for (let p = 0; p < n - 1; p++) {
      for (let q = p + 1; q < n; q++) {
        const apq = m[p * n + q];
        const app = m[p * n + p];
        const aqq = m[q * n + q];
        if (apq === 0) continue;
        // Relative (Demmel–Veselić) threshold, with an absolute floor for indefinite or zero diagonals.
        if (Math.abs(apq) <= eps * Math.sqrt(Math.abs(app * aqq)) || Math.abs(apq) < Number.MIN_VALUE * 1e10) {
          m[p * n + q] = 0;
          m[q * n + p] = 0;
          continue;
        }
        converged = false;
        // Rutishauser: θ = (a_qq − a_pp)/(2a_pq), t = sign(θ)/(|θ| + √(θ² + 1)).
        const theta = (aqq - app) / (2 * apq);
        const t =
          Math.abs(theta) > 1e150
            ? 1 / (2 * theta)
            : (theta >= 0 ? 1 : -1) / (Math.abs(theta) + Math.sqrt(theta * theta + 1));
        const c = 1 / Math.sqrt(t * t + 1);
        const s = t * c;
        const tau = s / (1 + c);
        m[p * n + p] = app - t * apq;
        m[q * n + q] = aqq + t * apq;
        m[p * n + q] = 0;
        m[q * n + p] = 0;
        for (let r = 0; r < n; r++) {
          if (r !== p && r !== q) {
            const arp = m[r * n + p];
            const arq = m[r * n + q];
            const nrp = arp - s * (arq + tau * arp);
            const nrq = arq + s * (arp - tau * arq);
            m[r * n + p] = nrp;
            m[p * n + r] = nrp;
            m[r * n + q] = nrq;
            m[q * n + r] = nrq;
          }
          const vrp = v[r * n + p];
          const vrq = v[r * n + q];
          v[r * n + p] = vrp - s * (vrq + tau * vrp);
          v[r * n + q] = vrq + s * (vrp - tau * vrq);
        }
      }
    }
  }
  if (!converged) throw new RangeError('symmetricEigen: no convergence in 60 sweeps (NaN or infinite input?)');
  const order = Array.from({ length: n }, (_, k) => k).sort((x, y) => m[x * n + x] - m[y * n + y]);
  const values = new Float64Array(n);
  const vectors = new Float64Array(n * n);
  order.forEach((src, k) => {
    values[k] = m[src * n + src];
    for (let i = 0; i < n; i++) vectors[i * n + k] = v[i * n + src];
  });
  return { values, vectors };
}

/** Result of {@link lanczos}: T = Qᵀ·A·Q tridiagonal. */
export interface LanczosResult {
  /** Diagonal of T, length m (m ≤ n; m < n when the Krylov space is exhausted early). */
  alpha: Float64Array;
  /** Off-diagonal of T (all > 0), length m − 1. */
  beta: Float64Array;
  /** Row-major n×m: Lanczos vector j (orthonormal) is column j; column 0 is the normalised start. */
  basis: Float64Array;
}

/**
 * Lanczos tridiagonalisation of a symmetric n×n matrix from a start vector q (Golub & Van Loan,
 * *Matrix Computations*, 4th ed., §10.1), with full re-orthogonalisation done twice per step
 * ("twice is enough", attributed to Kahan in Parlett, *The Symmetric Eigenvalue Problem*, 1980 [recalled]), which keeps the basis
 * orthogonal to round-off for the small sizes used here.
 *
 * T = Qᵀ A Q where Q's first column is q/‖q‖. Stops early (m < n) when the next residual norm is
 * below 1e-13·‖A‖ (the start vector lies in an invariant subspace). Throws RangeError for a zero
 * start vector or wrong sizes.
 *
 * Use here: Stieltjes/Lanczos synthesis of a Cauer ladder from a Foster set (the ladder's scaled
 * conductance matrix is the Jacobi matrix T of diag(1/τᵢ) started from √(residues)).
 *
 * @example lanczos(Float64Array.of(1,0,0, 0,2,0, 0,0,3), 3, Float64Array.of(1,1,1)).alpha[0] // → 2
 */
export function lanczos(a: Float64Array, n: number, q: Float64Array): LanczosResult {
  if (a.length !== n * n || q.length !== n) {
    throw new RangeError(`lanczos: need an ${n}×${n} matrix and a length-${n} start vector, got ${a.length} and ${q.length}`);
  }
  let norm = 0;
  for (let i = 0; i < n; i++) norm += q[i] * q[i];
  norm = Math.sqrt(norm);
  if (!(norm > 0) || !Number.isFinite(norm)) throw new RangeError(`lanczos: start vector norm must be positive and finite, got ${norm}`);
  let aNorm = 0; // Frobenius norm bounds the spectral norm.
  for (let i = 0; i < n * n; i++) aNorm += a[i] * a[i];
  aNorm = Math.sqrt(aNorm);

  const cols: Float64Array[] = [];
  const alpha: number[] = [];
  const beta: number[] = [];
  let v = new Float64Array(n);
  for (let i = 0; i < n; i++) v[i] = q[i] / norm;
  const w = new Float64Array(n);
  for (let j = 0; j < n; j++) {
    cols.push(v);
    for (let i = 0; i < n; i++) {
      let s = 0;
      for (let k = 0; k < n; k++) s += a[i * n + k] * v[k];
      w[i] = s;
    }
    let aj = 0;
    for (let i = 0; i < n; i++) aj += v[i] * w[i];
    alpha.push(aj);
    if (j === n - 1) break;
    // w ← w − Σ (qᵢ·w) qᵢ over all previous vectors, twice.
    for (let pass = 0; pass < 2; pass++) {
      for (const c of cols) {
        let d = 0;
        for (let i = 0; i < n; i++) d += c[i] * w[i];
        for (let i = 0; i < n; i++) w[i] -= d * c[i];
      }
    }
    let b = 0;
    for (let i = 0; i < n; i++) b += w[i] * w[i];
    b = Math.sqrt(b);
    if (b <= 1e-13 * aNorm) break;
    beta.push(b);
    v = new Float64Array(n);
    for (let i = 0; i < n; i++) v[i] = w[i] / b;
  }
  const m = cols.length;
  const basis = new Float64Array(n * m);
  for (let j = 0; j < m; j++) for (let i = 0; i < n; i++) basis[i * m + j] = cols[j][i];
  return { alpha: Float64Array.from(alpha), beta: Float64Array.from(beta), basis };
}
