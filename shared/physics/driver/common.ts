/**
 * Checks and set-up shared by the rail and pulse simulations.
 */
import { BRIDGE_SWITCH_COUNT, ROLES_FOR_SCHEME, type DriverProfile } from '../../schemas/driver.ts';
import { bjtSaturationWarning } from './bjt.ts';
import { bridgeCurrentFactors } from './currents.ts';
import { DeviceRun } from './device-run.ts';
import { deviceSwitching, tooSlowWarning } from './transition.ts';
import type { CoilAtResonance, SimulationOptions } from './types.ts';

/**
 * Throws RangeError unless f0 (Hz) and Q are finite and positive.
 *
 * @example checkCoil('simulateRail', { resonanceHz: 300e3, qualityFactor: 30 }) // passes
 */
export function checkCoil(fn: string, coil: CoilAtResonance): void {
  if (!(coil.resonanceHz > 0) || !Number.isFinite(coil.resonanceHz)) {
    throw new RangeError(`${fn}: coil.resonanceHz must be finite and > 0, got ${coil.resonanceHz}`);
  }
  if (!(coil.qualityFactor > 0) || !Number.isFinite(coil.qualityFactor)) {
    throw new RangeError(`${fn}: coil.qualityFactor must be finite and > 0, got ${coil.qualityFactor}`);
  }
}

/**
 * One {@link DeviceRun} per role the scheme uses (bridge first), plus warnings for device entries
 * the scheme ignores. Bridge count per topology; pass and modulator count 1.
 *
 * @example setUpRuns('simulateRail', DEMO_DRIVER_LINEAR, {}).runs.map((r) => r.role) // → ['bridge', 'pass']
 */
export function setUpRuns(fn: string, driver: DriverProfile, opts: SimulationOptions): { runs: DeviceRun[]; ambientC: number; warnings: string[] } {
  const ambientC = opts.ambientC ?? driver.ambientC;
  if (!Number.isFinite(ambientC)) throw new RangeError(`${fn}: ambientC must be finite, got ${ambientC}`);
  const roles = ROLES_FOR_SCHEME[driver.scheme];
  if (opts.initial !== undefined && opts.initial.length !== roles.length) {
    throw new RangeError(`${fn}: opts.initial needs one state per device (${roles.length}), got ${opts.initial.length}`);
  }
  const warnings: string[] = [];
  const runs = roles.map((role, i) => {
    const dev = driver.devices.find((d) => d.role === role);
    if (!dev) throw new RangeError(`${fn}: the profile has no ${role} device (validate it with parseDriverProfile)`);
    const count = role === 'bridge' ? BRIDGE_SWITCH_COUNT[driver.topology] : 1;
    return new DeviceRun(role, count, dev, ambientC, opts.warnC, opts.initial?.[i]);
  });
  for (const d of driver.devices) {
    if (!roles.includes(d.role)) warnings.push(`profile: the ${d.role} device is not used by the ${driver.scheme} scheme and was ignored.`);
  }
  return { runs, ambientC, warnings };
}

/**
 * Warnings about the devices themselves, whatever the drive: a switch too slow for the frequency it
 * switches at (./transition.ts), and a BJT whose peak collector current at the full rail (bridge:
 * k_pk·fullRailCurrentA; modulator: fullRailCurrentA) is above the current its V_CE(sat) is stated at.
 *
 * @example deviceWarnings(DEMO_DRIVER_LINEAR, 318e3) // → []
 */
export function deviceWarnings(driver: DriverProfile, resonanceHz: number): string[] {
  const out: string[] = [];
  for (const role of ROLES_FOR_SCHEME[driver.scheme]) {
    const dev = driver.devices.find((d) => d.role === role);
    if (!dev) continue;
    const slow = tooSlowWarning(deviceSwitching(driver, role, resonanceHz));
    if (slow) out.push(slow);
    if (role === 'pass') continue;
    const peakA = role === 'bridge' ? bridgeCurrentFactors(driver.topology).switchPeak * driver.fullRailCurrentA : driver.fullRailCurrentA;
    const sat = bjtSaturationWarning(dev, role, peakA);
    if (sat) out.push(sat);
  }
  return out;
}
