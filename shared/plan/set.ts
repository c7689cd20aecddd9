/**
 * A set: an ordered list of clips with a gap after each, played on one coil and driver. The
 * thermal state carries from each clip through its gap into the next, so a device that is still
 * warm starts the next clip warm. During a gap the driver idles as on silence (a rail scheme's rail
 * sits at its bias, half the supply, so a linear pass device keeps dissipating; a pulse scheme
 * makes no pulses).
 *
 * Per item: the gain used (the item's own, a common gain, or advised for that item given the state
 * it starts in), its peak junction temperatures, whether every limit held, and two gaps:
 * - `minSafeGapAfterS`: the shortest idle gap after this item after which the NEXT item, played at
 *   its gain in this set, keeps every limit (0 when it does with no gap; null, with the reason,
 *   only when no gap up to MAX_RECOVERY_GAP_S is enough: the next item fails even from the driver's
 *   idle steady state, or fails a limit that no cooling helps). Found by bisection on whole tenths
 *   of a second, re-planning the next item from the state the gap leaves (the same idle simulation
 *   the set itself uses), so a re-plan with that gap passes and one with 0.1 s less fails.
 * - `recoveryGapS`: the idle time after which every junction is within RECOVERED_WITHIN_K of the
 *   driver's idle steady state at the set's ambient (`recoversToC`, the temperature each device
 *   settles at while idling). A device that dissipates at idle (a linear pass device biased at half
 *   the supply) settles above ambient: it never cools to ambient, so recovery is measured against
 *   where it does settle. 0 when the clip ends within 5 K of that already (or below it).
 *
 * An item for which no gain keeps every limit (its advice is null) and that has no gain of its own
 * is planned silent (−∞ dB) per item: silence holds every limit, so the item reads as holding, and
 * `silentItems` lists it with the reason (whether it has no safe gain even from a cold start, or
 * only from the temperature the set leaves it at), so a set is never reported as playable when one
 * of its clips cannot be played. In common-gain mode ('min-advised') the common gain is the lowest
 * advice among the items that have one, and such an item is played at it and shows which limit it
 * breaks; only when no item has a safe gain is the common gain −∞ (all silent, all listed).
 */
import type { CoilAtResonance, DriverSimulation, ThermalState } from '../physics/driver/types.ts';
import type { DeviceRole, DriverProfile } from '../schemas/driver.ts';
import { adviseGain } from './advise.ts';
import { type LimitCheck, type PlanClip, type PlanSettings, evaluateAtGain } from './evaluate.ts';
import { limitLabel } from './limit-labels.ts';
import { simulateSteady } from './steady.ts';

/** Within this many kelvin of the idle steady state counts as recovered. */
export const RECOVERED_WITHIN_K = 5;
/** Longest gap searched (recovery and safe gap), s. */
export const MAX_RECOVERY_GAP_S = 3600;
/** Idle frame of the gaps, s (the resolution of both gap figures). */
export const GAP_FRAME_S = 0.1;

export interface SetItemInput {
  clip: PlanClip;
  gapAfterS: number;
  /** A fixed gain for this item, dB; null: advised (or the common gain). */
  gainDb: number | null;
}

export interface SetItemResult {
  clip: string;
  /** Advised for this item given its starting thermal state, dB (null when none is safe). */
  advisedGainDb: number | null;
  /** The gain played, dB. */
  gainDb: number;
  startJunctionC: { role: DeviceRole; junctionC: number }[];
  peakJunctionC: number;
  devices: { role: DeviceRole; peakJunctionC: number; peakAtS: number; endJunctionC: number }[];
  ok: boolean;
  failing: LimitCheck[];
  gapAfterS: number;
  /**
   * Shortest idle gap after this item after which the next item keeps every limit at its gain, s
   * (0: none needed; null: no gap up to MAX_RECOVERY_GAP_S is enough, or this is the last item; see minSafeGapNote).
   */
  minSafeGapAfterS: number | null;
  /** Why minSafeGapAfterS is null, or what 0 means; null otherwise. */
  minSafeGapNote: string | null;
  /** Idle time after which every junction is within RECOVERED_WITHIN_K of recoversToC, s (null: longer than MAX_RECOVERY_GAP_S). */
  recoveryGapS: number | null;
  /** The idle steady state each device recovers toward at the set's ambient, °C. */
  recoversToC: { role: DeviceRole; junctionC: number }[];
}

