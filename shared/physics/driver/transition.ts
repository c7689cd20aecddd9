/**
 * How much of each switching cycle a device spends in transition, and what its loss can be said to
 * be when that share is large.
 *
 * Transition share: s = (t_r + t_f + t_s)·f, the fraction of each cycle at the switching frequency f
 * that the device spends neither fully on nor fully off (rise, fall and, for a bipolar transistor,
 * storage; a MOSFET's or IGBT's turn-off delay t_d(off) may be given as t_s). Bridge switches switch
 * at the coil's resonance f0, the buck modulator at its PWM frequency; a linear pass device does not
 * switch.
 *
 * The hard-switching estimates of ./losses.ts and ./bjt.ts (½·V·I·t per transition, Mohan, Undeland
 * & Robbins, *Power Electronics*, 3rd ed., §2-5, eq. 2-6 [recalled]) assume linear ramps that finish
 * well inside the switch's conducting half-cycle. Past {@link TRANSITION_SHARE_LIMIT} they no longer
 * describe the device: it spends much of the cycle in its active region. There its dissipation is
 * bounded by that of a linear element: a device in its active region in series with a resistive load
 * R across a voltage V dissipates p = i·(V − i·R) ≤ V²/(4R), the maximum at v_CE = V/2 (maximise the
 * parabola; the same result gives a linear pass regulator's worst case at half the supply).
 */
import type { DeviceRole, DriverDevice, DriverProfile } from '../../schemas/driver.ts';
import type { LossParts } from './losses.ts';

/**
 * Largest transition share at which the hard-switching estimate is used: a fifth of the cycle, i.e.
 * the transitions take 40 % of the half-cycle in which the switch conducts (common practice: the
 * linear-ramp switching estimate wants transitions short against the conduction interval; the
 * figure is ours, not a published one).
 */
export const TRANSITION_SHARE_LIMIT = 0.2;

/**
 * Time per cycle in transition, s: t_r + t_f + t_s (t_s = storage time, or turn-off delay; 0 when
 * not given).
 *
 * @example transitionTimeS({ riseTimeS: 50e-9, fallTimeS: 80e-9, storageTimeS: 200e-9 }) // → 330 ns
 */
export function transitionTimeS(device: Pick<DriverDevice, 'riseTimeS' | 'fallTimeS' | 'storageTimeS'>): number {
  return device.riseTimeS + device.fallTimeS + (device.storageTimeS ?? 0);
}

/**
 * Transition share (t_r + t_f + t_s)·f of a device switching at f (Hz), dimensionless.
 *
 * @example transitionShare({ riseTimeS: 50e-9, fallTimeS: 80e-9, storageTimeS: 200e-9 }, 400e3) // → 0.132
 */
export function transitionShare(device: Pick<DriverDevice, 'riseTimeS' | 'fallTimeS' | 'storageTimeS'>, switchingHz: number): number {
  return transitionTimeS(device) * switchingHz;
}

/** True when the share at f is past {@link TRANSITION_SHARE_LIMIT}. */
export function tooSlow(device: Pick<DriverDevice, 'riseTimeS' | 'fallTimeS' | 'storageTimeS'>, switchingHz: number): boolean {
  return transitionShare(device, switchingHz) > TRANSITION_SHARE_LIMIT;
}

/**
 * Linear-element bound, W: a device in its active region on a resistive load line that joins
 * (blockingV, 0) and (0, peakA) dissipates v·i ≤ blockingV·peakA/4 at every instant (module note),
 * hence on average. For a bridge switch at rail v: ¼·v·Î with Î its peak current.
 *
 * @example linearElementBoundW(12, 2) // → 6 W
 */
export function linearElementBoundW(blockingV: number, peakA: number): number {
  return 0.25 * blockingV * peakA;
}

/**
 * Replaces the transition and output-capacitance parts of `parts` by the larger of their sum and
 * `linearW` (the linear-element bound), in place: conduction and base drive stay, so the result is
 * never below the hard-switching estimate and never below the linear-element bound.
 *
 * @example boundTransitionParts({ resistiveAt25W: 0, conductionFixedW: 1, switchingW: 2, capacitiveW: 0.5 }, 6) // switchingW 6, capacitiveW 0
 */
