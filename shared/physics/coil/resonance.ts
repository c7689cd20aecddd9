/**
 * Resonance, quality factor and the envelope (modulation) response of a lightly damped resonator.
 */

/**
 * Resonant frequency of an LC tank, f0 = 1/(2π√(LC)) in Hz (Thomson's formula; any circuits text).
 * Example: resonanceHz(28.695e-3, 6.1e-12) = 380.4 kHz.
 */
export const resonanceHz = (inductanceH: number, capacitanceF: number): number =>
  1 / (2 * Math.PI * Math.sqrt(inductanceH * capacitanceF));

/**
 * Quality factor of a series-loss inductor at frequency f: Q = 2πfL/R (ratio of reactance to
 * series resistance; for a tank whose only loss is R, also f0 over the half-power bandwidth).
 * Example: qualityFactor(380e3, 28.7e-3, 200) = 342.6.
 */
export const qualityFactor = (frequencyHz: number, inductanceH: number, resistanceOhm: number): number =>
  (2 * Math.PI * frequencyHz * inductanceH) / resistanceOhm;

/**
 * Modulation (envelope) corner of a resonator driven at resonance, Hz: f0/(2Q). A band-pass of
 * half-power bandwidth B = f0/Q acts on the envelope of a carrier at its centre like its low-pass
 * equivalent, a first-order low-pass of corner B/2 (narrow-band low-pass equivalent of band-pass
 * systems, e.g. S. Haykin, *Communication Systems*, 4th ed., §2.12; valid for Q ≫ 1).
 * Example: modulationCornerHz(400e3, 100) = 2 kHz.
 */
export const modulationCornerHz = (resonanceFrequencyHz: number, q: number): number => resonanceFrequencyHz / (2 * q);

/**
 * Envelope (amplitude) time constant of ring-up and ring-down, s: τ = 2Q/ω0 = Q/(π f0), the
 * inverse of 2π·modulationCornerHz (free decay of a series RLC: amplitude ∝ e^{−Rt/(2L)},
 * R/(2L) = ω0/(2Q)). Example: ringUpTauS(400e3, 100) = 79.6 µs.
 */
export const ringUpTauS = (resonanceFrequencyHz: number, q: number): number => q / (Math.PI * resonanceFrequencyHz);
