/**
 * Losses of a bipolar junction transistor (BJT) used as a switch, per switch, averaged over an
 * interval, in the {@link LossParts} form of ./losses.ts.
 *
 * Sources: Mohan, Undeland & Robbins, *Power Electronics: Converters, Applications, and Design*,
 * 3rd ed., 2003, ch. 21 "Bipolar Junction Transistors" [recalled] (on-state: the collector–emitter
 * drop V_CE(sat) at a forced gain β_F = I_C/I_B well below the device's h_FE, with the base–emitter
 * junction at V_BE(sat); turn-off: the storage time t_s while the stored base charge is removed,
 * during which the transistor passes through quasi-saturation, then the current fall t_f) and §2-5,
 * eqs. 2-6 and 2-7 [recalled] for the generic switching energy ½·V·I·t_c per transition and the
 * on-state loss V_on·I.
 *
 * The terms (I = supply/rail current of the interval, per-switch current ratios k of the topology,
 * ./currents.ts):
 * - conduction: V_CE(sat)·I_C,avg = V_CE(sat)·k_avg·E[I] (plus r·k_rms²·E[I²] when a slope
 *   resistance `rdsOnOhm` is given), Mohan eq. 2-7 [recalled] with V_on = V_CE(sat);
 * - base drive: V_BE(sat)·I_B,avg, dissipated in the base–emitter junction. A drive that follows the
 *   collector current (a feedback winding, forced gain β_F): I_B,avg = I_C,avg/β_F. A fixed base
 *   current I_B while on: I_B,avg = I_B·D with the on-fraction D = ½ of every topology here, and only
 *   while the switch runs (rail above zero);
 * - transitions: ½·E[V·I_c]·(t_r + t_f + t_s)·f0 with the commutated current I_c = k_pk·I (the
 *   conservative peak, as for the other kinds). The storage time is counted as overlap: with the
 *   base fed from the resonant circuit (no hard reverse base current) the collector leaves
 *   saturation during t_s (quasi-saturation) while the current still flows, so t_s lengthens the
 *   turn-off overlap. Under a hard reverse base drive into a clamped inductive load t_s only delays
 *   the turn-off and this is conservative;
 * - output capacitance: ½·C_oss·E[V²]·f0, as for the other kinds (Graovac, Pürschel & Kiep, Infineon
 *   2006 [recalled]).
 * V_CE(sat) is taken as the datasheet's figure at its stated collector current; above that current
 * it rises (and at a fixed base current the transistor may leave saturation altogether), which
 * {@link bjtSaturationWarning} says.
 */
import type { DriverDevice, DriverTopology } from '../../schemas/driver.ts';
import { bridgeCurrentFactors } from './currents.ts';
import type { LossParts, RailMoments } from './losses.ts';

/** On-fraction of a switch in every topology here: each switch conducts one half-cycle. */
export const SWITCH_ON_FRACTION = 0.5;

/**
 * Base drive dissipation V_BE(sat)·I_B,avg in W for a BJT whose collector current averages
 * collectorAvgA over the interval (module note). `running`: the switch runs at all (a fixed base
 * current flows only then). 0 for other device kinds.
 *
 * @example bjtBaseDriveW({ kind: 'bjt', vbeSatV: 0.9, forcedGain: 10, ... }, 1, true) // → 0.09 W
 */
export function bjtBaseDriveW(device: DriverDevice, collectorAvgA: number, running: boolean, onFraction = SWITCH_ON_FRACTION): number {
  if (device.kind !== 'bjt') return 0;
  const vbe = device.vbeSatV ?? 0;
  if (device.forcedGain !== undefined && device.forcedGain !== null) return (vbe * Math.max(collectorAvgA, 0)) / device.forcedGain;
  return running ? vbe * (device.baseCurrentA ?? 0) * onFraction : 0;
}

/**
 * Loss of ONE bipolar bridge switch (any topology; a single switch is one) at the coil's resonance
 * f0 (Hz), averaged over an interval with rail moments `m` (module note for every term and its
 * source). Hard-switching estimate only: ./losses.ts applies the linear-element bound past the
 * transition-share limit.
 *
 * Worked example (test/shared/physics/driver/bjt.test.ts): single switch, constant 12 V rail at
 * 1 A, f0 = 400 kHz, V_CE(sat) 0.3 V, β_F 10, V_BE(sat) 0.9 V, t_r 50 ns, t_f 80 ns, t_s 200 ns,
 * C_oss 50 pF: conduction 0.3 W, base 0.09 W, transitions ½·2.8621·12·0.132 = 2.267 W, C_oss 1.44 mW.
 *
 * @example bjtBridgeLossParts(dev, 'single-switch', 400e3, railMoments(1 / 12, 12, 144))
 */
export function bjtBridgeLossParts(device: DriverDevice, topology: DriverTopology, resonanceHz: number, m: RailMoments, out: LossParts): LossParts {
  const k = bridgeCurrentFactors(topology);
  const r = device.rdsOnOhm ?? 0;
  const icAvg = k.switchAvg * m.meanCurrentA;
  const overlapS = device.riseTimeS + device.fallTimeS + (device.storageTimeS ?? 0);
  out.resistiveAt25W = r * k.switchRms * k.switchRms * m.meanSquareCurrentA2;
  out.conductionFixedW = (device.vceSatV ?? 0) * icAvg + bjtBaseDriveW(device, icAvg, m.meanCurrentA > 0);
  out.switchingW = 0.5 * k.switchPeak * m.meanPowerW * overlapS * resonanceHz;
  out.capacitiveW = 0.5 * device.outputCapacitanceF * m.meanSquareV2 * resonanceHz;
  return out;
}

/**
 * The switch's peak collector current against the current its V_CE(sat) is stated at: a warning
 * when the peak is higher (V_CE(sat) rises above the stated current, and a fixed base current may
 * no longer saturate the transistor), else an empty string. `peakA` = the switch's peak current.
 *
 * @example bjtSaturationWarning(dev, 'bridge', 3.4) // "bridge switch: peak collector current 3.40 A …"
 */
export function bjtSaturationWarning(device: DriverDevice, role: string, peakA: number): string {
  if (device.kind !== 'bjt' || device.vceSatAtCurrentA === undefined || device.vceSatAtCurrentA === null) return '';
  if (!(peakA > device.vceSatAtCurrentA)) return '';
  const base =
    device.baseCurrentA !== undefined && device.baseCurrentA !== null
      ? `; at the fixed ${device.baseCurrentA} A base current the forced gain there is ${(peakA / device.baseCurrentA).toFixed(1)}, check that the part's h_FE still saturates it`
      : '';
  return (
    `${role} switch: peak collector current ${peakA.toFixed(2)} A is above the ${device.vceSatAtCurrentA} A at which its V_CE(sat) is stated, ` +
    `so its conduction loss is underestimated${base}. Use the datasheet's V_CE(sat) at this current.`
  );
}
