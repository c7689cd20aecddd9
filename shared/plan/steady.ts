/**
 * The driver idling for a while, supply on and no music: a rail scheme at a constant rail voltage
 * (half the supply, its bias), a pulse scheme sending no pulses. Used for the idle gaps between the
 * clips of a set and for how long a rig may idle (./idle.ts).
 */
import { simulatePulses } from '../physics/driver/simulate-pulses.ts';
import { simulateRail } from '../physics/driver/simulate-rail.ts';
import type { CoilAtResonance, DriverSimulation, ThermalState } from '../physics/driver/types.ts';
import type { DriverProfile } from '../schemas/driver.ts';

export interface SteadyDrive {
  durationS: number;
  /** Frame length of the simulation and its traces, s (the duration is split into whole frames). */
  frameS: number;
  /** Rail schemes: the constant rail voltage, V. */
  railV: number;
  initial?: ThermalState[];
  ambientC: number;
}

/** Simulates `driver` in the steady state `s`, with traces. */
export function simulateSteady(driver: DriverProfile, coil: CoilAtResonance, s: SteadyDrive): DriverSimulation {
  const n = Math.max(1, Math.ceil(s.durationS / s.frameS));
  const dt = s.durationS / n;
  const opts = { initial: s.initial, ambientC: s.ambientC, traces: true, frameS: dt };
  if (driver.scheme === 'pulse') {
    // No pulses: a pulse driver idles cold.
    return simulatePulses(driver, coil, { startS: new Float64Array(0), onS: new Float64Array(0) }, s.durationS, opts);
  }
  return simulateRail(driver, coil, { frameS: dt, meanV: new Float64Array(n).fill(s.railV), meanSquareV2: new Float64Array(n).fill(s.railV * s.railV) }, opts);
}
