/**
 * Currents in the driver: the supply's resistive equivalent and the per-switch current of each
 * bridge topology driving a series-resonant primary at resonance.
 *
 * Bridges (half and full): square-wave drive, tank current sinusoidal and in phase with the
 * fundamental of the bridge output voltage (the series-resonant tank at resonance is a resistance;
 * Erickson & Maksimović, *Fundamentals of Power Electronics*, 2nd ed., §19.1 "sinusoidal
 * approximation"). Only the fundamental carries power, so the supply power V·I_s equals
 * ½·V₁·Î with V₁ the fundamental amplitude of the bridge output: 4/π·(V/2) = 2V/π for a
 * half-bridge (output swings 0…V about its mean), 4V/π for a full bridge (±V). Hence
 *   half-bridge: Î = π·I_s;   full bridge: Î = (π/2)·I_s.
 * Each switch conducts one half-cycle of the sinusoid (one half-sine of peak Î), so per switch
 *   I_rms = Î/2,  I_avg = Î/π,  I_peak = Î
 * (half-bridge: I_rms = (π/2)·I_s, I_avg = I_s; full bridge: I_rms = (π/4)·I_s, I_avg = I_s/2).
 *
 * Single switch: modelled as the class-E inverter at duty 0.5 in its optimum (zero-voltage,
 * zero-slope) operation (Sokal & Sokal, IEEE JSSC 10(3), 1975; Raab, IEEE Trans. Circuits Syst.
 * 24(12), 1977). Its switch current over the on half-cycle is
 *   i_S(θ) = I_s·(1 + (π/2)·sin θ − cos θ), 0 < θ ≤ π
 * (Kazimierczuk, *RF Power Amplifiers*, 2nd ed., class-E chapter [recalled]), whence I_avg = I_s,
 * I_rms = I_s·√(π² + 28)/4 ≈ 1.5385·I_s, I_peak = I_s·(1 + √(1 + π²/4)) ≈ 2.8621·I_s and an
 * output (tank) current amplitude √(1 + π²/4)·I_s ≈ 1.8621·I_s; the switch must block ≈ 3.562·V.
 * These follow by integrating the waveform above (the tests do so).
 */
import type { DriverTopology } from '../../schemas/driver.ts';

/** Per-switch current ratios to the supply current I_s of a topology (see the module note). */
export interface BridgeCurrentFactors {
  /** Tank (coil primary) current amplitude Î / I_s. */
  tankPeak: number;
  /** Switch RMS current / I_s. */
  switchRms: number;
  /** Switch average current / I_s. */
  switchAvg: number;
  /** Switch peak current / I_s (the current commutated in the conservative switching estimate). */
  switchPeak: number;
}

const HALF: BridgeCurrentFactors = { tankPeak: Math.PI, switchRms: Math.PI / 2, switchAvg: 1, switchPeak: Math.PI };
const FULL: BridgeCurrentFactors = { tankPeak: Math.PI / 2, switchRms: Math.PI / 4, switchAvg: 0.5, switchPeak: Math.PI / 2 };
const CLASS_E_OUT = Math.sqrt(1 + (Math.PI * Math.PI) / 4);
const SINGLE: BridgeCurrentFactors = {
  tankPeak: CLASS_E_OUT,
  switchRms: Math.sqrt(Math.PI * Math.PI + 28) / 4,
  switchAvg: 1,
  switchPeak: 1 + CLASS_E_OUT,
};

/**
 * Current ratios of a topology at resonance, per switch, relative to the supply (rail) current:
 * half-bridge Î = πI_s, I_rms = (π/2)I_s, I_avg = I_s; full bridge Î = (π/2)I_s, I_rms = (π/4)I_s,
 * I_avg = I_s/2; single switch (class E, D = 0.5) I_rms = √(π²+28)/4·I_s, I_avg = I_s,
 * I_peak = 2.862·I_s. Derivations and sources in the module note.
 *
 * @example bridgeCurrentFactors('half-bridge').switchRms // → π/2 = 1.5708
 */
export function bridgeCurrentFactors(topology: DriverTopology): BridgeCurrentFactors {
  switch (topology) {
    case 'half-bridge':
      return HALF;
    case 'full-bridge':
      return FULL;
    case 'single-switch':
      return SINGLE;
    default:
      throw new RangeError(`bridgeCurrentFactors: unknown topology ${String(topology)}`);
  }
}

/**
 * Conductance of the supply's resistive equivalent in A/V: g = fullRailCurrentA / supplyVoltageV,
 * so the rail current is I = g·V_rail (the coil and bridge load the rail like a resistance, which
 * holds for a series-resonant load driven at resonance: Erickson & Maksimović §19.1).
 *
 * @example railConductanceAPerV({ fullRailCurrentA: 3, supplyVoltageV: 48 }) // → 0.0625 A/V
 */
export function railConductanceAPerV(p: { fullRailCurrentA: number; supplyVoltageV: number }): number {
  return p.fullRailCurrentA / p.supplyVoltageV;
}

/**
 * Time constant of the tank's amplitude envelope in s, τ = 2L/R = Q/(π·f0): the drive must last
 * several τ for the tank current to ring up to its steady amplitude (the envelope of a driven
 * series-resonant circuit rises as 1 − e^(−t/τ); e.g. Terman, *Radio Engineers' Handbook*, 1943,
 * [recalled]).
 *
 * @example ringUpTimeS(300e3, 30) // → 31.8 µs
 */
export function ringUpTimeS(resonanceHz: number, qualityFactor: number): number {
  return qualityFactor / (Math.PI * resonanceHz);
}
