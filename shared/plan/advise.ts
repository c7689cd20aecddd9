/**
 * Advised gain: the largest gain (dB, 0.1 dB resolution) at which every limit of
 * ./evaluate.ts holds, which limit binds there, and the headroom of every other.
 *
 * Limits need not be monotone in gain: a linear pass device runs hottest with the rail idling at
 * half the supply (quiet music), so raising the gain can cool it while heating the bridge. The
 * search therefore does not assume monotonicity:
 * 1. an upper bound from the over-modulation limit alone, found on the magnitude histogram
 *    (monotone in gain, costs no simulation): above it that limit fails whatever else holds;
 * 2. a descending scan in 1 dB steps from that bound (at most +40 dB) down to −60 dB, stopping at
 *    the first gain where every limit holds: the largest such gain on the 1 dB grid;
 * 3. bisection between that gain and the failing one 1 dB above it, to 0.1 dB.
 * A feasible window narrower than 1 dB lying above a failing grid point can be missed; the scan
 * step is the stated resolution of that claim. When no gain down to −60 dB is safe, the answer says
 * so and evaluates silence: if a device overheats even then, the driver itself is unsafe. A device too
 * slow for its switching frequency (the switching-speed limit) fails every gain, so the scan stops at
 * the first gain that shows it.
 */
import type { CoilAtResonance, ThermalState } from '../physics/driver/types.ts';
import type { DriverProfile } from '../schemas/driver.ts';
import { fractionAbove } from '../dsp/histogram.ts';
import { ampToDb } from '../units.ts';
import { type Evaluation, type LimitCheck, type PlanClip, type PlanSettings, createScratch, evaluateAtGain, pulseLimitsFail } from './evaluate.ts';

export const MAX_GAIN_DB = 40;
export const MIN_GAIN_DB = -60;
export const RESOLUTION_DB = 0.1;

/**
 * What a gain search found, without the evaluation behind it: what a stored plan keeps, so that a
 * re-evaluation at another gain (which does not change the search) never searches again.
 */
export interface GainSearch {
  /** Largest safe gain, dB (rounded down to RESOLUTION_DB); null when no gain is safe. */
  advisedGainDb: number | null;
  /** The limit that stops a higher gain, at advisedGainDb + RESOLUTION_DB (or at the lowest gain tried). */
  binding: LimitCheck | null;
  /** The gain of `atAdvised`, dB (−Infinity: silence, when the driver fails even there). */
  atAdvisedGainDb: number;
  /** Evaluations run by the search. */
  evaluations: number;
  /** True when the driver fails a limit with no signal at all (silence). */
  unsafeOnSilence: boolean;
  /** The gain above which over-modulation alone fails, dB. */
  overModulationBoundDb: number;
}

export interface Advice extends GainSearch {
  /** The evaluation at the advised gain (or at the lowest gain when none is safe). */
  atAdvised: Evaluation;
}

/** The search without its evaluation (JSON-safe apart from ±Infinity, which storage writes as null). */
export const gainSearchOf = ({ atAdvised: _, ...search }: Advice): GainSearch => search;

/** Highest gain (dB, to 0.01 dB) whose over-modulated share stays within the allowance. */
export function overModulationBoundDb(clip: PlanClip, allowedShare: number): number {
  const peak = clip.histogram.peak;
  if (!(peak > 0)) return MAX_GAIN_DB;
  let lo = MIN_GAIN_DB;
  let hi = MAX_GAIN_DB;
  const ok = (db: number) => fractionAbove(clip.histogram, 1 / Math.pow(10, db / 20)) <= allowedShare;
  if (ok(hi)) return hi;
  if (!ok(lo)) return lo;
  while (hi - lo > 0.01) {
    const mid = (lo + hi) / 2;
    if (ok(mid)) lo = mid;
    else hi = mid;
  }
  // Never above the gain that puts the clip's highest sample at full scale when no over-modulation is allowed.
  return allowedShare === 0 ? Math.min(lo, -ampToDb(peak)) : lo;
}

/**
 * Searches the advised gain (module comment).
 * @example adviseGain(clip, coil, driver, planSettings(driver)).advisedGainDb // e.g. −3.4
 */
