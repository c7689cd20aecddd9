/**
 * Unit conversions at the edges. Everything inside coilcue is SI (seconds, hertz, volts, amperes,
 * watts, kelvin differences, metres, farads, henries); decibels, degrees Celsius and milliseconds
 * appear only where a person reads or types them, and every conversion lives here.
 */

/** 0 °C in kelvin (SI definition, BIPM SI Brochure 9th ed.). */
export const ZERO_CELSIUS_K = 273.15;

/** Amplitude ratio → dB: 20·log10(x). 0 → -Infinity; negative input → NaN. */
export const ampToDb = (ratio: number): number => 20 * Math.log10(ratio);

/** dB → amplitude ratio: 10^(dB/20). */
export const dbToAmp = (db: number): number => Math.pow(10, db / 20);

/** Power ratio → dB: 10·log10(x). 0 → -Infinity. */
export const powerToDb = (ratio: number): number => 10 * Math.log10(ratio);

/** dB → power ratio: 10^(dB/10). */
export const dbToPower = (db: number): number => Math.pow(10, db / 10);

/** Celsius → kelvin. */
export const celsiusToKelvin = (c: number): number => c + ZERO_CELSIUS_K;

/** Kelvin → Celsius. */
export const kelvinToCelsius = (k: number): number => k - ZERO_CELSIUS_K;

/** Milliseconds → seconds. */
export const msToS = (ms: number): number => ms / 1000;

/** Seconds → milliseconds. */
export const sToMs = (s: number): number => s * 1000;

/**
 * JSON has no -Infinity: a level of digital silence (-∞ dB) is written as null.
 * Use at the serialisation edge only.
 */
export const finiteOrNull = (x: number): number | null => (Number.isFinite(x) ? x : null);