/** An item planned silent because no gain keeps every limit for it. */
export interface SilentItem {
  /** Index in the set. */
  index: number;
  clip: string;
  /** True when no gain is safe even from a cold start (ambient): the clip cannot be played on this rig; false: only from the temperature the set leaves it at. */
  evenCold: boolean;
  /** What it means and what to do, in words. */
  note: string;
}

export interface SetResult {
  gainMode: 'per-item' | 'common';
  commonGainDb: number | null;
  /** Items planned silent (−∞ dB) because no gain keeps every limit for them (module comment). */
  silentItems: SilentItem[];
  ambientC: number;
  items: SetItemResult[];
  /** Index of the first item at which a limit fails, or null. */
  firstFailingItem: number | null;
  /** The junction temperature each device settles at while the driver idles at the set's ambient, °C. */
  idleSteadyJunctionC: { role: DeviceRole; junctionC: number }[];
  /** The recovery margin, K, and the longest gap searched, s. */
  recoveredWithinK: number;
  gapSearchBoundS: number;
}

/** Idle (silence) simulation of `durationS` from `initial`, on frames of `frameS`, with traces. */
function idle(driver: DriverProfile, coil: CoilAtResonance, initial: ThermalState[] | undefined, durationS: number, ambientC: number, frameS: number): DriverSimulation {
  return simulateSteady(driver, coil, { durationS, frameS, railV: driver.supplyVoltageV / 2, initial, ambientC });
}

/**
 * The junction temperature of every device once the driver has idled long enough to settle, °C, in
 * the simulation's device order: an idle run from ambient over 30 of the slowest thermal time
 * constants (the longest Foster τ, or the sink's (R_cs + R_sa)·C), where the exponential
 * remainder e^−30 is below 1e-12 of the rise. A pulse driver idles without loss: ambient.
 */
export function idleSteadyJunctionC(driver: DriverProfile, coil: CoilAtResonance, ambientC: number): { role: DeviceRole; junctionC: number }[] {
  let tauS = 1;
  for (const d of driver.devices) {
    for (const f of d.thermal.foster) tauS = Math.max(tauS, f.tauS);
    tauS = Math.max(tauS, (d.thermal.caseToSinkKPerW + d.thermal.sinkToAmbientKPerW) * d.thermal.sinkHeatCapacityJPerK);
  }
  const durationS = 30 * tauS;
  const sim = idle(driver, coil, undefined, durationS, ambientC, durationS / 3000);
  return sim.devices.map((d, k) => ({ role: d.role, junctionC: ambientC + sim.finalState[k][0] }));
}

/**
 * Shortest idle time after which every junction is within RECOVERED_WITHIN_K of `targetC` (per
 * device: the idle steady state, idleSteadyJunctionC), s, to one idle frame (0.1 s); 0 when it is
 * already; null when MAX_RECOVERY_GAP_S is not enough.
 */
export function recoveryGapS(
  driver: DriverProfile,
  coil: CoilAtResonance,
  state: ThermalState[],
  targetC: number[],
  ambientC: number,
): number | null {
  const recovered = (j: (d: number) => number) => targetC.every((s, d) => j(d) <= s + RECOVERED_WITHIN_K);
  const junctionNow = (d: number) => ambientC + state[d][0];
  if (recovered(junctionNow)) return 0;
  const frameS = GAP_FRAME_S;
  const sim = idle(driver, coil, state, MAX_RECOVERY_GAP_S, ambientC, frameS);
  const n = sim.devices[0].traces!.junctionC.length;
  // Junction at the end of idle frame k. The pulse scheme's trace holds each frame's maximum, which in
  // frame 0 includes the starting temperature: take that frame's end from a one-frame run instead.
  const endOfFirst = idle(driver, coil, state, frameS, ambientC, frameS).finalState;
  const junctionAt = (k: number, d: number) => (k === 0 ? ambientC + endOfFirst[d][0] : sim.devices[d].traces!.junctionC[k]);
  for (let k = 0; k < n; k++) {
    if (recovered((d) => junctionAt(k, d))) return Math.round((k + 1) * frameS * 10) / 10; // whole tenths of a second
  }
  return null;
}

