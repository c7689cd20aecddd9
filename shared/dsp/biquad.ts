/**
 * Second-order IIR sections ("biquads") with a0 normalised to 1:
 *
 *   H(z) = (b0 + b1·z⁻¹ + b2·z⁻²) / (1 + a1·z⁻¹ + a2·z⁻²)
 *
 * Filtering runs in transposed direct form II with float64 state (Oppenheim & Schafer,
 * *Discrete-Time Signal Processing*, 3rd ed., chapter on filter structures [recalled]). In float64 the form's sensitivity to poles
 * near z = 1 (for example the K-weighting high-pass at 38 Hz, pole radius ≈ 0.995) costs far less
 * than a 24-bit sample's resolution.
 */

/** Biquad coefficients, a0 normalised to 1 (dimensionless). */
export interface BiquadCoeffs {
  b0: number;
  b1: number;
  b2: number;
  a1: number;
  a2: number;
}

/** The two delay-line values of a transposed direct form II section (float64). */
export interface BiquadState {
  s1: number;
  s2: number;
}

/**
 * Filters `input` through one biquad in transposed direct form II:
 *
 *   y[n] = b0·x[n] + s1;  s1 ← b1·x[n] − a1·y[n] + s2;  s2 ← b2·x[n] − a2·y[n]
 *
 * The filter starts from `state` (default: at rest, s1 = s2 = 0) and `state` is updated in place, so
 * consecutive calls process one long signal in pieces. `out` may be `input` itself when that is a
 * Float64Array (in-place filtering). Source: Oppenheim & Schafer, *Discrete-Time Signal Processing*,
 * 3rd ed., transposed direct form II [recalled].
 *
 * @param coeffs section coefficients (a0 = 1)
 * @param input samples (full scale ±1 for audio; any unit, the filter is linear)
 * @param out destination of input.length values (allocated when absent)
 * @param state delay-line state, updated in place
 * @returns `out`, the filtered samples in float64
 * @example
 *   // two-point moving average: y[n] = (x[n] + x[n−1]) / 2
 *   biquadFilter({ b0: 0.5, b1: 0.5, b2: 0, a1: 0, a2: 0 }, Float32Array.of(1, 1, 0)) // → [0.5, 1, 0.5]
 */
export function biquadFilter(
  coeffs: BiquadCoeffs,
  input: Float32Array | Float64Array,
  out: Float64Array = new Float64Array(input.length),
  state: BiquadState = { s1: 0, s2: 0 },
): Float64Array {
  if (out.length < input.length) {
    throw new RangeError(`biquadFilter: out has ${out.length} values, input has ${input.length}`);
  }
  const { b0, b1, b2, a1, a2 } = coeffs;
  let s1 = state.s1;
  let s2 = state.s2;
  const n = input.length;
  for (let i = 0; i < n; i++) {
    const x = input[i];
    const y = b0 * x + s1;
    s1 = b1 * x - a1 * y + s2;
    s2 = b2 * x - a2 * y;
    out[i] = y;
  }
  state.s1 = s1;
  state.s2 = s2;
  return out;
}

/**
 * A stateful biquad processor for sample-by-sample use (`next`, `reset`), same arithmetic as
 * {@link biquadFilter}.
 *
 * @example
 *   const f = createBiquad({ b0: 1, b1: 0, b2: 0, a1: -0.5, a2: 0 }); // y[n] = x[n] + 0.5·y[n−1]
 *   f.next(1); f.next(0); // → 1, then 0.5
 */
export function createBiquad(coeffs: BiquadCoeffs): { next(x: number): number; reset(): void } {
  const { b0, b1, b2, a1, a2 } = coeffs;
  let s1 = 0;
  let s2 = 0;
  return {
    next(x: number): number {
      const y = b0 * x + s1;
      s1 = b1 * x - a1 * y + s2;
      s2 = b2 * x - a2 * y;
      return y;
    },
    reset(): void {
      s1 = 0;
      s2 = 0;
    },
  };
}

/**
 * Squared magnitude |H(e^{jω})|² of a biquad at ω = 2π·freqHz/sampleRateHz. With c = cos²(ω/2) and
 * s = sin²(ω/2) (so cos ω = c − s and 1 = c + s), each polynomial P(z) = p0 + p1·z⁻¹ + p2·z⁻² gives
 *
 *   |P|² = (p0+p1+p2)²·c² + (p0−p1+p2)²·s² + 2(p0² + p1² + p2² − 6·p0·p2)·c·s
 *
 * and |H|² = |B|²/|A|² (a0 = 1). This is the expansion of |P|² = Σpᵢ² + 2(p0p1 + p1p2)cos ω +
 * 2p0p2·cos 2ω (the frequency response, z = e^{jω}) rewritten so
 * that the DC term carries c² and the Nyquist term s²: both ends keep full relative precision, where
 * the cos ω form (and the sin² form of the RBJ *Audio EQ Cookbook*, exact at DC only) lose digits,
 * e.g. for a high-pass at 20 Hz and 48 kHz (1 − cos ω ≈ 3·10⁻⁶).
 *
 * @example biquadPowerGain({ b0: 0.5, b1: 0.5, b2: 0, a1: 0, a2: 0 }, 12000, 48000) // → 0.5 (cos²(π/4))
 */
export function biquadPowerGain(coeffs: BiquadCoeffs, freqHz: number, sampleRateHz: number): number {
  const { b0, b1, b2, a1, a2 } = coeffs;
  const half = (Math.PI * freqHz) / sampleRateHz;
  const cs = Math.cos(half);
  const sn = Math.sin(half);
  const c = cs * cs;
  const s = sn * sn;
  return polyPower(b0, b1, b2, c, s) / polyPower(1, a1, a2, c, s);
}

/** |p0 + p1·z⁻¹ + p2·z⁻²|² on the unit circle, from c = cos²(ω/2), s = sin²(ω/2). */
function polyPower(p0: number, p1: number, p2: number, c: number, s: number): number {
  const dc = p0 + p1 + p2;
  const ny = p0 - p1 + p2;
  return dc * dc * c * c + ny * ny * s * s + 2 * (p0 * p0 + p1 * p1 + p2 * p2 - 6 * p0 * p2) * c * s;
}

/**
 * Magnitude response of a biquad in dB: 10·log10 |H(e^{jω})|², ω = 2π·freqHz/sampleRateHz (see
 * {@link biquadPowerGain} for the formula and source). A zero of the response gives −Infinity.
 *
 * @param freqHz frequency, 0 … sampleRateHz/2
 * @param sampleRateHz sample rate the coefficients were designed for
 * @example biquadGainDb({ b0: 0.5, b1: 0.5, b2: 0, a1: 0, a2: 0 }, 12000, 48000) // → −3.0103 dB
 */
export function biquadGainDb(coeffs: BiquadCoeffs, freqHz: number, sampleRateHz: number): number {
  return 10 * Math.log10(biquadPowerGain(coeffs, freqHz, sampleRateHz));
}
