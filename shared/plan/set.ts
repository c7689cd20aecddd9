/**
 * A set: an ordered list of clips with a gap after each, played on one coil and driver. The
 * thermal state carries from each clip through its gap into the next, so a device that is still
 * warm starts the next clip warm. During a gap the driver idles as on silence (a rail scheme's rail
 * sits at its bias, half the supply, so a linear pass device keeps dissipating; a pulse scheme
 * makes no pulses).
 *
 * Per item: the gain used (the item's own, a common gain, or advised for that item given the state
 * it starts in), its peak junction temperatures, whether every limit held, and the shortest gap
 * after it that brings every junction back within 5 K of where it started that clip (null when
 * idling never gets there, e.g. a linear pass device that idles hotter than it started).
 */
import type { CoilAtResonance, DriverSimulation, ThermalState } from '../physics/driver/types.ts';
import type { DeviceRole, DriverProfile } from '../schemas/driver.ts';
import { adviseGain } from './advise.ts';
import { type LimitCheck, type PlanClip, type PlanSettings, evaluateAtGain } from './evaluate.ts';
import { simulateSteady } from './steady.ts';

/** Within this many kelvin of the start temperature counts as recovered (from the definition). */
export const RECOVERED_WITHIN_K = 5;
/** Longest gap searched for recovery, s. */
export const MAX_RECOVERY_GAP_S = 3600;

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
  /** Shortest idle gap after this clip that brings every junction within 5 K of its start, s. */
  minGapAfterS: number | null;
}

export interface SetResult {
  gainMode: 'per-item' | 'common';
  commonGainDb: number | null;
  ambientC: number;
  items: SetItemResult[];
  /** Index of the first item at which a limit fails, or null. */
  firstFailingItem: number | null;
}

/** Idle (silence) simulation of `durationS` from `initial`, on frames of `frameS`, with traces. */
function idle(driver: DriverProfile, coil: CoilAtResonance, initial: ThermalState[] | undefined, durationS: number, ambientC: number, frameS: number): DriverSimulation {
  return simulateSteady(driver, coil, { durationS, frameS, railV: driver.supplyVoltageV / 2, pulseOn: false, initial, ambientC });
}

/**
 * Shortest idle time after which every junction is within RECOVERED_WITHIN_K of `startC`
 * (per device), s, to one idle frame (0.1 s); null when MAX_RECOVERY_GAP_S is not enough.
 */
export function recoveryGapS(
  driver: DriverProfile,
  coil: CoilAtResonance,
  state: ThermalState[],
  startC: number[],
  ambientC: number,
): number | null {
  const recovered = (j: (d: number) => number) => startC.every((s, d) => j(d) <= s + RECOVERED_WITHIN_K);
  const junctionNow = (d: number) => ambientC + state[d][0];
  if (recovered(junctionNow)) return 0;
  const frameS = 0.1;
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
  opts: { commonGainDb?: number | 'min-advised' } = {},
): SetResult {
  if (items.length === 0) throw new RangeError('planSet: the set has no items');
  let common: number | null = typeof opts.commonGainDb === 'number' ? opts.commonGainDb : null;
  if (opts.commonGainDb === 'min-advised') {
    const first = planSet(items, coil, driver, settings);
    const advised = first.items.map((i) => i.advisedGainDb);
    common = advised.some((a) => a === null) ? -Infinity : Math.min(...(advised as number[]));
  }
  let state: ThermalState[] | undefined;
  let firstFailingItem: number | null = null;
  const out: SetItemResult[] = [];
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
    const minGapAfterS = recoveryGapS(driver, coil, end, startC, settings.ambientC);
    const failing = e.limits.filter((l) => !l.ok);
    if (failing.length && firstFailingItem === null) firstFailingItem = index;
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
      minGapAfterS,
    });
    state = item.gapAfterS > 0 ? idle(driver, coil, end, item.gapAfterS, settings.ambientC, 0.1).finalState : end;
  });
  return { gainMode: common === null ? 'per-item' : 'common', commonGainDb: common, ambientC: settings.ambientC, items: out, firstFailingItem };
}