/** The state after idling `gapS` from `end` (exactly as planSet carries it through a gap). */
function afterGap(driver: DriverProfile, coil: CoilAtResonance, end: ThermalState[], gapS: number, ambientC: number): ThermalState[] {
  return gapS > 0 ? idle(driver, coil, end, gapS, ambientC, GAP_FRAME_S).finalState : end;
}

/**
 * Shortest gap after a clip that ended in `end` for `next` to keep every limit at `nextGainDb`
 * (module comment), with the reason when there is none. Bisection on tenths of a second: assumes a
 * longer gap never makes the next clip hotter (true while the devices cool toward an idle steady
 * state below where the clip left them; when they are below it, the answer is 0 or none).
 */
export function minSafeGapS(
  driver: DriverProfile,
  coil: CoilAtResonance,
  end: ThermalState[],
  next: PlanClip,
  nextGainDb: number,
  settings: PlanSettings,
): { gapS: number | null; note: string | null } {
  const check = (gapS: number) => evaluateAtGain(next, coil, driver, nextGainDb, settings, { initial: afterGap(driver, coil, end, gapS, settings.ambientC) });
  if (check(0).ok) return { gapS: 0, note: 'no gap needed: the next clip keeps every limit even if it starts at once' };
  const atBound = check(MAX_RECOVERY_GAP_S);
  if (!atBound.ok) {
    const f = atBound.worst!;
    const thermal = f.limit === 'junction-temperature';
    return {
      gapS: null,
      note: thermal
        ? `no gap up to ${MAX_RECOVERY_GAP_S} s is enough: even from the driver's idle steady state the next clip breaks ${limitLabel(f)} at its gain; lower its gain`
        : `no gap helps: the next clip breaks ${limitLabel(f)} at its gain whatever the temperature; lower its gain`,
    };
  }
  let lo = 0;
  let hi = Math.round(MAX_RECOVERY_GAP_S / GAP_FRAME_S);
  while (hi - lo > 1) {
    const mid = Math.floor((lo + hi) / 2);
    if (check(mid * GAP_FRAME_S).ok) hi = mid;
    else lo = mid;
  }
  return { gapS: Math.round(hi * GAP_FRAME_S * 10) / 10, note: null };
}

/** The entry of silentItems for item `index` (module comment). */
function silentItem(index: number, clip: PlanClip, evenCold: boolean): SilentItem {
  const note = evenCold
    ? 'no gain keeps every limit even from a cold start: this clip cannot be played on this coil and driver; it is planned silent. Drop it from the set, or change the rig'
    : 'no gain keeps every limit from the temperature the set leaves it at, though one does from cold: it is planned silent. Give it a longer gap before it, or lower the gains of the clips before it';
  return { index, clip: clip.name, evenCold, note };
}

/**
 * Plays a set (module comment). `commonGainDb`: 'min-advised' plays every item at the lowest of
 * the per-item advised gains; a number plays every item at that gain; undefined uses each item's
 * own gain or its advice.
 */
