/**
 * Complete elliptic integrals of the first and second kind, and Carlson's symmetric integrals
 * R_F and R_D as an independent route.
 *
 * Convention: the PARAMETER m = k² (Abramowitz & Stegun 17.2; scipy/mpmath), not the modulus k
 * that DLMF §19.2 writes. K(m) = ∫₀^{π/2} dθ/√(1 − m sin²θ), E(m) = ∫₀^{π/2} √(1 − m sin²θ) dθ.
 * The complementary parameter mc = 1 − m may be passed separately so that callers who know it
 * without cancellation (coaxial loops that nearly touch, long thin coils) keep every digit.
 */

/** Result of {@link ellipticKE}: K, E and two cancellation-free differences. */
export interface EllipticKE {
  /** K(m), complete integral of the first kind. */
  K: number;
  /** E(m), complete integral of the second kind. */
  E: number;
  /** K(m) − E(m), summed from positive terms (no cancellation when m is small). */
  kMinusE: number;
  /** (1 − m/2)·K(m) − E(m), summed from positive terms; the bracket of Maxwell's loop formula. */
  kMinusEMinusHalfMK: number;
}

/**
 * K(m) and E(m) by the arithmetic–geometric mean (A&S 17.6.1–17.6.4; DLMF 19.8.1, 19.8.6):
 * a₀ = 1, b₀ = √mc, c₀ = √m; aₙ₊₁ = (aₙ + bₙ)/2, bₙ₊₁ = √(aₙbₙ), cₙ₊₁ = cₙ²/(4aₙ₊₁);
 * K = π/(2a_∞), K − E = K·Σₙ 2ⁿ⁻¹cₙ². The identity cₙ₊₁ = cₙ²/(4aₙ₊₁) (from cₙ² = aₙ² − bₙ²)
 * avoids the subtraction aₙ − bₙ, so small differences K − E and (1 − m/2)K − E are accurate.
 *
 * Inner kernel: trusts 0 ≤ m ≤ 1 and mc = 1 − m ≥ 0. m = 1 (mc = 0) gives K = ∞, E = 1.
 * Converges quadratically; at most ~8 iterations for mc ≥ 1e-300.
 * Example: ellipticKE(0.5).K = 1.8540746773013719 = Γ(1/4)²/(4√π).
 */
export function ellipticKE(m: number, mc: number = 1 - m): EllipticKE {
  if (mc === 0) return { K: Infinity, E: 1, kMinusE: Infinity, kMinusEMinusHalfMK: Infinity };
  let a = 1;
  let b = Math.sqrt(mc);
  let c2 = m; // c₀²
  let tail = 0; // Σ_{n≥1} 2^{n−1} cₙ²
  let pow = 1; // 2^{n−1} for n = 1
  for (let i = 0; i < 60; i++) {
    const aNext = 0.5 * (a + b);
    const cNext = c2 / (4 * aNext); // cₙ₊₁ = cₙ²/(4aₙ₊₁), with c2 = cₙ²
    b = Math.sqrt(a * b);
    a = aNext;
    c2 = cNext * cNext;
    tail += pow * c2;
    pow *= 2;
    if (c2 <= 1e-34 * a * a) break; // cₙ below 1e-17·aₙ: later terms are below rounding
  }
  const K = Math.PI / (2 * a);
  const kTail = K * tail;
  const kMinusE = 0.5 * m * K + kTail;
  return { K, E: K - kMinusE, kMinusE, kMinusEMinusHalfMK: kTail };
}

/** K(m), parameter m = k² (see {@link ellipticKE}). Example: ellipticK(0) = π/2. */
export const ellipticK = (m: number, mc: number = 1 - m): number => ellipticKE(m, mc).K;

/** E(m), parameter m = k² (see {@link ellipticKE}). Example: ellipticE(1) = 1. */
export const ellipticE = (m: number, mc: number = 1 - m): number => ellipticKE(m, mc).E;

// Carlson's duplication algorithm (B. C. Carlson, "Numerical computation of real or complex
// elliptic integrals", Numer. Algorithms 10, 1995, 13–26; DLMF §19.36(i)).
const CARLSON_TOL = 2.2e-16;

