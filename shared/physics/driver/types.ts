/**
 * Inputs and results of the driver simulations (./simulate-rail.ts, ./simulate-pulses.ts).
 * All losses and temperatures are PER SWITCH; `count` says how many identical switches a role has.
 */
import type { DeviceRole } from '../../schemas/driver.ts';

/** The coil as the driver sees it: series resonance f0 (Hz) and loaded quality factor Q. */
export interface CoilAtResonance {
  resonanceHz: number;
  qualityFactor: number;
}

/**
 * The rail voltage per frame: frame length (s) and, per frame, the mean E[v] (V) and mean square
 * E[v²] (V²) of the rail over the frame (0 ≤ v ≤ supply voltage).
 */
export interface RailFrames {
  frameS: number;
  meanV: Float64Array;
  meanSquareV2: Float64Array;
}

/** Pulses of the pulse scheme: start times (s, ascending) and on-times (s), one entry per pulse. */
export interface PulseTrain {
  startS: Float64Array;
  onS: Float64Array;
}

/**
 * Thermal state of one device: node temperature rises above ambient in K, junction node first, then
 * the inner Cauer nodes, then the sink node when the sink has heat capacity (see
 * ThermalNetwork.nodeRisesK). Valid for the same profile's thermal data only.
 */
export type ThermalState = Float64Array;

/** Options of a simulation. */
export interface SimulationOptions {
  /** Start state per device, in the order of `DriverSimulation.devices`; default: at ambient. */
  initial?: ThermalState[];
  /** Ambient in °C; default the profile's ambientC. */
  ambientC?: number;
  /** Return per-frame traces (Float32Array) per device and for the supply current. */
  traces?: boolean;
  /** Junction temperature (°C) above which time is counted; default per device Tj max − 25 K. */
  warnC?: number;
  /** Pulse scheme only: the frame grid of the traces in s; default 1 ms. */
  frameS?: number;
}

/** Per-frame traces of one device (per switch). */
export interface DeviceTraces {
  /** Frame-average loss, W. */
  lossW: Float32Array;
  /** Junction temperature, °C: end of frame (rail schemes), frame maximum (pulse scheme). */
  junctionC: Float32Array;
  /** Case temperature at the end of the frame, °C. */
  caseC: Float32Array;
  /** Sink temperature at the end of the frame, °C. */
  sinkC: Float32Array;
}

/** Result for one role (per switch). */
export interface DeviceSimulation {
  role: DeviceRole;
  /** Number of identical switches of this role. */
  count: number;
  /** Highest junction temperature, °C (evaluated at frame or pulse ends). */
  peakJunctionC: number;
  /** When it occurred, s. */
  peakAtS: number;
  /** Time-average loss per switch, W. */
  meanLossW: number;
  /** Time the junction spent above the warning temperature, s (linear interpolation between evaluations). */
  timeAboveWarnS: number;
  /** Warning temperature used, °C. */
  warnC: number;
  /** First time the electrothermal fixed point did not exist below Tj max; null if never. */
  runaway: { atS: number } | null;
  traces?: DeviceTraces;
}

/** Energy ledger over the whole simulation, J: input = delivered to the coil + dissipated. */
export interface EnergyLedger {
  /** Drawn from the supply. */
  inputJ: number;
  /** Delivered to the coil (rail power into the bridge minus bridge losses). */
  deliveredJ: number;
  /** Dissipated in all switches (count × per-switch loss, every role). */
  dissipatedJ: number;
}

/** Result of a driver simulation. */
export interface DriverSimulation {
  /** Bridge first, then the pass or modulator device when the scheme has one. */
  devices: DeviceSimulation[];
  supply: {
    /** Rail schemes: the highest frame-mean supply current; pulse scheme: the current during a pulse. A. */
    peakCurrentA: number;
    /** Time-average supply current, A. */
    meanCurrentA: number;
    /** Frame-mean supply current per frame, A (with `traces`). */
    currentA?: Float32Array;
  };
  /** Final thermal state per device (same order as `devices`), to continue a later simulation. */
  finalState: ThermalState[];
  /** Plain-language warnings (over-temperature, runaway, supply limit, pulse limits, …). */
  warnings: string[];
  energy: EnergyLedger;
  /** Pulse scheme only. */
  pulse?: {
    count: number;
    /** Fewest RF cycles in a pulse: min(onS)·f0. */
    rfCyclesMin: number;
    /** Mean RF cycles per pulse. */
    rfCyclesMean: number;
    /** Pulses shorter than the tank's ring-up time Q/(π·f0). */
    shorterThanRingUp: number;
  };
}