export function planSet(
  items: SetItemInput[],
  coil: CoilAtResonance,
  driver: DriverProfile,
  settings: PlanSettings,
  opts: { commonGainDb?: number | 'min-advised'; /** Search the safe gaps (default true; the common-gain pre-pass skips them). */ safeGaps?: boolean } = {},
): SetResult {
  if (items.length === 0) throw new RangeError('planSet: the set has no items');
  let common: number | null = typeof opts.commonGainDb === 'number' ? opts.commonGainDb : null;
  if (opts.commonGainDb === 'min-advised') {
    const first = planSet(items, coil, driver, settings, { safeGaps: false });
    // The lowest advice among the items that have one: an item with none is then played at it and
    // shows the limit it breaks, rather than silencing the whole set.
    const advised = first.items.map((i) => i.advisedGainDb).filter((a): a is number => a !== null);
    common = advised.length === 0 ? -Infinity : Math.min(...advised);
  }
  let state: ThermalState[] | undefined;
  let firstFailingItem: number | null = null;
  const out: SetItemResult[] = [];
  const silentItems: SilentItem[] = [];
  const ends: ThermalState[][] = [];
  const idleC = idleSteadyJunctionC(driver, coil, settings.ambientC);
  items.forEach((item, index) => {
    if (!(item.gapAfterS >= 0 && Number.isFinite(item.gapAfterS))) {
      throw new RangeError(`planSet: items[${index}].gapAfterS must be a finite number of seconds ≥ 0, got ${item.gapAfterS}`);
    }
    const advice = adviseGain(item.clip, coil, driver, settings, { initial: state });
    const gainDb = item.gainDb ?? common ?? advice.advisedGainDb ?? -Infinity;
    const e =
      gainDb === advice.advisedGainDb && item.gainDb === null && common === null
        ? advice.atAdvised
        : evaluateAtGain(item.clip, coil, driver, gainDb, settings, { initial: state });
    const roles = e.sim.devices.map((d) => d.role);
    const startC = roles.map((_, d) => settings.ambientC + (state ? state[d][0] : 0));
    const end = e.sim.finalState;
    ends.push(end);
    const failing = e.limits.filter((l) => !l.ok);
    if (failing.length && firstFailingItem === null) firstFailingItem = index;
    if (gainDb === -Infinity && advice.advisedGainDb === null && item.gainDb === null) {
      silentItems.push(silentItem(index, item.clip, state === undefined || adviseGain(item.clip, coil, driver, settings).advisedGainDb === null));
    }
    out.push({
      clip: item.clip.name,
      advisedGainDb: advice.advisedGainDb,
      gainDb,
      startJunctionC: roles.map((role, d) => ({ role, junctionC: startC[d] })),
      peakJunctionC: Math.max(...e.sim.devices.map((d) => d.peakJunctionC)),
      devices: e.sim.devices.map((d, k) => ({ role: d.role, peakJunctionC: d.peakJunctionC, peakAtS: d.peakAtS, endJunctionC: settings.ambientC + end[k][0] })),
      ok: failing.length === 0,
      failing,
      gapAfterS: item.gapAfterS,
      minSafeGapAfterS: null,
      minSafeGapNote: null,
      recoveryGapS: recoveryGapS(driver, coil, end, idleC.map((x) => x.junctionC), settings.ambientC),
      recoversToC: idleC,
    });
    state = afterGap(driver, coil, end, item.gapAfterS, settings.ambientC);
  });
  // The safe gap after each item, for the next item at the gain it is played at in this set.
  out.forEach((it, i) => {
    if (i + 1 === out.length) {
      it.minSafeGapNote = 'the last item: nothing follows it';
      return;
    }
    if (opts.safeGaps === false) return;
    const r = minSafeGapS(driver, coil, ends[i], items[i + 1].clip, out[i + 1].gainDb, settings);
    it.minSafeGapAfterS = r.gapS;
    it.minSafeGapNote = r.note;
  });
  return {
    gainMode: common === null ? 'per-item' : 'common',
    commonGainDb: common,
    silentItems,
    ambientC: settings.ambientC,
    items: out,
    firstFailingItem,
    idleSteadyJunctionC: idleC,
    recoveredWithinK: RECOVERED_WITHIN_K,
    gapSearchBoundS: MAX_RECOVERY_GAP_S,
  };
}
