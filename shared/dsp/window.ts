/**
 * Spectral-analysis windows and their figures of merit, after F. J. Harris, "On the use of windows
 * for harmonic analysis with the discrete Fourier transform", Proc. IEEE 66(1), 1978, pp. 51–83.
 *
 * All windows here are **periodic** ("DFT-even" in Harris's terms): w[n] for n = 0…N−1 is the first N
 * points of an (N+1)-point symmetric window, so the DFT of w has exactly the cosine-sum line
 * structure and an N-point Hann window overlap-adds to a constant at hop N/2.
 */

/** Windows coilcue uses: Hann for spectra and spectrograms, 4-term Blackman–Harris where leakage must be low. */
export type WindowKind = 'hann' | 'blackman-harris-4';

/**
 * Cosine-sum coefficients w[n] = a0 − a1·cos(2πn/N) + a2·cos(4πn/N) − a3·cos(6πn/N).
 * Hann (Harris's "Hanning", the cos² window): a0 = a1 = 0.5. 4-term Blackman–Harris, −92 dB side
 * lobes: 0.35875, 0.48829, 0.14128, 0.01168 (Harris 1978, the Blackman–Harris family).
 */
export const WINDOW_COEFFS: Readonly<Record<WindowKind, readonly number[]>> = {
  hann: [0.5, 0.5],
  'blackman-harris-4': [0.35875, 0.48829, 0.14128, 0.01168],
};

/**
 * A periodic cosine-sum window of length n (see {@link WINDOW_COEFFS}).
 *
 * @param kind which window
 * @param n length in samples (≥ 1)
 * @param out n values (allocated when absent)
 * @returns w[n] = Σₘ (−1)ᵐ·aₘ·cos(2πmn/N), dimensionless, peak 1 at n = N/2 for even N
 * @example makeWindow('hann', 4) // → [0, 0.5, 1, 0.5]
 */
export function makeWindow(kind: WindowKind, n: number, out: Float64Array = new Float64Array(n)): Float64Array {
  if (!Number.isInteger(n) || n < 1) throw new RangeError(`makeWindow: n must be an integer ≥ 1, got ${n}`);
  const a = WINDOW_COEFFS[kind];
  if (!a) throw new RangeError(`makeWindow: unknown window kind "${kind}"`);
  for (let i = 0; i < n; i++) {
    const phi = (2 * Math.PI * i) / n;
    let w = 0;
    for (let m = 0; m < a.length; m++) w += (m % 2 === 0 ? 1 : -1) * a[m] * Math.cos(m * phi);
    out[i] = w;
  }
  return out;
}

/**
 * Periodic Hann window, w[n] = 0.5 − 0.5·cos(2πn/N) = sin²(πn/N) (Harris 1978, cos^α window, α = 2).
 *
 * @example hannWindow(4) // → [0, 0.5, 1, 0.5]
 */
export const hannWindow = (n: number, out?: Float64Array): Float64Array => makeWindow('hann', n, out);

/** Figures of merit of a window (Harris 1978, Table I columns). */
export interface WindowStats {
  /** Σw / N: the gain a coherent (on-bin) sine sees, dimensionless. Hann 0.5. */
  coherentGain: number;
  /** Equivalent noise bandwidth N·Σw² / (Σw)², in bins. Hann 1.5. */
  enbwBins: number;
  /** Loss for a sine midway between bins, −20·log10(|Σ w[n]·e^(−jπn/N)| / Σw), in dB. Hann ≈ 1.42. */
  scallopLossDb: number;
  /** Σw (for amplitude scaling). */
  sum: number;
  /** Σw² (for power-density scaling). */
  sumSquares: number;
}

/**
 * Coherent gain, equivalent noise bandwidth and scallop loss of a window, by Harris's definitions
 * (Proc. IEEE 66(1), 1978, the figures of merit of his Table I): CG = Σw/N;
 * ENBW = N·Σw²/(Σw)² bins; scallop loss = −20·log10(|W(½ bin)|/W(0)).
 *
 * @param w window samples
 * @example windowStats(hannWindow(4096)) // → coherentGain 0.5, enbwBins 1.5, scallopLossDb ≈ 1.42
 */
export function windowStats(w: ArrayLike<number>): WindowStats {
  const n = w.length;
  if (n === 0) throw new RangeError('windowStats: window is empty');
  let sum = 0;
  let sumSquares = 0;
  let hr = 0;
  let hi = 0;
  for (let i = 0; i < n; i++) {
    const v = w[i];
    sum += v;
    sumSquares += v * v;
    const phi = (Math.PI * i) / n;
    hr += v * Math.cos(phi);
    hi -= v * Math.sin(phi);
  }
  return {
    coherentGain: sum / n,
    enbwBins: (n * sumSquares) / (sum * sum),
    scallopLossDb: -20 * Math.log10(Math.hypot(hr, hi) / sum),
    sum,
    sumSquares,
  };
}
