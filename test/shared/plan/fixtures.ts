/**
 * Test helpers for the planner: synthetic signals, PlanClips built straight from them (frame
 * statistics and magnitude histogram, pulse events for the pulse scheme) and small invented driver
 * profiles with one Foster cell per device, validated by parseDriverProfile. Nothing here is a
 * real part's data: the figures are chosen so the analytic answers are easy to write down.
 */
import { computeFrameStats } from '../../../shared/dsp/frame-stats.ts';
import { magnitudeHistogram } from '../../../shared/dsp/histogram.ts';
import type { PlanClip } from '../../../shared/plan/evaluate.ts';
import { zeroCrossingEvents } from '../../../shared/plan/pulse-train.ts';
import { type DriverDevice, type DriverProfile, parseDriverProfile } from '../../../shared/schemas/driver.ts';

/** The coil as the driver sees it (invented): 300 kHz, Q 30. */
export const COIL = { resonanceHz: 300e3, qualityFactor: 30 };
/** The same, with the envelope corner f0/(2Q) that planClipReport reads. */
export const COIL_WITH_CORNER = { ...COIL, modulationCornerHz: COIL.resonanceHz / (2 * COIL.qualityFactor) };

/** Low sample rate keeps the clips small: 8 samples per 1 ms frame. */
export const FS = 8000;

/** A sine of `hz` and peak `amp` (linear full scale) for `seconds`, starting at phase `phase` rad. */
export function tone(hz: number, amp: number, seconds: number, fs = FS, phase = 0.3): Float32Array {
  return Float32Array.from({ length: Math.round(fs * seconds) }, (_, i) => amp * Math.sin((2 * Math.PI * hz * i) / fs + phase));
}

/** `seconds` of digital silence. */
export const silence = (seconds: number, fs = FS): Float32Array => new Float32Array(Math.round(fs * seconds));

/** Concatenates signals. */
export function concat(...parts: Float32Array[]): Float32Array {
  const out = new Float32Array(parts.reduce((n, p) => n + p.length, 0));
  let at = 0;
  for (const p of parts) {
    out.set(p, at);
    at += p.length;
  }
  return out;
}

/** Multiplies a signal by a linear factor (a new array). */
export const scaled = (x: Float32Array, factor: number): Float32Array => Float32Array.from(x, (v) => v * factor);

/**
 * The planner's view of a signal: frame statistics on frames of `frameS` (default 1 ms, as the
 * analysis uses), the magnitude histogram (default layout, 0.01 dB bins) and, when `pulses` is
 * set, the upward zero crossings as pulse events.
 */
export function planClip(name: string, signal: Float32Array, opts: { fs?: number; frameS?: number; pulses?: boolean } = {}): PlanClip {
  const fs = opts.fs ?? FS;
  const clip: PlanClip = {
    name,
    durationS: signal.length / fs,
    frames: computeFrameStats(signal, fs, { frameS: opts.frameS ?? 0.001 }),
    histogram: magnitudeHistogram(signal),
  };
  if (opts.pulses) clip.pulseEvents = zeroCrossingEvents(signal, fs);
  return clip;
}

/** Thermal path of one switch: one Foster cell, then case–sink, sink–ambient and the sink mass. */
export interface CellThermal {
  rKPerW: number;
  tauS: number;
  caseToSinkKPerW?: number;
  sinkToAmbientKPerW?: number;
  sinkHeatCapacityJPerK?: number;
}

/**
 * An invented MOSFET switch with a one-cell thermal path. Defaults: no switching or capacitive
 * loss (riseTimeS = fallTimeS = 0, C_oss = 0) and no Rds(on) temperature coefficient, so the loss
 * is a plain I²R and the electrothermal feedback is off.
 */
export function mosfet(role: DriverDevice['role'], th: CellThermal, extra: Partial<DriverDevice> = {}): DriverDevice {
  return {
    role,
    kind: 'mosfet',
    rdsOnOhm: 0.1,
    rdsOnTempCoeffPerK: 0,
    vceSatV: null,
    riseTimeS: 0,
    fallTimeS: 0,
    outputCapacitanceF: 0,
    tjMaxC: 150,
    thermal: {
      foster: [{ rKPerW: th.rKPerW, tauS: th.tauS }],
      caseToSinkKPerW: th.caseToSinkKPerW ?? 0,
      sinkToAmbientKPerW: th.sinkToAmbientKPerW ?? 0,
      sinkHeatCapacityJPerK: th.sinkHeatCapacityJPerK ?? 0,
    },
    ...extra,
  };
}

/**
 * An invented rail-linear half-bridge: 48 V supply, 3 A at full rail (g = 1/16 A/V), 25 °C
 * ambient, 100 A supply limit (never binds unless a test lowers it). Validated.
 */
export function linearDriver(bridge: DriverDevice, pass: DriverDevice, over: Partial<DriverProfile> = {}): DriverProfile {
  return parseDriverProfile({
    name: 'test linear (invented)',
    topology: 'half-bridge',
    supplyVoltageV: 48,
    fullRailCurrentA: 3,
    supplyCurrentLimitA: 100,
    ambientC: 25,
    scheme: 'rail-linear',
    devices: [bridge, pass],
    ...over,
  });
}

/**
 * An invented pulse-scheme half-bridge: 300 V, 10 A during a pulse; pulse limits as given
 * (default 150 µs maximum on-time, 0.5 ms minimum off-time, duty 10 %). Validated.
 */
export function pulseDriver(bridge: DriverDevice, pulse: Partial<NonNullable<DriverProfile['pulse']>> = {}, over: Partial<DriverProfile> = {}): DriverProfile {
  return parseDriverProfile({
    name: 'test pulse (invented)',
    topology: 'half-bridge',
    supplyVoltageV: 300,
    fullRailCurrentA: 10,
    supplyCurrentLimitA: 100,
    ambientC: 25,
    scheme: 'pulse',
    // No minimum on-time unless a test asks for one: these tests are about the other pulse limits.
    pulse: { maxOnTimeS: 150e-6, minOffTimeS: 5e-4, maxDuty: 0.1, minOnTimeS: 0, ...pulse },
    devices: [bridge],
    ...over,
  });
}

/**
 * Per-switch I²R loss of a half-bridge MOSFET at a rail mean square E[v²] (V²), W:
 * I_rms = (π/2)·I_s per switch for a half-bridge at resonance (half-sine of peak π·I_s; Erickson &
 * Maksimović, Fundamentals of Power Electronics, 2nd ed., §19.1 sinusoidal approximation), and
 * E[I_s²] = g²·E[v²] for the resistive equivalent I_s = g·v.
 */
export const halfBridgeI2rW = (rdsOnOhm: number, gAPerV: number, meanSquareV2: number): number =>
  rdsOnOhm * (Math.PI / 2) ** 2 * gAPerV * gAPerV * meanSquareV2;