/**
 * Carlson's symmetric integral of the first kind,
 * R_F(x, y, z) = ½∫₀^∞ dt / √((t + x)(t + y)(t + z)) (DLMF 19.16.1), by duplication with the
 * fifth-order Taylor tail of Carlson 1995 (DLMF 19.36.1). Relative error ≈ 1e-16.
 * Inner kernel: trusts x, y, z ≥ 0 with at most one zero. K(m) = R_F(0, 1 − m, 1) (DLMF 19.25.1).
 * Example: carlsonRF(1, 2, 0) = 1.3110287771461 (Carlson 1995, test values).
 */
export function carlsonRF(x: number, y: number, z: number): number {
  let xn = x;
  let yn = y;
  let zn = z;
  let A = (xn + yn + zn) / 3;
  const A0 = A;
  const Q = Math.pow(3 * CARLSON_TOL, -1 / 6) * Math.max(Math.abs(A0 - xn), Math.abs(A0 - yn), Math.abs(A0 - zn));
  let scale = 1; // 4^{−n}
  while (scale * Q >= Math.abs(A)) {
    const sx = Math.sqrt(xn);
    const sy = Math.sqrt(yn);
    const sz = Math.sqrt(zn);
    const lam = sx * sy + sy * sz + sz * sx;
    xn = 0.25 * (xn + lam);
    yn = 0.25 * (yn + lam);
    zn = 0.25 * (zn + lam);
    A = 0.25 * (A + lam);
    scale *= 0.25;
  }
  const X = ((A0 - x) * scale) / A;
  const Y = ((A0 - y) * scale) / A;
  const Z = -(X + Y);
  const E2 = X * Y - Z * Z;
  const E3 = X * Y * Z;
  return (1 - E2 / 10 + E3 / 14 + (E2 * E2) / 24 - (3 * E2 * E3) / 44) / Math.sqrt(A);
}

/**
 * Carlson's symmetric integral of the second kind,
 * R_D(x, y, z) = (3/2)∫₀^∞ dt / (√((t + x)(t + y)) (t + z)^{3/2}) (DLMF 19.16.5), by duplication
 * (Carlson 1995; DLMF 19.36.2). Relative error ≈ 1e-15.
 * Inner kernel: trusts x, y ≥ 0 (at most one zero), z > 0.
 * E(m) = R_F(0, 1 − m, 1) − (m/3)·R_D(0, 1 − m, 1) (DLMF 19.25.1).
 * Example: carlsonRD(0, 2, 1) = 1.7972103521034 (Carlson 1995, test values).
 */
export function carlsonRD(x: number, y: number, z: number): number {
  let xn = x;
  let yn = y;
  let zn = z;
  let A = (xn + yn + 3 * zn) / 5;
  const A0 = A;
  const Q = Math.pow(0.25 * CARLSON_TOL, -1 / 6) * Math.max(Math.abs(A0 - xn), Math.abs(A0 - yn), Math.abs(A0 - zn));
  let scale = 1; // 4^{−n}
  let sum = 0;
  while (scale * Q >= Math.abs(A)) {
    const sx = Math.sqrt(xn);
    const sy = Math.sqrt(yn);
    const sz = Math.sqrt(zn);
    const lam = sx * sy + sy * sz + sz * sx;
    sum += scale / (sz * (zn + lam));
    xn = 0.25 * (xn + lam);
    yn = 0.25 * (yn + lam);
    zn = 0.25 * (zn + lam);
    A = 0.25 * (A + lam);
    scale *= 0.25;
  }
  const X = ((A0 - x) * scale) / A;
  const Y = ((A0 - y) * scale) / A;
  const Z = -(X + Y) / 3;
  const XY = X * Y;
  const Z2 = Z * Z;
  const E2 = XY - 6 * Z2;
  const E3 = (3 * XY - 8 * Z2) * Z;
  const E4 = 3 * (XY - Z2) * Z2;
  const E5 = XY * Z2 * Z;
  const series =
    1 - (3 * E2) / 14 + E3 / 6 + (9 * E2 * E2) / 88 - (3 * E4) / 22 - (9 * E2 * E3) / 52 + (3 * E5) / 26;
  return (scale * series) / (A * Math.sqrt(A)) + 3 * sum;
}
