/**
 * What the coil model takes from the driver (supply voltage and full-rail current for the input
 * power, the longest on-time for a pulse's energy bound, the mean input power for the arc-reach
 * rule), in one place for the server and the browser, so the live figures on the rig screen and
 * the stored coil report can never differ.
 */
import type { DriverProfile } from '../../schemas/driver.ts';
import type { CoilDriveContext } from './analyze.ts';

/**
 * The drive context of a driver profile. Rail schemes: V·I, continuous full drive, is the mean
 * input power. A pulse driver draws V·I only while on, so its highest mean over a clip is V·I
 * times the profile's overall duty limit; the arc-reach rule wants that mean, not the peak.
 */
export function coilDriveContext(driver: DriverProfile): CoilDriveContext {
  const pulse = driver.scheme === 'pulse' ? driver.pulse : undefined;
  return {
    supplyVoltageV: driver.supplyVoltageV,
    fullRailCurrentA: driver.fullRailCurrentA,
    ...(pulse
      ? {
          pulseOnTimeS: pulse.maxOnTimeS,
          inputPowerW: driver.supplyVoltageV * driver.fullRailCurrentA * pulse.maxDuty,
          inputPowerBasis: `supply voltage × full-rail current × the profile's maximum duty ${(pulse.maxDuty * 100).toFixed(3).replace(/\.?0+$/, '')} %: the highest mean over a whole clip`,
        }
      : {}),
  };
}
