/**
 * A quality note, separate from the safety verdict: heavy peak limiting. The look-ahead limiter
 * keeps every limit, but when it cuts many samples deeply the music sounds squashed (loud passages
 * lose their dynamics, transients go dull). The note says so beyond a stated share of samples cut
 * by more than a stated depth, and suggests the gain at which it would not be.
 *
 * Estimate (plan, and the suggestion for a render): a sample x at gain g meets the ceiling c
 * (linear) and needs a cut of 20·log10(g·|x|/c) dB; it is cut by more than D dB when
 * |x| > c·10^(D/20)/g, so the share is fractionAbove(histogram, c·10^(D/20)/g)
 * (shared/dsp/histogram.ts). The gain that keeps that share at S is
 * g = c·10^(D/20)/q, q the (1 − S) quantile of |x| (percentileMagnitude). The limiter's attack and
 * release spread each cut over neighbouring samples, so the rendered share is somewhat larger than
 * this estimate. The render measures the share itself (the limiter's report), so its verdict is
 * exact; the suggested gain is estimated, with the spread measured at the render's gain
 * (measured share / estimated share, at least 1) taken to hold at the lower gain: it aims the
 * estimate at heavyShare / spread.
 * Thresholds: our choice, stated here and in the output (common practice: a few dB of occasional
 * peak limiting is inaudible on most music; sustained deep limiting is not).
 */
import { type MagnitudeHistogram, fractionAbove, percentileMagnitude } from '../dsp/histogram.ts';
import { ampToDb, dbToAmp } from '../units.ts';

/** Depth beyond which a cut counts as deep, dB. */
export const HEAVY_LIMITING_DEPTH_DB = 1;
/** Share of samples cut deeper than HEAVY_LIMITING_DEPTH_DB beyond which the music sounds squashed (0…1). */
export const HEAVY_LIMITING_SHARE = 0.01;

export interface LimitingNote {
  /** Share of samples cut by more than depthDb (0…1): measured on a render, estimated in a plan. */
  deepShare: number;
  basis: 'measured' | 'estimated';
  depthDb: number;
  /** The share beyond which the note is given (0…1). */
  heavyShare: number;
  heavy: boolean;
  /** The gain at which the share would be at most heavyShare, dB (estimated); null when no gain is needed (not heavy) or the clip is silent. */
  gainDbWithoutHeavyLimiting: number | null;
  /** One plain sentence when heavy, else null. */
  note: string | null;
}

/**
 * The note for a clip (its source's magnitude histogram) at `gainDb` under a ceiling of
 * `ceilingDbfs` on the gained signal. `measuredDeepShare`: the share a render's limiter reported
 * (then the verdict uses it; otherwise the estimate above).
 * @example limitingNote(plan.histogram, 13, 0).heavy
 */
export function limitingNote(hist: MagnitudeHistogram, gainDb: number, ceilingDbfs: number, measuredDeepShare?: number): LimitingNote {
  const depthDb = HEAVY_LIMITING_DEPTH_DB;
  const heavyShare = HEAVY_LIMITING_SHARE;
  const g = dbToAmp(gainDb);
  const deepLevel = dbToAmp(ceilingDbfs + depthDb);
  const estimated = g > 0 && hist.total > 0 ? fractionAbove(hist, deepLevel / g) : 0;
  const deepShare = measuredDeepShare ?? estimated;
  const basis = measuredDeepShare === undefined ? 'estimated' : 'measured';
  const heavy = deepShare > heavyShare;
  let gainDbWithoutHeavyLimiting: number | null = null;
  if (heavy && hist.total > 0) {
    // The limiter's spread: how many more samples it cut deeply than exceed the deep level
    // (1 for the estimate itself). The suggestion aims the estimate at the share over that spread.
    const spread = Math.max(1, deepShare / Math.max(estimated, 1 / hist.total));
    const q = percentileMagnitude(hist, 100 * (1 - heavyShare / spread));
    if (q > 0) gainDbWithoutHeavyLimiting = Math.floor(10 * Math.min(gainDb - 0.1, ampToDb(deepLevel / q))) / 10;
  }
  const pct = (x: number) => `${(x * 100).toFixed(1)} %`;
  const note = heavy
    ? `Heavy limiting: ${pct(deepShare)} of the samples ${basis === 'measured' ? 'are' : 'would be'} cut by more than ${depthDb} dB (more than ${pct(heavyShare)}), so the music will sound squashed. ` +
      `This is about sound, not safety.${gainDbWithoutHeavyLimiting !== null ? ` At about ${gainDbWithoutHeavyLimiting.toFixed(1)} dB it would not be (estimated from the clip's levels).` : ''}`
    : null;
  return { deepShare, basis, depthDb, heavyShare, heavy, gainDbWithoutHeavyLimiting, note };
}
