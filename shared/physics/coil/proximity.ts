/**
 * The proximity effect of a single-layer winding: the field of the neighbouring turns crowds each
 * turn's current further than the skin effect of an isolated wire does, so a wound coil's RF
 * resistance is a multiple Φ of the same wire's resistance straightened.
 *
 * Source: R. G. Medhurst, "H.F. resistance and self-capacitance of single-layer solenoids",
 * Wireless Engineer 24, Feb. 1947 pp. 35–43 and Mar. 1947 pp. 80–92 (the paper the self-capacitance
 * table of ./self-capacitance.ts comes from): his measured table of Φ = R_coil/R_straight against
 * the coil's length-to-diameter ratio l/D and the wire's diameter-to-pitch ratio d/p, taken where
 * the skin effect is fully developed. The values below are the table as reproduced by D. W. Knight
 * ("Solenoid inductance calculation", g3ynh.info, 2007–2016) and S. Stroobandt (hamwaves.com);
 * the l/D → ∞ row is Medhurst's extrapolation.
 */

/** l/D of the table's rows (the last, Infinity, a long-coil limit). */
export const MEDHURST_PROXIMITY_L_OVER_D: readonly number[] = [0, 0.2, 0.4, 0.6, 0.8, 1, 2, 4, 6, 8, 10, Infinity];

/** d/p of the table's columns: close-wound (1) to widely spaced (0, no proximity). */
export const MEDHURST_PROXIMITY_D_OVER_P: readonly number[] = [1, 0.9, 0.8, 0.7, 0.6, 0.5, 0.4, 0.3, 0.2, 0.1, 0];

/** Φ by row (l/D) and column (d/p), Medhurst 1947. */
export const MEDHURST_PROXIMITY_TABLE: ReadonlyArray<readonly number[]> = [
  [5.31, 3.73, 2.74, 2.12, 1.74, 1.44, 1.2, 1.16, 1.07, 1.02, 1.0],
  [5.45, 3.84, 2.83, 2.2, 1.77, 1.48, 1.29, 1.19, 1.08, 1.02, 1.0],
  [5.65, 3.99, 2.97, 2.28, 1.83, 1.54, 1.33, 1.21, 1.08, 1.03, 1.0],
  [5.8, 4.11, 3.1, 2.38, 1.89, 1.6, 1.38, 1.22, 1.1, 1.03, 1.0],
  [5.8, 4.17, 3.2, 2.44, 1.92, 1.64, 1.42, 1.23, 1.1, 1.03, 1.0],
  [5.55, 4.1, 3.17, 2.47, 1.94, 1.67, 1.45, 1.24, 1.1, 1.03, 1.0],
  [4.1, 3.36, 2.74, 2.32, 1.98, 1.74, 1.5, 1.28, 1.13, 1.04, 1.0],
  [3.54, 3.05, 2.6, 2.27, 2.01, 1.78, 1.54, 1.32, 1.15, 1.04, 1.0],
  [3.31, 2.92, 2.6, 2.29, 2.03, 1.8, 1.56, 1.34, 1.16, 1.04, 1.0],
  [3.2, 2.9, 2.62, 2.34, 2.08, 1.81, 1.57, 1.34, 1.165, 1.04, 1.0],
  [3.23, 2.93, 2.65, 2.27, 2.1, 1.83, 1.58, 1.35, 1.17, 1.04, 1.0],
  [3.41, 3.11, 2.815, 2.51, 2.22, 1.93, 1.65, 1.395, 1.19, 1.05, 1.0],
];

/**
 * Medhurst's proximity factor Φ for a single-layer coil of length-to-diameter ratio l/D wound with
 * wire of diameter d at pitch p: bilinear interpolation in the table, linear in d/p (the columns'
 * even step) and, between rows, linear in l/D up to 10 and linear in D/l from 10 to the l/D → ∞
 * row. d/p above 1 (touching turns) is clamped to 1. Exact at the table's points.
 * Example: medhurstProximityFactor(4, 1.25) = 2.60 (row l/D = 4, column d/p = 0.8).
 */
export function medhurstProximityFactor(lengthOverDiameter: number, pitchOverWireDiameter: number): number {
  const x = lengthOverDiameter;
  const q = 1 / pitchOverWireDiameter;
  if (!(x > 0) || !Number.isFinite(x)) throw new RangeError(`medhurstProximityFactor: lengthOverDiameter must be > 0 and finite, got ${x}`);
  if (!(pitchOverWireDiameter > 0)) throw new RangeError(`medhurstProximityFactor: pitchOverWireDiameter must be > 0, got ${pitchOverWireDiameter}`);
  const cols = MEDHURST_PROXIMITY_D_OVER_P;
  const dOverP = Math.min(1, Math.max(0, q));
  // Column j with cols[j] ≥ d/p ≥ cols[j + 1] (descending 1 … 0 in steps of 0.1).
  const j = Math.min(cols.length - 2, Math.floor((1 - dOverP) * 10 + 1e-12));
  const tc = (cols[j] - dOverP) / (cols[j] - cols[j + 1]);
  const rowAt = (i: number): number => MEDHURST_PROXIMITY_TABLE[i][j] + tc * (MEDHURST_PROXIMITY_TABLE[i][j + 1] - MEDHURST_PROXIMITY_TABLE[i][j]);
  const rows = MEDHURST_PROXIMITY_L_OVER_D;
  const last = rows.length - 1;
  if (x >= rows[last - 1]) {
    // Between l/D = 10 and ∞: linear in D/l (0.1 → 0).
    const t = 1 - rows[last - 1] / x;
    return rowAt(last - 1) + t * (rowAt(last) - rowAt(last - 1));
  }
  let i = 1;
  while (rows[i] < x) i++;
  const tr = (x - rows[i - 1]) / (rows[i] - rows[i - 1]);
  return rowAt(i - 1) + tr * (rowAt(i) - rowAt(i - 1));
}
