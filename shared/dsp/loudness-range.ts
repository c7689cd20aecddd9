/**
 * Loudness range (LRA) of EBU Tech 3342: the spread of the short-term loudness distribution, from
 * the 10th to the 95th percentile, after an absolute gate at −70 LUFS and a relative gate 20 LU below
 * the energy mean of the absolutely gated blocks.
 */
import { ABSOLUTE_GATE_LUFS, RANGE_RELATIVE_GATE_LU, gate } from './gating.ts';

/** Lower percentile of the LRA, %. EBU Tech 3342. */
export const LRA_LOW_PERCENTILE = 10;
/** Upper percentile of the LRA, %. EBU Tech 3342. */
export const LRA_HIGH_PERCENTILE = 95;

/**
 * Percentile of an ascending array by EBU Tech 3342's rule: the value at the 1-based index
 * round((n − 1)·p/100 + 1), i.e. 0-based index round((n − 1)·p/100) (halves round up).
 * Empty input → NaN.
 *
 * @param sortedAscending values sorted ascending
 * @param percent 0 … 100
 * @example percentileSorted(Float64Array.of(1, 2, 3, 4, 5), 95) // → 5 (index round(4·0.95) = 4)
 */
export function percentileSorted(sortedAscending: ArrayLike<number>, percent: number): number {
  const n = sortedAscending.length;
  if (n === 0) return NaN;
  return sortedAscending[Math.round(((n - 1) * percent) / 100)];
}

/**
 * Loudness range, LU, from a short-term loudness series (3 s windows, updated at ≥ 10 Hz):
 *
 *   keep Lⱼ > −70 LUFS; Γr = (energy mean of those) − 20 LU; keep Lⱼ > max(Γr, −70);
 *   LRA = P95 − P10 of the kept values (percentile rule of {@link percentileSorted}).
 *
 * Source: EBU Tech 3342 (2016), algorithm description. With no block above the gates the
 * result is 0 LU (no measurable spread; the standard does not define this case).
 *
 * @param shortTermLufs short-term loudness values, LUFS (−Infinity for silent windows is fine)
 * @example loudnessRangeLu(Float64Array.of(-20, -20, -30, -30)) // → 10 LU
 */
export function loudnessRangeLu(shortTermLufs: ArrayLike<number>): number {
  const { relativeGateLufs, count } = gate(shortTermLufs, RANGE_RELATIVE_GATE_LU);
  if (count === 0) return 0;
  const threshold = Math.max(relativeGateLufs, ABSOLUTE_GATE_LUFS);
  const kept = new Float64Array(count);
  let m = 0;
  for (let j = 0; j < shortTermLufs.length; j++) {
    const l = shortTermLufs[j];
    if (l > threshold) kept[m++] = l;
  }
  kept.sort();
  return percentileSorted(kept, LRA_HIGH_PERCENTILE) - percentileSorted(kept, LRA_LOW_PERCENTILE);
}
