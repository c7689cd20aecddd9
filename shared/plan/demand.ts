/**
 * The clip's thermal demand against the driver's duty-cycle budget, as functions of burst length.
 *
 * Demand: for each window length T, the highest mean of a normalised power series (delivered power
 * / full-rail power, or pulse duty) over any window of that length in the clip (sliding window over
 * prefix sums; exact on the frame grid).
 *
 * Budget: the largest constant fraction d of full-rail loss that a device may carry for a burst of
 * length T, starting from the thermal state at ambient, without its junction rising by more than
 * the allowed ΔT: d(T) = min(1, ΔT_allowed / (P_full · Zth(T))). This is the single-pulse transient
 * thermal impedance method of power-device datasheets (NXP AN11261 "Using RC Thermal Models";
 * Infineon AN2008-03): a constant power P for time T raises the junction by P·Zth(T).
 * Where demand(T) > budget(T) the clip is in danger for bursts of that length.
 */

/** Window lengths, s, log-spaced from minS to maxS (both included), `perDecade` per decade. */
export function logSpacedLengthsS(minS: number, maxS: number, perDecade = 6): Float64Array {
  if (!(minS > 0 && maxS >= minS)) throw new RangeError(`logSpacedLengthsS: need 0 < minS ≤ maxS, got ${minS}, ${maxS}`);
  const decades = Math.log10(maxS / minS);
  const n = Math.max(1, Math.ceil(decades * perDecade)) + 1;
  const out = new Float64Array(n);
  for (let i = 0; i < n; i++) out[i] = minS * Math.pow(maxS / minS, n === 1 ? 0 : i / (n - 1));
  return out;
}

/**
 * Highest mean of `series` (one value per frame of `frameS`) over any window of each length.
 * A length shorter than one frame uses one frame; longer than the clip uses the whole clip.
 * Also returns where (start time, s) the worst window of each length begins.
 *
 * @example maxWindowMean(Float64Array.of(0, 1, 1, 0), 0.001, Float64Array.of(0.002)).meanMax[0] // 1
 */
export function maxWindowMean(
  series: Float64Array,
  frameS: number,
  lengthsS: Float64Array,
): { meanMax: Float64Array; atS: Float64Array } {
  const n = series.length;
  const prefix = new Float64Array(n + 1);
  for (let k = 0; k < n; k++) prefix[k + 1] = prefix[k] + series[k];
  const meanMax = new Float64Array(lengthsS.length);
  const atS = new Float64Array(lengthsS.length);
  for (let j = 0; j < lengthsS.length; j++) {
    const w = Math.min(n, Math.max(1, Math.round(lengthsS[j] / frameS)));
    let best = -Infinity;
    let at = 0;
    for (let k = 0; k + w <= n; k++) {
      const s = prefix[k + w] - prefix[k];
      if (s > best) {
        best = s;
        at = k;
      }
    }
    meanMax[j] = n === 0 ? 0 : best / w;
    atS[j] = at * frameS;
  }
  return { meanMax, atS };
}

/**
 * Duty budget d(T) = min(1, ΔT / (P_full·Zth(T))) for each burst length (module comment).
 * ΔT ≤ 0 (no allowed rise) gives 0 everywhere; P_full ≤ 0 gives 1 (the device never heats).
 *
 * @param allowedRiseK  tjMax − margin − ambient, K
 * @param fullLossW  the device's loss at full-rail operation, W
 * @param zthKPerW  single-pulse transient thermal impedance junction→ambient, K/W, as a function of time
 */
export function dutyBudget(
  lengthsS: Float64Array,
  allowedRiseK: number,
  fullLossW: number,
  zthKPerW: (tS: number) => number,
): Float64Array {
  const out = new Float64Array(lengthsS.length);
  for (let j = 0; j < lengthsS.length; j++) {
    if (allowedRiseK <= 0) out[j] = 0;
    else if (fullLossW <= 0) out[j] = 1;
    else out[j] = Math.min(1, allowedRiseK / (fullLossW * zthKPerW(lengthsS[j])));
  }
  return out;
}

/** Shortest burst length at which demand exceeds budget, or null when it never does. */
export function firstCrossing(
  lengthsS: Float64Array,
  demand: Float64Array,
  budget: Float64Array,
): { lengthS: number; demand: number; budget: number } | null {
  for (let j = 0; j < lengthsS.length; j++) {
    if (demand[j] > budget[j]) return { lengthS: lengthsS[j], demand: demand[j], budget: budget[j] };
  }
  return null;
}
