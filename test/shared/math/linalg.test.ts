import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { lanczos, symmetricEigen } from '../../../shared/math/linalg.ts';

/** Dense n×n product A·B (row-major). */
function matMul(a: Float64Array, b: Float64Array, n: number, m = n, p = n): Float64Array {
  const out = new Float64Array(n * p);
  for (let i = 0; i < n; i++) for (let j = 0; j < p; j++) {
    let s = 0;
    for (let k = 0; k < m; k++) s += a[i * m + k] * b[k * p + j];
    out[i * p + j] = s;
  }
  return out;
}

describe('symmetricEigen', () => {
  it('finds the closed-form eigenvalues of a tridiagonal Toeplitz matrix', () => {
    // λ_k = a + 2b·cos(kπ/(n+1)), k = 1…n: the classical result for tridiagonal Toeplitz matrices
    // (e.g. G. D. Smith, Numerical Solution of Partial Differential Equations, 3rd ed., 1985
    // [recalled]). Tolerance 1e-13 absolute on values of order 1: a few ulps times n for a
    // backward-stable method.
    const n = 10;
    const a = 2;
    const b = -1;
    const m = new Float64Array(n * n);
    for (let i = 0; i < n; i++) {
      m[i * n + i] = a;
      if (i + 1 < n) {
        m[i * n + i + 1] = b;
        m[(i + 1) * n + i] = b;
      }
    }
    const { values } = symmetricEigen(m, n);
    const expected = Array.from({ length: n }, (_, k) => a + 2 * b * Math.cos(((k + 1) * Math.PI) / (n + 1))).sort((x, y) => x - y);
    values.forEach((v, k) => expect(Math.abs(v - expected[k])).toBeLessThan(1e-13));
  });

  it('reconstructs random symmetric matrices with orthonormal eigenvectors (A·V = V·Λ)', () => {
    // Invariant of any eigen-decomposition; tolerance 1e-12·‖A‖ (backward stability of Jacobi).
    fc.assert(
      fc.property(fc.integer({ min: 1, max: 9 }), fc.array(fc.double({ min: -10, max: 10, noNaN: true }), { minLength: 81, maxLength: 81 }), (n, raw) => {
        const a = new Float64Array(n * n);
        for (let i = 0; i < n; i++) for (let j = i; j < n; j++) {
          a[i * n + j] = raw[i * 9 + j];
          a[j * n + i] = raw[i * 9 + j];
        }
        const { values, vectors } = symmetricEigen(a, n);
        const av = matMul(a, vectors, n);
        for (let i = 0; i < n; i++) for (let k = 0; k < n; k++) {
          expect(Math.abs(av[i * n + k] - vectors[i * n + k] * values[k])).toBeLessThan(1e-11 * 10 * n);
        }
        for (let k = 0; k < n; k++) for (let l = 0; l < n; l++) {
          let d = 0;
          for (let i = 0; i < n; i++) d += vectors[i * n + k] * vectors[i * n + l];
          expect(Math.abs(d - (k === l ? 1 : 0))).toBeLessThan(1e-12 * n);
        }
        for (let k = 1; k < n; k++) expect(values[k]).toBeGreaterThanOrEqual(values[k - 1]);
      }),
      { numRuns: 60 },
    );
  });

  it('keeps the relative accuracy of tiny eigenvalues of a graded positive-definite matrix', () => {
    // A = D·H·D, D = diag(1, 1e-3, 1e-6), H well conditioned: eigenvalues span ~12 decades.
    // Demmel & Veselić (1992): Jacobi gets every eigenvalue to relative accuracy ~ε·κ(H). Checked
    // through det(A) = det(D)²·det(H) = 1e-18·0.5625 (exact arithmetic), which an absolute error of
    // ε·‖A‖ in the smallest eigenvalue would destroy. Tolerance 1e-12 relative (κ(H) ≈ 5).
    const d = [1, 1e-3, 1e-6];
    const h = [1, 0.5, 0.25, 0.5, 1, 0.5, 0.25, 0.5, 1];
    const a = new Float64Array(9);
    for (let i = 0; i < 3; i++) for (let j = 0; j < 3; j++) a[i * 3 + j] = d[i] * h[i * 3 + j] * d[j];
    const { values } = symmetricEigen(a, 3);
    const det = values[0] * values[1] * values[2];
    expect(Math.abs(det / 5.625e-19 - 1)).toBeLessThan(1e-12);
    expect(values[0]).toBeGreaterThan(0);
  });

  it('rejects a matrix of the wrong size', () => {
    expect(() => symmetricEigen(new Float64Array(5), 2)).toThrow(RangeError);
  });
});

describe('lanczos', () => {
  it('tridiagonalises: Qᵀ·A·Q = T, Q orthonormal, first column the normalised start, same spectrum', () => {
    // Defining properties of the Lanczos process (Golub & Van Loan §10.1). Tolerance 1e-12 (round-off
    // of a re-orthogonalised process on values of order 1–100).
    const n = 6;
    const lam = [0.01, 0.3, 1, 4, 20, 100];
    const a = new Float64Array(n * n);
    lam.forEach((l, i) => (a[i * n + i] = l));
    const q = Float64Array.of(1, 2, 0.5, 0.1, 0.3, 3);
    const { alpha, beta, basis } = lanczos(a, n, q);
    expect(alpha.length).toBe(n);
    const qn = Math.hypot(...q);
    for (let i = 0; i < n; i++) expect(Math.abs(basis[i * n] - q[i] / qn)).toBeLessThan(1e-15);
    const qt = new Float64Array(n * n);
    for (let i = 0; i < n; i++) for (let j = 0; j < n; j++) qt[j * n + i] = basis[i * n + j];
    const t = matMul(matMul(qt, a, n), basis, n);
    for (let i = 0; i < n; i++) for (let j = 0; j < n; j++) {
      const want = i === j ? alpha[i] : Math.abs(i - j) === 1 ? beta[Math.min(i, j)] : 0;
      expect(Math.abs(t[i * n + j] - want)).toBeLessThan(1e-12 * 100);
    }
    const tri = new Float64Array(n * n);
    for (let i = 0; i < n; i++) {
      tri[i * n + i] = alpha[i];
      if (i + 1 < n) {
        tri[i * n + i + 1] = beta[i];
        tri[(i + 1) * n + i] = beta[i];
      }
    }
    const { values } = symmetricEigen(tri, n);
    values.forEach((v, k) => expect(Math.abs(v / lam[k] - 1)).toBeLessThan(1e-11));
  });

  it('stops early when the start vector lies in an invariant subspace', () => {
    const a = new Float64Array(9);
    [1, 2, 3].forEach((l, i) => (a[i * 3 + i] = l));
    const r = lanczos(a, 3, Float64Array.of(1, 1, 0));
    expect(r.alpha.length).toBe(2);
    expect(r.beta.length).toBe(1);
  });

  it('rejects a zero start vector', () => {
    expect(() => lanczos(new Float64Array(4), 2, new Float64Array(2))).toThrow(RangeError);
  });
});
