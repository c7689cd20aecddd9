/**
 * Evaluates one clip on one coil and driver at one gain: frame statistics × gain → rail per frame
 * (or pulse train) → losses → junction temperature of every device → the check of every limit.
 *
 * Gain convention (docs/models.md): gain g = 10^(gainDb/20). At 0 dB a full-scale sample (±1.0)
 * swings a rail scheme's rail over its whole range, v = (V_s/2)(1 + g·x), from 0 to the supply
 * around a bias at half the supply; in the pulse scheme it takes the on-time to its maximum
 * (on = maxOnTimeS·g·level, shared/plan/pulse-train.ts).
 *
 * The limits, each with its allowed value:
 * - junction-temperature, per device: peak Tj ≤ Tj max − margin (default margin 25 K), and no
 *   thermal runaway;
 * - over-modulation: share of time the rail would have to leave 0…V_s (samples with g·|x| > 1,
 *   from the magnitude histogram) ≤ allowed share (default 0.1 %);
 * - supply-current: highest frame-mean supply current (1 ms frames; pulse current in the pulse
 *   scheme) ≤ the supply's current limit;
 * - on-time (pulse scheme): share of pulses whose demanded on-time exceeds the maximum ≤ allowed share;
 * - duty (pulse scheme): share of pulses shortened by the duty limit ≤ allowed share;
 * - switching-speed, per switching device (bridge at the coil's resonance, modulator at its PWM
 *   frequency): transition share (t_r + t_f + t_s)·f ≤ TRANSITION_SHARE_LIMIT
 *   (shared/physics/driver/transition.ts). It does not depend on the gain, so a device past it fails
 *   every gain and, when it fails, it is the worst limit: the advice reads "bridge switch: too slow
 *   for 3.1 MHz".
 * Pulses shorter than the minimum on-time (the profile's pulse.minOnTimeS, default 3 RF cycles at
 * f0: shared/plan/pulse-train.ts pulseLimitsFor) are dropped and counted; when more than
 * SHORT_PULSE_WARN_SHARE of the clip's pulses are, the evaluation warns that the clip depends on them.
 */
import { type FrameStats, railFrameMoments } from '../dsp/frame-stats.ts';
import { type MagnitudeHistogram, fractionAbove } from '../dsp/histogram.ts';
import { simulatePulses } from '../physics/driver/simulate-pulses.ts';
import { simulateRail } from '../physics/driver/simulate-rail.ts';
import type { CoilAtResonance, DriverSimulation, ThermalState } from '../physics/driver/types.ts';
import { deviceSwitching } from '../physics/driver/transition.ts';
import { ROLES_FOR_SCHEME, type DeviceRole, type DriverProfile } from '../schemas/driver.ts';
import { dbToAmp } from '../units.ts';
import { type PulseEvents, type PulseTrain, pulseLimitsFor, pulsesAtGain } from './pulse-train.ts';

export type LimitName = 'junction-temperature' | 'over-modulation' | 'supply-current' | 'on-time' | 'duty' | 'switching-speed';

/**
 * Share of a clip's pulses dropped for being shorter than the minimum on-time above which the
 * evaluation warns that the clip depends on them (our convention: 1 % of the pulses).
 */
export const SHORT_PULSE_WARN_SHARE = 0.01;

/** What the planner needs of a clip: the analysis's reductions of the modulation source. */
export interface PlanClip {
  name: string;
  durationS: number;
  frames: FrameStats;
  histogram: MagnitudeHistogram;
  /** Pulse candidates (pulse scheme only). */
  pulseEvents?: PulseEvents;
}

export interface PlanSettings {
  /** Kelvin kept below each device's Tj max (default 25). */
  marginK: number;
  /** Allowed share (0…1) of over-modulated time, clamped pulses (default 0.001). */
  allowedShare: number;
  /** Ambient, °C (default: the driver profile's). */
  ambientC: number;
}

export const DEFAULT_MARGIN_K = 25;
export const DEFAULT_ALLOWED_SHARE = 0.001;

export function planSettings(driver: DriverProfile, s: Partial<PlanSettings> = {}): PlanSettings {
  const out = { marginK: s.marginK ?? DEFAULT_MARGIN_K, allowedShare: s.allowedShare ?? DEFAULT_ALLOWED_SHARE, ambientC: s.ambientC ?? driver.ambientC };
  if (!(out.marginK >= 0)) throw new RangeError(`planSettings: marginK must be ≥ 0 K, got ${out.marginK}`);
  if (!(out.allowedShare >= 0 && out.allowedShare < 1)) throw new RangeError(`planSettings: allowedShare must be in 0…1, got ${out.allowedShare}`);
  if (!Number.isFinite(out.ambientC)) throw new RangeError(`planSettings: ambientC must be finite, got ${out.ambientC}`);
  return out;
}

