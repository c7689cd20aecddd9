/**
 * K-weighting of ITU-R BS.1770-4 (Annex 1): a high-frequency shelf ("pre-filter", +4 dB above
 * ~2 kHz, modelling the head) followed by the revised low-frequency B-curve ("RLB", a 2nd-order
 * high-pass near 38 Hz).
 *
 * The standard tabulates coefficients for 48 kHz only and says other rates need their own. We derive
 * them at any rate from analogue prototypes fitted to the 48 kHz table, mapped with the bilinear
 * transform prewarped at each prototype's corner: K = tan(π·fc/fs), s → (1/K)·(1 − z⁻¹)/(1 + z⁻¹).
 * At 48 kHz this reproduces BS.1770-4 Tables 1–2 to ~1e-15.
 */
import { biquadFilter, biquadPowerGain, type BiquadCoeffs, type BiquadState } from './biquad.ts';

/**
 * Analogue prototype of the K-weighting shelf, normalised to its corner ω_c = 2π·cornerHz:
 *
 *   H(s) = (highGain·s² + bandGain·s/q + lowGain) / (s² + s/q + 1)
 *
 * Gains are linear amplitude ratios (highGain ≈ +4.0 dB, bandGain ≈ +2.0 dB, lowGain = 0 dB).
 * Values: the prototype fitted to BS.1770-4 Table 1 (as circulated in open implementations; they
 * reproduce the table to 1e-15 at 48 kHz, which the tests check).
 */
export const K_SHELF_PROTOTYPE = {
  highGain: 1.584864701130855,
  bandGain: 1.258720930232562,
  lowGain: 1.0,
  q: 0.7071752369554196,
  cornerHz: 1681.974450955533,
} as const;

/**
 * Analogue prototype of the RLB high-pass, normalised to ω_c = 2π·cornerHz:
 *
 *   H(s) = passbandGain · s² / (s² + s/q + 1)
 *
 * BS.1770-4 Table 2 gives the numerator as exactly 1, −2, 1, i.e. not divided by the bilinear a0,
 * so the 48 kHz filter has a passband gain of a0(48 kHz) = 1 + K/q + K² ≈ 1.004995 (+0.0433 dB).
 * The −0.691 dB constant of the loudness formula is calibrated to that. We keep this analogue gain
 * at every rate (numerator = passbandGain/a0(fs)·[1, −2, 1]), so the cascade response, and the
 * 997 Hz calibration, stay the same across rates instead of drifting by ~0.004 dB at 44.1 kHz.
 */
export const K_HIGHPASS_PROTOTYPE = (() => {
  const q = 0.5003270373238773;
  const cornerHz = 38.13547087602444;
  const k48 = Math.tan((Math.PI * cornerHz) / 48000);
  return { q, cornerHz, passbandGain: 1 + k48 / q + k48 * k48 };
})();

/** The two K-weighting stages at one sample rate (a0 = 1). */
export interface KWeightingCoeffs {
  /** Stage 1: high-frequency shelf (BS.1770-4 Table 1 at 48 kHz). */
  shelf: BiquadCoeffs;
  /** Stage 2: RLB high-pass (BS.1770-4 Table 2 at 48 kHz). */
  highPass: BiquadCoeffs;
}

/**
 * K-weighting biquad coefficients for any sample rate, by the bilinear transform of
 * {@link K_SHELF_PROTOTYPE} and {@link K_HIGHPASS_PROTOTYPE} with K = tan(π·fc/fs), a0 = 1 + K/q + K²:
 *
 *   shelf:     b0 = (Vh + Vb·K/q + Vl·K²)/a0,  b1 = 2(Vl·K² − Vh)/a0,  b2 = (Vh − Vb·K/q + Vl·K²)/a0
 *   both:      a1 = 2(K² − 1)/a0,  a2 = (1 − K/q + K²)/a0
 *   high-pass: b = (G/a0)·[1, −2, 1]
 *
 * Source: ITU-R BS.1770-4 Annex 1 (Tables 1–2 are the 48 kHz values); bilinear transform with
 * prewarping (Oppenheim & Schafer, *Discrete-Time Signal Processing*, 3rd ed., IIR design by the
 * bilinear transformation [recalled]).
 *
 * @param sampleRateHz sample rate, above 2·1682 Hz (the shelf corner must lie below Nyquist)
 * @example kWeightingCoeffs(48000).shelf.b0 // → 1.53512485958697 (BS.1770-4 Table 1)
 */
