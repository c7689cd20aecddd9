/**
 * Toroidal functions: Legendre functions of the first and second kind of half-odd-integer degree,
 * P_{n−½}(x) and Q_{n−½}(x) for x = cosh η > 1 (Hobson's definitions, real for x > 1; DLMF §14.20(vi)
 * writes the same functions of cosh η). They solve Laplace's equation in toroidal coordinates.
 *
 * Route (robust, no series that cancel):
 * - seeds from complete elliptic integrals (parameter m = k², A&S 17.3; DLMF 14.5.20-type forms),
 *   P_{−½}(x) = (2/π)·√(2/(x+1))·K((x−1)/(x+1)),  P_{½}(cosh η) = (2/π)·e^{η/2}·E(1 − e^{−2η}),
 *   Q_{−½}(x) = √(2/(x+1))·K(2/(x+1));
 * - the three-term recurrence (DLMF 14.10.6) (ν+1)F_{ν+1} = (2ν+1)x F_ν − ν F_{ν−1}, run FORWARD
 *   for P (the dominant solution, growing like e^{nη}) and BACKWARD from a far start for Q
 *   (the minimal solution, decaying like e^{−nη}), normalised to Q_{−½}: Miller's algorithm
 *   (J. C. P. Miller, 1952; W. Gautschi, SIAM Review 9, 1967).
 */
import { ellipticKE } from './elliptic.ts';

/** x → η = arccosh x, accurate near x = 1. */
const acoshAccurate = (x: number): number => Math.log(x + Math.sqrt((x - 1) * (x + 1)));

/**
 * P_{n−½}(x) for n = 0 … count−1 (index n holds degree n − ½), x > 1.
 * Forward recurrence from the two elliptic-integral seeds; relative error a few ulp per step.
 * Inner kernel: trusts x > 1 and count ≥ 1. Values overflow to Infinity for n·η ≳ 700.
 * Example: toroidalP(2, 2) → [0.90128629936, 1.32913816219] (mpmath legenp(ν, 0, 2, type=3)).
 */
export function toroidalP(x: number, count: number, out = new Float64Array(count)): Float64Array {
  const eta = acoshAccurate(x);
  out[0] = (2 / Math.PI) * Math.sqrt(2 / (x + 1)) * ellipticKE((x - 1) / (x + 1), 2 / (x + 1)).K;
  if (count < 2) return out;
  const e2 = Math.exp(-2 * eta);
  out[1] = (2 / Math.PI) * Math.exp(eta / 2) * ellipticKE(1 - e2, e2).E;
  for (let n = 1; n + 1 < count; n++) {
    // (n + ½) P_{n+½} = 2n x P_{n−½} − (n − ½) P_{n−3/2}
    out[n + 1] = (2 * n * x * out[n] - (n - 0.5) * out[n - 1]) / (n + 0.5);
  }
  return out;
}

/**
 * Q_{n−½}(x) for n = 0 … count−1 (index n holds degree n − ½), x > 1, by Miller's backward
 * recurrence normalised to Q_{−½}(x) = √(2/(x+1))·K(2/(x+1)).
 * The start index lies far enough above count that the neglected dominant part, which decays like
 * e^{−2η(start − n)}, is below 1e-18 relative; intermediate values are rescaled before overflow.
 * Inner kernel: trusts x > 1 and count ≥ 1.
 * Example: toroidalQ(2, 2) → [1.65663817024, 0.22401429284] (mpmath legenq(ν, 0, 2, type=3)).
 */
export function toroidalQ(x: number, count: number, out = new Float64Array(count)): Float64Array {
  const eta = acoshAccurate(x);
  const q0 = Math.sqrt(2 / (x + 1)) * ellipticKE(2 / (x + 1), (x - 1) / (x + 1)).K;
  const start = count + Math.ceil(42 / (2 * eta)) + 10;
  // Backward: Q_{n−3/2} = [2n x Q_{n−½} − (n + ½) Q_{n+½}] / (n − ½)
  let above = 0; // Q_{start+½} ≈ 0
  let here = 1; // Q_{start−½}, arbitrary scale
  for (let n = start; n >= 1; n--) {
    const below = (2 * n * x * here - (n + 0.5) * above) / (n - 0.5);
    above = here;
    here = below;
    if (n - 1 < count) out[n - 1] = here;
    if (n < count) out[n] = above;
    if (Math.abs(here) > 1e250) {
      // rescale everything kept so far and the running pair
      here *= 1e-250;
      above *= 1e-250;
      for (let j = n - 1; j < count; j++) out[j] *= 1e-250;
    }
  }
  const norm = q0 / out[0];
  for (let j = 0; j < count; j++) out[j] *= norm;
  return out;
}