/** The check of one limit at one gain. `headroom` = allowed − value, in the limit's unit (≥ 0 holds). */
export interface LimitCheck {
  limit: LimitName;
  /** The device role, for junction-temperature. */
  role: DeviceRole | null;
  value: number;
  allowed: number;
  unit: 'C' | 'share' | 'A';
  headroom: number;
  ok: boolean;
  /** When the limit is closest to (or past) its edge, s; null when it never comes near. */
  atS: number | null;
  /** switching-speed only: the frequency the device switches at, Hz. */
  frequencyHz?: number;
}

export interface Evaluation {
  gainDb: number;
  sim: DriverSimulation;
  overModulationFraction: number;
  overModulationTimeS: number;
  pulses: (Omit<PulseTrain, 'startS' | 'onS'> & { onTimeShare: number; dutyShare: number; minOnTimeShare: number }) | null;
  limits: LimitCheck[];
  ok: boolean;
  /** The first failing limit (most over its edge, relative), or null when all hold. */
  worst: LimitCheck | null;
}

/** Reusable buffers for a gain search over one clip. */
export interface EvalScratch {
  meanV: Float64Array;
  meanSquareV2: Float64Array;
  train?: PulseTrain;
}

export function createScratch(clip: PlanClip): EvalScratch {
  return { meanV: new Float64Array(clip.frames.count), meanSquareV2: new Float64Array(clip.frames.count) };
}

/**
 * Rail per frame at gain g: the moments of v = (V/2)(1 + g·x) from railFrameMoments
 * (shared/dsp/frame-stats.ts: E[v] = (V/2)(1 + g·mean), E[v²] = (V²/4)(1 + 2g·mean + g²·meanSquare)),
 * clamped to the feasible set of a rail confined to 0…V: E[v] ∈ [0, V], E[v²] ∈ [E[v]², V·E[v]]
 * (since 0 ≤ v ≤ V implies v² ≤ V·v, and Jensen). In frames that over-modulate the clamp is an
 * approximation of the clipped rail (its error is bounded by the over-modulation limit's small
 * allowed share); elsewhere it is exact. Also returns the start of the first such frame.
 */
export function railAtGain(frames: FrameStats, gain: number, supplyV: number, out: EvalScratch): { meanV: Float64Array; meanSquareV2: Float64Array; firstOverModS: number | null } {
  const { meanV, meanSquareV2 } = railFrameMoments(frames, gain, supplyV, out);
  let first: number | null = null;
  for (let k = 0; k < frames.count; k++) {
    if (first === null && (gain * frames.max[k] > 1 || gain * frames.min[k] < -1)) first = k * frames.frameS;
    const ev = meanV[k] < 0 ? 0 : meanV[k] > supplyV ? supplyV : meanV[k];
    const lo = ev * ev;
    const hi = supplyV * ev;
    const ev2 = meanSquareV2[k];
    meanV[k] = ev;
    meanSquareV2[k] = ev2 < lo ? lo : ev2 > hi ? hi : ev2;
  }
  return { meanV, meanSquareV2, firstOverModS: first };
}

/**
 * True when the pulse limits alone (shares of pulses clamped by on-time or duty) fail at `gainDb`:
 * the cheap part of an evaluation, no thermal simulation. Always false for rail schemes.
 */
export function pulseLimitsFail(
  clip: PlanClip,
  coil: CoilAtResonance,
  driver: DriverProfile,
  gainDb: number,
  settings: PlanSettings,
  scratch: EvalScratch,
): boolean {
  if (driver.scheme !== 'pulse' || !clip.pulseEvents || !driver.pulse) return false;
  const train = pulsesAtGain(clip.pulseEvents, dbToAmp(gainDb), pulseLimitsFor(driver.pulse, coil.resonanceHz), scratch.train);
  scratch.train = train;
  const { onTimeShare, dutyShare } = pulseShares(train);
  return onTimeShare > settings.allowedShare || dutyShare > settings.allowedShare;
}

/** Shares (0…1) of the considered pulse events clamped by the on-time and by the duty limit, and dropped as too short. */
function pulseShares(train: PulseTrain): { onTimeShare: number; dutyShare: number; minOnTimeShare: number } {
  const denom = Math.max(1, train.events);
  return { onTimeShare: train.onTimeClamped / denom, dutyShare: train.dutyClamped / denom, minOnTimeShare: train.minOnTimeDropped / denom };
}

function check(limit: LimitName, role: DeviceRole | null, value: number, allowed: number, unit: LimitCheck['unit'], atS: number | null): LimitCheck {
  return { limit, role, value, allowed, unit, headroom: allowed - value, ok: value <= allowed, atS };
}

/**
 * The switching-speed check of every device the scheme uses that switches (bridge, modulator), in
 * the order of ROLES_FOR_SCHEME.
 */
export function switchingSpeedChecks(driver: DriverProfile, resonanceHz: number): LimitCheck[] {
  const out: LimitCheck[] = [];
  for (const role of ROLES_FOR_SCHEME[driver.scheme]) {
    if (!driver.devices.some((d) => d.role === role)) continue;
    const s = deviceSwitching(driver, role, resonanceHz);
    if (s.switchingHz === null || s.transitionShare === null) continue;
    out.push({ ...check('switching-speed', role, s.transitionShare, s.limitShare, 'share', null), frequencyHz: s.switchingHz });
  }
  return out;
}

