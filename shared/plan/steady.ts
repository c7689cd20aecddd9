/**
 * The driver held in one steady state for a while: a rail scheme at a constant rail voltage, or a
 * pulse scheme either on for the whole time or idle. Used for full-operation losses (the duty
 * budget) and for idle gaps between the clips of a set.
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
  /** Pulse scheme: on for the whole duration (true) or idle (false). */
  pulseOn: boolean;
  initial?: ThermalState[];
  ambientC: number;
}

/** Simulates `driver` in the steady state `s`, with traces. */
export function simulateSteady(driver: DriverProfile, coil: CoilAtResonance, s: SteadyDrive): DriverSimulation {
  const n = Math.max(1, Math.ceil(s.durationS / s.frameS));
  const dt = s.durationS / n;
  const opts = { initial: s.initial, ambientC: s.ambientC, traces: true, frameS: dt };
  if (driver.scheme === 'pulse') {
    const train = s.pulseOn ? { startS: Float64Array.of(0), onS: Float64Array.of(s.durationS) } : { startS: new Float64Array(0), onS: new Float64Array(0) };
    return simulatePulses(driver, coil, train, s.durationS, opts);
  }
  return simulateRail(driver, coil, { frameS: dt, meanV: new Float64Array(n).fill(s.railV), meanSquareV2: new Float64Array(n).fill(s.railV * s.railV) }, opts);
}