export function kWeightingCoeffs(sampleRateHz: number): KWeightingCoeffs {
  if (!(Number.isFinite(sampleRateHz) && sampleRateHz > 2 * K_SHELF_PROTOTYPE.cornerHz)) {
    throw new RangeError(
      `kWeightingCoeffs: sampleRateHz must be finite and above ${2 * K_SHELF_PROTOTYPE.cornerHz} Hz, got ${sampleRateHz}`,
    );
  }
  const { highGain: vh, bandGain: vb, lowGain: vl, q: qs, cornerHz: fs1 } = K_SHELF_PROTOTYPE;
  const k = Math.tan((Math.PI * fs1) / sampleRateHz);
  const k2 = k * k;
  const a0 = 1 + k / qs + k2;
  const shelf: BiquadCoeffs = {
    b0: (vh + (vb * k) / qs + vl * k2) / a0,
    b1: (2 * (vl * k2 - vh)) / a0,
    b2: (vh - (vb * k) / qs + vl * k2) / a0,
    a1: (2 * (k2 - 1)) / a0,
    a2: (1 - k / qs + k2) / a0,
  };
  const { q: qh, cornerHz: fh, passbandGain } = K_HIGHPASS_PROTOTYPE;
  const kh = Math.tan((Math.PI * fh) / sampleRateHz);
  const kh2 = kh * kh;
  const a0h = 1 + kh / qh + kh2;
  const g = passbandGain / a0h;
  const highPass: BiquadCoeffs = {
    b0: g,
    b1: -2 * g,
    b2: g,
    a1: (2 * (kh2 - 1)) / a0h,
    a2: (1 - kh / qh + kh2) / a0h,
  };
  return { shelf, highPass };
}

/**
 * Magnitude response of the K-weighting cascade in dB (shelf × RLB high-pass), from the digital
 * filters at `sampleRateHz`. Source: ITU-R BS.1770-4 Annex 1 (the filters), response formula as in
 * {@link biquadPowerGain}.
 *
 * @example kWeightingGainDb(997, 48000) // → +0.691 dB (the offset BS.1770's −0.691 cancels)
 */
export function kWeightingGainDb(freqHz: number, sampleRateHz: number): number {
  const { shelf, highPass } = kWeightingCoeffs(sampleRateHz);
  return (
    10 *
    Math.log10(biquadPowerGain(shelf, freqHz, sampleRateHz) * biquadPowerGain(highPass, freqHz, sampleRateHz))
  );
}

/**
 * K-weights one channel: both stages from rest, in float64 (ITU-R BS.1770-4 Annex 1).
 * `out` may be omitted (allocated). For measuring loudness, `measureLoudness` uses a fused kernel that
 * never stores the filtered signal; this function is for inspection and tests.
 *
 * @param samples one channel, full scale ±1
 * @param sampleRateHz sample rate of `samples`
 * @returns the K-weighted signal (full scale ±1 units)
 * @example kWeight(new Float32Array(48000).fill(0.1), 48000) // a DC step: decays to 0 (RLB high-pass)
 */
export function kWeight(samples: Float32Array, sampleRateHz: number, out?: Float64Array): Float64Array {
  const { shelf, highPass } = kWeightingCoeffs(sampleRateHz);
  const y = biquadFilter(shelf, samples, out ?? new Float64Array(samples.length));
  const state: BiquadState = { s1: 0, s2: 0 };
  return biquadFilter(highPass, y, y, state);
}
