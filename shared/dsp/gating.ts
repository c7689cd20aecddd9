/**
 * Gating helpers shared by integrated loudness (ITU-R BS.1770-4) and loudness range (EBU Tech 3342):
 * both keep the blocks above an absolute gate, then those above a relative gate set some LU below the
 * energy mean of the first set. Levels are averaged as energies (10^(L/10)), never as dB values.
 */

/** Absolute gate, LUFS: blocks at or below it are ignored. ITU-R BS.1770-4 Annex 1 (gating); EBU Tech 3342. */
export const ABSOLUTE_GATE_LUFS = -70;

/** Relative gate for integrated loudness, LU below the absolutely gated mean. ITU-R BS.1770-4 Annex 1. */
export const INTEGRATED_RELATIVE_GATE_LU = -10;

/** Relative gate for loudness range, LU below the absolutely gated mean. EBU Tech 3342. */
export const RANGE_RELATIVE_GATE_LU = -20;

/**
 * Offset of the BS.1770 loudness formula, dB: L = −0.691 + 10·log10(Σ Gᵢ·zᵢ). It cancels the
 * K-weighting gain at 997 Hz. Source: ITU-R BS.1770-4 Annex 1 (loudness formula).
 */
export const LOUDNESS_OFFSET_DB = -0.691;

/**
 * Loudness of a channel-weighted mean square: L = −0.691 + 10·log10(z), LUFS. z = 0 → −Infinity.
 * Source: ITU-R BS.1770-4 Annex 1 (loudness formula).
 *
 * @param meanSquare Σ Gᵢ·zᵢ, weighted mean square of the K-weighted channels (full scale = 1)
 * @example loudnessLufs(0.5) // → −3.70 LUFS (a 0 dBFS 997 Hz sine in one channel reads −3.01 after K)
 */
export const loudnessLufs = (meanSquare: number): number => LOUDNESS_OFFSET_DB + 10 * Math.log10(meanSquare);

/**
 * Energy mean of levels in LUFS, over those strictly above `thresholdLufs`:
 * 10·log10( mean over {j : Lⱼ > threshold} of 10^(Lⱼ/10) ). The −0.691 offset cancels, so this
 * equals BS.1770's "loudness of the mean block energy". Returns −Infinity and count 0 when no level
 * passes. Source: ITU-R BS.1770-4 Annex 1 (gated loudness).
 *
 * @example energyMeanAbove(Float64Array.of(-20, -30, -80), -70) // → { meanLufs: −22.60, count: 2 }
 */
export function energyMeanAbove(
  levelsLufs: ArrayLike<number>,
  thresholdLufs: number,
): { meanLufs: number; count: number } {
  let sum = 0;
  let count = 0;
  for (let j = 0; j < levelsLufs.length; j++) {
    const l = levelsLufs[j];
    if (l > thresholdLufs) {
      sum += Math.pow(10, l / 10);
      count++;
    }
  }
  return { meanLufs: count === 0 ? -Infinity : 10 * Math.log10(sum / count), count };
}

/**
 * Two-stage gating: absolute gate −70 LUFS, then a relative gate `relativeGateLu` below the energy
 * mean of the absolutely gated levels. Returns the relative threshold and the gated energy mean.
 * Gates are strict (L > Γ), as in BS.1770-4 Annex 1 (l_j > Γ). With no level above −70 LUFS both are
 * −Infinity. Sources: ITU-R BS.1770-4 Annex 1 (relative gate −10 LU); EBU Tech 3342 (−20 LU).
 *
 * @param levelsLufs block loudness values (may hold −Infinity for silent blocks)
 * @param relativeGateLu negative, e.g. −10 for integrated loudness, −20 for loudness range
 * @example gate(Float64Array.of(-23, -23, -40), -10) // → { relativeGateLufs: −34.72, meanLufs: −23, count: 2 }
 */
export function gate(
  levelsLufs: ArrayLike<number>,
  relativeGateLu: number,
): { relativeGateLufs: number; meanLufs: number; count: number } {
  const absolute = energyMeanAbove(levelsLufs, ABSOLUTE_GATE_LUFS);
  if (absolute.count === 0) return { relativeGateLufs: -Infinity, meanLufs: -Infinity, count: 0 };
  const relativeGateLufs = absolute.meanLufs + relativeGateLu;
  // Blocks must pass both gates; the relative gate lies below the mean of absolutely gated blocks but
  // may lie below −70 LUFS, so take the higher of the two thresholds.
  const threshold = Math.max(relativeGateLufs, ABSOLUTE_GATE_LUFS);
  const relative = energyMeanAbove(levelsLufs, threshold);
  return { relativeGateLufs, meanLufs: relative.meanLufs, count: relative.count };
}