/** The warning for a clip that depends on pulses shorter than the minimum on-time, or '' when it does not. */
function shortPulseWarning(train: PulseTrain, share: number, resonanceHz: number): string {
  if (!(share > SHORT_PULSE_WARN_SHARE)) return '';
  const us = (train.minOnTimeS * 1e6).toFixed(1);
  const cycles = (train.minOnTimeS * resonanceHz).toFixed(1);
  return (
    `pulses: ${train.minOnTimeDropped} of ${train.events} pulses (${(share * 100).toFixed(1)} %) are shorter than the ${us} µs minimum on-time ` +
    `(${cycles} RF cycles at ${(resonanceHz / 1e3).toFixed(0)} kHz) and were dropped: the coil cannot ring up in them, so the clip's quiet ` +
    'passages will be missing from the arcs. A higher gain lengthens them; lower pulse.minOnTimeS only if the coil is known to ring up faster.'
  );
}

/**
 * Evaluates `clip` at `gainDb` (module comment). `initial` carries a thermal state in from an
 * earlier clip; `traces` asks for per-frame traces.
 */
export function evaluateAtGain(
  clip: PlanClip,
  coil: CoilAtResonance,
  driver: DriverProfile,
  gainDb: number,
  settings: PlanSettings,
  opts: { initial?: ThermalState[]; traces?: boolean; scratch?: EvalScratch } = {},
): Evaluation {
  const g = dbToAmp(gainDb);
  const scratch = opts.scratch ?? createScratch(clip);
  const simOpts = { initial: opts.initial, ambientC: settings.ambientC, traces: opts.traces, frameS: clip.frames.frameS };
  const overModulationFraction = g > 0 ? fractionAbove(clip.histogram, 1 / g) : 0;
  let sim: DriverSimulation;
  let pulses: Evaluation['pulses'] = null;
  let overModAtS: number | null = null;
  if (driver.scheme === 'pulse') {
    if (!clip.pulseEvents) throw new RangeError('evaluateAtGain: the pulse scheme needs clip.pulseEvents');
    if (!driver.pulse) throw new RangeError('evaluateAtGain: the pulse scheme needs driver.pulse limits');
    const train = pulsesAtGain(clip.pulseEvents, g, pulseLimitsFor(driver.pulse, coil.resonanceHz), scratch.train);
    scratch.train = train;
    sim = simulatePulses(driver, coil, { startS: train.startS.subarray(0, train.count), onS: train.onS.subarray(0, train.count) }, clip.durationS, simOpts);
    const { startS: _s, onS: _o, ...counts } = train;
    pulses = { ...counts, ...pulseShares(train) };
    const short = shortPulseWarning(train, pulses.minOnTimeShare, coil.resonanceHz);
    if (short) sim.warnings.push(short);
  } else {
    const rail = railAtGain(clip.frames, g, driver.supplyVoltageV, scratch);
    overModAtS = rail.firstOverModS;
    sim = simulateRail(driver, coil, { frameS: clip.frames.frameS, meanV: rail.meanV, meanSquareV2: rail.meanSquareV2 }, simOpts);
  }

  const limits: LimitCheck[] = [];
  driver.devices.forEach((device) => {
    const d = sim.devices.find((s) => s.role === device.role);
    if (!d) return; // a device the scheme does not use (the simulation warns about it)
    const allowed = device.tjMaxC - settings.marginK;
    const c = check('junction-temperature', device.role, d.peakJunctionC, allowed, 'C', d.peakAtS);
    if (d.runaway) {
      c.ok = false;
      c.value = Math.max(c.value, device.tjMaxC);
      c.headroom = allowed - c.value;
      c.atS = d.runaway.atS;
    }
    limits.push(c);
  });
  limits.push(check('over-modulation', null, overModulationFraction, settings.allowedShare, 'share', overModAtS));
  limits.push(check('supply-current', null, sim.supply.peakCurrentA, driver.supplyCurrentLimitA, 'A', null));
  if (pulses) {
    limits.push(check('on-time', null, pulses.onTimeShare, settings.allowedShare, 'share', null));
    limits.push(check('duty', null, pulses.dutyShare, settings.allowedShare, 'share', null));
  }
  limits.push(...switchingSpeedChecks(driver, coil.resonanceHz));
  const failing = limits.filter((l) => !l.ok);
  // A device too slow for its switching frequency fails at every gain: it is the worst limit. Otherwise
  // the one most over its edge relative to the allowed value (shares against their allowance, °C and A against theirs).
  const rel = (l: LimitCheck) => (l.value - l.allowed) / Math.max(Math.abs(l.allowed), 1e-9);
  const slow = failing.filter((l) => l.limit === 'switching-speed');
  const pool = slow.length ? slow : failing;
  const worst = pool.length ? pool.reduce((a, b) => (rel(b) > rel(a) ? b : a)) : null;
  return {
    gainDb,
    sim,
    overModulationFraction,
    overModulationTimeS: overModulationFraction * clip.durationS,
    pulses,
    limits,
    ok: failing.length === 0,
    worst,
  };
}