export function boundTransitionParts(parts: LossParts, linearW: number): LossParts {
  parts.switchingW = Math.max(parts.switchingW + parts.capacitiveW, linearW);
  parts.capacitiveW = 0;
  return parts;
}

/** Switching speed of one device of a driver, against the frequency it switches at. */
export interface DeviceSwitching {
  role: DeviceRole;
  kind: DriverDevice['kind'];
  /** The frequency the device switches at, Hz (bridge: the coil's resonance; modulator: PWM); null for a pass device. */
  switchingHz: number | null;
  /** t_r + t_f + t_s, s. */
  transitionTimeS: number;
  /** (t_r + t_f + t_s)·f; null for a device that does not switch. */
  transitionShare: number | null;
  /** The share past which the device is too slow ({@link TRANSITION_SHARE_LIMIT}). */
  limitShare: number;
  /** True past the limit: its loss is the linear-element bound, and the advice refuses every gain. */
  tooSlow: boolean;
}

/**
 * Switching speed of the device of `role` in `driver` with the coil at resonanceHz (bridge at f0,
 * modulator at pwmFrequencyHz, pass: does not switch). Throws RangeError when the role has no device.
 *
 * @example deviceSwitching(DEMO_DRIVER_LINEAR, 'bridge', 318e3).transitionShare // → 0.0143
 */
export function deviceSwitching(driver: DriverProfile, role: DeviceRole, resonanceHz: number): DeviceSwitching {
  const d = driver.devices.find((x) => x.role === role);
  if (!d) throw new RangeError(`deviceSwitching: the profile has no ${role} device`);
  const hz = role === 'bridge' ? resonanceHz : role === 'modulator' ? (driver.pwmFrequencyHz ?? null) : null;
  const share = hz === null ? null : transitionShare(d, hz);
  return {
    role,
    kind: d.kind,
    switchingHz: hz,
    transitionTimeS: transitionTimeS(d),
    transitionShare: share,
    limitShare: TRANSITION_SHARE_LIMIT,
    tooSlow: share !== null && share > TRANSITION_SHARE_LIMIT,
  };
}

const hzText = (hz: number): string => (hz >= 1e6 ? `${(hz / 1e6).toPrecision(2)} MHz` : `${(hz / 1e3).toPrecision(3)} kHz`);

/** "bridge switch: too slow for 3.1 MHz" — the name of the limit as the advice reads it. */
export function tooSlowLabel(s: Pick<DeviceSwitching, 'role' | 'switchingHz'>): string {
  return `${s.role} switch: too slow for ${s.switchingHz === null ? 'its switching frequency' : hzText(s.switchingHz)}`;
}

/**
 * The warning for a device past the limit: names the frequency and the share, says the
 * hard-switching estimate no longer holds and the linear-element bound is used, and what helps.
 * Empty string when the device is not too slow.
 */
export function tooSlowWarning(s: DeviceSwitching): string {
  if (!s.tooSlow || s.switchingHz === null || s.transitionShare === null) return '';
  const at = s.role === 'bridge' ? "the coil's resonance" : 'the PWM frequency';
  const helps =
    s.role === 'bridge'
      ? 'a faster part (shorter storage, rise and fall times), or a lower resonance: a larger top load, or a longer secondary with more turns'
      : 'a faster part or a lower PWM frequency';
  return (
    `${tooSlowLabel(s)}: its transitions (t_r + t_f + t_s = ${(s.transitionTimeS * 1e9).toFixed(0)} ns) take ` +
    `${(s.transitionShare * 100).toFixed(1)} % of each cycle at ${at} ${hzText(s.switchingHz)}, past ${(s.limitShare * 100).toFixed(0)} %, ` +
    'so it cannot switch cleanly: it spends much of each cycle in its active region. Its loss is taken as the bound for a linear element ' +
    `(not the hard-switching estimate, which no longer holds) and no gain is advised. What helps: ${helps}.`
  );
}