export function adviseGain(
  clip: PlanClip,
  coil: CoilAtResonance,
  driver: DriverProfile,
  settings: PlanSettings,
  opts: { initial?: ThermalState[] } = {},
): Advice {
  const scratch = createScratch(clip);
  let evaluations = 0;
  const evalAt = (db: number) => {
    evaluations++;
    return evaluateAtGain(clip, coil, driver, db, settings, { initial: opts.initial, scratch });
  };
  // A probe is a full evaluation, or, in the pulse scheme, a cheap refusal: the pulse limits (on-time
  // and duty shares) need only the pulse train, not the thermal simulation, and a gain they fail
  // fails whatever the temperatures. This is exact: no monotonicity is assumed.
  type Probe = { gainDb: number; ok: boolean; e: Evaluation | null };
  const probe = (db: number): Probe => {
    if (pulseLimitsFail(clip, coil, driver, db, settings, scratch)) return { gainDb: db, ok: false, e: null };
    const e = evalAt(db);
    return { gainDb: db, ok: e.ok, e };
  };
  const full = (p: Probe): Evaluation => p.e ?? evalAt(p.gainDb);
  const bound = overModulationBoundDb(clip, settings.allowedShare);
  // Grid from the bound downwards, on whole tenths so results are reproducible.
  const top = Math.floor(bound / RESOLUTION_DB) * RESOLUTION_DB;
  let failAbove: Probe | null = null;
  let okProbe: Probe | null = null;
  for (let db = top; db >= MIN_GAIN_DB - 1e-9; db -= 1) {
    const p = probe(round1(db));
    if (p.ok) {
      okProbe = p;
      break;
    }
    failAbove = p;
    // A switch too slow for its frequency fails every gain (shared/plan/evaluate.ts): no need to scan on.
    if (p.e?.worst?.limit === 'switching-speed') break;
  }
  if (!okProbe) {
    const silent = evaluateAtGain(clip, coil, driver, -Infinity, settings, { initial: opts.initial, scratch });
    evaluations++;
    const lowest = full(failAbove!);
    const atAdvised = silent.ok ? lowest : silent;
    return {
      advisedGainDb: null,
      binding: silent.worst ?? lowest.worst,
      atAdvised,
      atAdvisedGainDb: atAdvised.gainDb,
      evaluations,
      unsafeOnSilence: !silent.ok,
      overModulationBoundDb: bound,
    };
  }
  // Bisection on the 0.1 dB grid between okProbe (holds) and failAbove (fails), when there is one.
  if (failAbove) {
    // Work in whole tenths of a dB so the interval always shrinks.
    let loT = Math.round(okProbe.gainDb * 10);
    let hiT = Math.round(failAbove.gainDb * 10);
    while (hiT - loT > 1) {
      const midT = Math.floor((loT + hiT) / 2);
      const p = probe(midT / 10);
      if (p.ok) {
        okProbe = p;
        loT = midT;
      } else {
        failAbove = p;
        hiT = midT;
      }
    }
  } else if (top < MAX_GAIN_DB) {
    // The scan started at the over-modulation bound and held there: over-modulation binds just above.
    // The bound is known to 0.01 dB only (and bound/0.1 may floor one tenth low in binary), so the
    // next tenth can still hold: climb until one fails.
    failAbove = probe(round1(top + RESOLUTION_DB));
    while (failAbove.ok && failAbove.gainDb < MAX_GAIN_DB - 1e-9) {
      okProbe = failAbove;
      failAbove = probe(round1(failAbove.gainDb + RESOLUTION_DB));
    }
    if (failAbove.ok) {
      okProbe = failAbove;
      failAbove = null;
    }
  }
  return {
    advisedGainDb: okProbe.gainDb,
    binding: failAbove ? full(failAbove).worst : null,
    atAdvised: full(okProbe),
    atAdvisedGainDb: okProbe.gainDb,
    evaluations,
    unsafeOnSilence: false,
    overModulationBoundDb: bound,
  };
}

const round1 = (db: number) => Math.round(db * 10) / 10;
