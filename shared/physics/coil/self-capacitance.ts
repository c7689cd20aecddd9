/**
 * Self-capacitance of a single-layer solenoid: Medhurst's measured table (the reference) and the
 * Radiotron Designer's Handbook closed-form fit to it. Air-wound coils on thin tubes can sit well
 * below the table (the table's coils were on solid polystyrene rods): treat any figure here as an
 * estimate, and a measured resonance as the truth. (An air-core model after D. W. Knight was
 * removed: its coefficients could not be confirmed against the published paper.)
 */

/**
 * Medhurst's table (R. G. Medhurst, "H.F. resistance and self-capacitance of single-layer
 * solenoids", Wireless Engineer, Feb. and Mar. 1947): C[pF] = H·D[cm], H by l/D. Measured on coils
 * wound on solid polystyrene rods, one end grounded, no nearby objects.
 */
export const MEDHURST_TABLE: ReadonlyArray<readonly [lOverD: number, h: number]> = [
  [0.1, 0.96], [0.2, 0.7], [0.3, 0.6], [0.5, 0.5], [0.8, 0.46], [1, 0.46], [1.5, 0.47], [2, 0.5],
  [3, 0.61], [4, 0.72], [5, 0.81], [7, 1.01], [10, 1.32], [15, 1.86], [20, 2.36], [30, 3.4], [50, 5.8],
];

/** Picofarads per (H · centimetre) in SI: C[F] = H·D[m]·1e-10. */
const F_PER_H_M = 1e-12 * 100;

/**
 * Medhurst's H factor at any l/D: exact at table points, linear in ln(l/D) between them (the table
 * is smooth and slowly varying in the log; the interpolation error is within the table's own
 * measurement scatter of a few %). Outside 0.1…50 the Radiotron fit is used, scaled to meet the
 * table's end value. Example: medhurstH(3) = 0.61; medhurstH(2.5) = 0.5605.
 */
export function medhurstH(lengthOverDiameter: number): number {
  const t = MEDHURST_TABLE;
  const x = lengthOverDiameter;
  if (!(x > 0) || !Number.isFinite(x)) throw new RangeError(`medhurstH: lengthOverDiameter must be > 0 and finite, got ${x}`);
  if (x < t[0][0]) return (t[0][1] * radiotronH(x)) / radiotronH(t[0][0]);
  const last = t[t.length - 1];
  if (x > last[0]) return (last[1] * radiotronH(x)) / radiotronH(last[0]);
  let i = 1;
  while (t[i][0] < x) i++;
  const [x0, h0] = t[i - 1];
  const [x1, h1] = t[i];
  const f = Math.log(x / x0) / Math.log(x1 / x0);
  return h0 + f * (h1 - h0);
}

/** True when l/D lies inside Medhurst's measured range 0.1…50. */
export const medhurstTableCovers = (lengthOverDiameter: number): boolean =>
  lengthOverDiameter >= MEDHURST_TABLE[0][0] && lengthOverDiameter <= MEDHURST_TABLE[MEDHURST_TABLE.length - 1][0];

/**
 * Self-capacitance from Medhurst's table, F: C = H(l/D)·D, with C in pF and D in cm (so
 * C[F] = H·D[m]·1e-10). D is the coil diameter. Example: D = 0.1 m, l = 0.3 m → 6.10 pF.
 */
export function medhurstSelfCapacitanceF(diameterM: number, lengthM: number): number {
  return medhurstH(lengthM / diameterM) * diameterM * F_PER_H_M;
}

/** Radiotron fit's H: 0.1126·l/D + 0.08 + 0.27·√(D/l). */
const radiotronH = (lOverD: number): number => 0.1126 * lOverD + 0.08 + 0.27 * Math.sqrt(1 / lOverD);

/**
 * Closed-form fit to Medhurst's table (F. Langford-Smith, ed., *Radiotron Designer's Handbook*,
 * 4th ed., 1953): C[pF] = D[cm]·(0.1126·l/D + 0.08 + 0.27·√(D/l)). Within ±4 % of the table for
 * l/D ≤ 2 and ≥ 7; 5–8 % low between. Example: D = 0.1 m, l = 0.3 m → 5.74 pF.
 */
export function radiotronSelfCapacitanceF(diameterM: number, lengthM: number): number {
  return radiotronH(lengthM / diameterM) * diameterM * F_PER_H_M;
}
