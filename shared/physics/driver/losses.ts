/**
 * Loss models of every switching device, per switch, averaged over an interval (a frame of the
 * rail, or a pulse). Each returns {@link LossParts}: the part that scales with the on-resistance's
 * temperature factor and the parts that do not, so the electrothermal loop (./electrothermal.ts)
 * can solve for the junction temperature.
 *
 * Sources: the conduction and hard-switching formulas are those of the MOSFET loss application
 * note of Graovac, Pürschel & Kiep (Infineon, "MOSFET Power Losses Calculation Using the
 * Data-Sheet Parameters", 2006 [recalled]) and of Mohan, Undeland & Robbins, *Power Electronics*,
 * 3rd ed., §2-5, eq. 2-6 [recalled] (linearised switching waveforms of a clamped inductive load:
 * ½·V·I·t_c per transition); the linear pass-device dissipation is (V_in − V_out)·I; the buck's
 * duty relations from Erickson & Maksimović, *Fundamentals of Power Electronics*, 2nd ed., ch. 2.
 */
import type { DriverDevice, DriverTopology } from '../../schemas/driver.ts';
import { bjtBaseDriveW, bjtBridgeLossParts } from './bjt.ts';
import { bridgeCurrentFactors } from './currents.ts';
import { boundTransitionParts, linearElementBoundW, tooSlow } from './transition.ts';

/** A device's average loss over an interval, split by temperature dependence (all W, per switch). */
export interface LossParts {
  /** I²·R part evaluated with R at 25 °C; multiply by 1 + α(Tj − 25). */
  resistiveAt25W: number;
  /** Conduction part independent of temperature (IGBT V_CE(sat)·I_avg; linear pass dissipation). */
  conductionFixedW: number;
  /** Hard-switching (V–I overlap) part. */
  switchingW: number;
  /** Output-capacitance part ½·C_oss·V²·f. */
  capacitiveW: number;
}

/**
 * Total loss in W at junction temperature tjC (°C): resistiveAt25W·(1 + α(Tj − 25)) + the rest, with
 * α the linear temperature coefficient of R_ds(on) in 1/K (Graovac et al. 2006 [recalled]).
 *
 * @example totalLossW({ resistiveAt25W: 2, conductionFixedW: 0, switchingW: 1, capacitiveW: 0 }, 0.007, 125) // → 4.4 W
 */
export function totalLossW(p: LossParts, tempCoeffPerK: number, tjC: number): number {
  return p.resistiveAt25W * (1 + tempCoeffPerK * (tjC - 25)) + p.conductionFixedW + p.switchingW + p.capacitiveW;
}

/**
 * Moments of the rail over an interval, for a load drawing I = g·V: E[I] (A), E[I²] (A²),
 * E[V·I] (W) and E[V²] (V²). For a constant rail V and current I: {I, I², V·I, V²}.
 */
export interface RailMoments {
  meanCurrentA: number;
  meanSquareCurrentA2: number;
  meanPowerW: number;
  meanSquareV2: number;
}

/**
 * Moments of a rail whose per-interval mean E[v] (V) and mean square E[v²] (V²) are known, with
 * the resistive-equivalent current I = g·v: E[I] = gE[v], E[I²] = g²E[v²], E[VI] = gE[v²].
 *
 * @example railMoments(0.0625, 24, 576) // constant 24 V → { meanCurrentA: 1.5, …, meanPowerW: 36 }
 */
export function railMoments(gAPerV: number, meanV: number, meanSquareV2: number, out?: RailMoments): RailMoments {
  const o = out ?? { meanCurrentA: 0, meanSquareCurrentA2: 0, meanPowerW: 0, meanSquareV2: 0 };
  o.meanCurrentA = gAPerV * meanV;
  o.meanSquareCurrentA2 = gAPerV * gAPerV * meanSquareV2;
  o.meanPowerW = gAPerV * meanSquareV2;
  o.meanSquareV2 = meanSquareV2;
  return o;
}

/** A zeroed {@link LossParts}, e.g. as an `out` buffer. */
export const emptyLossParts = (): LossParts => ({ resistiveAt25W: 0, conductionFixedW: 0, switchingW: 0, capacitiveW: 0 });

/**
 * Loss of ONE bridge switch driving a series-resonant primary at its resonance f0 (Hz), averaged
 * over an interval whose rail moments are `m` (current = supply/rail current of the bridge).
 * With the topology's per-switch ratios kᵣₘₛ, k_avg, k_pk (./currents.ts):
 * - MOSFET conduction: kᵣₘₛ²·E[I²]·R_ds(on)(Tj) (Graovac et al. 2006 [recalled]);
 * - IGBT conduction: V_CE(sat)·k_avg·E[I] + r·kᵣₘₛ²·E[I²] (r = optional `rdsOnOhm` slope resistance);
 * - switching, hard-switched estimate: ½·V·I_c·(t_r + t_f)·f0 per transition pair and cycle with the
 *   commutated current I_c = k_pk·I (the switch's peak current): ½·k_pk·E[V·I]·(t_r + t_f)·f0
 *   (Mohan et al. eq. 2-6 [recalled], clamped inductive switching). At resonance the bridge switches near zero
 *   current (ZCS), which removes most of this term; switching at the current peak is the upper
 *   bound for any phase error, kept here as the conservative estimate;
 * - output capacitance: ½·C_oss·E[V²]·f0 (energy of C_oss discharged at each hard turn-on; zero
 *   with zero-voltage switching, kept as conservative);
 * - a bipolar transistor (kind "bjt"): {@link bjtBridgeLossParts} (./bjt.ts: V_CE(sat) conduction, base
 *   drive V_BE(sat)·I_B, transitions with the storage time, C_oss).
 * Past the transition-share limit ((t_r + t_f + t_s)·f0 > TRANSITION_SHARE_LIMIT, ./transition.ts)
 * the hard-switching estimate no longer holds: the transition and C_oss parts are replaced by the
 * larger of their sum and the linear-element bound ¼·V·Î = ¼·k_pk·E[V·I] (a device in its active
 * region on the load line from the rail to the switch's peak current), so the figure never drops
 * below the hard-switching estimate.
 *
 * @example bridgeLossParts(dev, 'half-bridge', 300e3, railMoments(0.0625, 48, 2304))
 */
export function bridgeLossParts(
  device: DriverDevice,
  topology: DriverTopology,
  resonanceHz: number,
  m: RailMoments,
  out?: LossParts,
): LossParts {
  const k = bridgeCurrentFactors(topology);
  const o = out ?? emptyLossParts();
  if (device.kind === 'bjt') bjtBridgeLossParts(device, topology, resonanceHz, m, o);
  else {
    const r = device.rdsOnOhm ?? 0;
    const vce = device.kind === 'igbt' ? (device.vceSatV ?? 0) : 0;
    o.resistiveAt25W = r * k.switchRms * k.switchRms * m.meanSquareCurrentA2;
    o.conductionFixedW = vce * k.switchAvg * m.meanCurrentA;
    o.switchingW = 0.5 * k.switchPeak * m.meanPowerW * (device.riseTimeS + device.fallTimeS) * resonanceHz;
    o.capacitiveW = 0.5 * device.outputCapacitanceF * m.meanSquareV2 * resonanceHz;
  }
  // E[V·Î] = k_pk·E[V·I]: the bound ¼·V·Î averaged over the interval.
  if (tooSlow(device, resonanceHz)) boundTransitionParts(o, linearElementBoundW(1, k.switchPeak * m.meanPowerW));
  return o;
}

/**
 * Dissipation of a linear pass device (series regulator) between the supply V_s and the rail v,
 * averaged over an interval: P = E[(V_s − v)·I] with I = g·v, i.e. P = g·(V_s·E[v] − E[v²]) in W.
 * For a constant rail it is g·v·(V_s − v), largest at v = V_s/2: g·V_s²/4 — silence, which puts the
 * rail at half the supply, is the hottest case for the pass device. The saturation floor I²·R_on
 * near v = V_s is neglected. Returned as conductionFixedW (it does not depend on Tj).
 *
 * @example passLossParts(48, 0.0625, 24, 576).conductionFixedW // → 36 W = g·V_s²/4
 */
export function passLossParts(supplyV: number, gAPerV: number, meanV: number, meanSquareV2: number, out?: LossParts): LossParts {
  const o = out ?? emptyLossParts();
  o.resistiveAt25W = 0;
  o.conductionFixedW = Math.max(0, gAPerV * (supplyV * meanV - meanSquareV2));
  o.switchingW = 0;
  o.capacitiveW = 0;
  return o;
}

/**
 * Sharp upper bound of E[v³] (V³) for a rail v ∈ [0, V_max] with mean m and mean square s: the
 * extremal distribution has its mass on {y, V_max} with y = (V_max·m − s)/(V_max − m), and
 * E[v³] ≤ (V_max + 2y)·s − (2y·V_max + y²)·m + y²·V_max, because the quadratic on the right of
 * v³ ≤ v³ − (v − y)²(v − V_max) dominates v³ on [0, V_max] (Chebyshev–Markov–Krein moment
 * bounds: Karlin & Studden, *Tchebycheff Systems*, 1966, ch. III). Exact for a constant rail; about
 * 10 % above the true value for a fully modulated sine. Inputs are clamped to the feasible set
 * m ∈ [0, V_max], s ∈ [m², V_max·m].
 *
 * @example railThirdMomentBoundV3(10, 100, 20) // constant 10 V → 1000
 */
export function railThirdMomentBoundV3(meanV: number, meanSquareV2: number, maxV: number): number {
  const m = Math.min(Math.max(meanV, 0), maxV);
  const s = Math.min(Math.max(meanSquareV2, m * m), maxV * m);
  if (m >= maxV) return maxV * maxV * maxV;
  if (m <= 0) return 0;
  const y = Math.max(0, (maxV * m - s) / (maxV - m));
  return (maxV + 2 * y) * s - (2 * y * maxV + y * y) * m + y * y * maxV;
}

/**
 * Loss of the rail modulator: the switch of a buck converter at pwmHz from the supply V_s to the
 * rail v, duty D = v/V_s, carrying the rail current I = g·v during its on-time (continuous
 * conduction, inductor ripple neglected; Erickson & Maksimović ch. 2). Averaged over an interval
 * with rail mean E[v] and mean square E[v²]:
 * - MOSFET conduction D·I²·R(Tj): g²·R·E[v³]/V_s, with E[v³] bounded above by
 *   {@link railThirdMomentBoundV3} (the frame gives only two moments; the bound is exact for a
 *   constant rail and conservative otherwise);
 * - IGBT conduction D·I·V_CE(sat) + D·I²·r: V_CE·g·E[v²]/V_s + r·g²·E[v³]/V_s;
 * - switching ½·V_s·I·(t_r + t_f)·f_pwm → ½·V_s·g·E[v]·(t_r + t_f)·f_pwm (hard-switched, clamped
 *   inductive: Mohan et al. eq. 2-6 [recalled]; Graovac et al. 2006 [recalled]);
 * - output capacitance ½·C_oss·V_s²·f_pwm while the modulator switches (E[v] > 0);
 * - a BJT: conduction as an IGBT's, base drive V_BE(sat)·I_B,avg with I_B,avg = D·I/β_F
 *   (→ V_BE·g·E[v²]/(β_F·V_s)) or D·I_B (→ V_BE·I_B·E[v]/V_s), and the storage time counted in the
 *   switching overlap (./bjt.ts);
 * - past the transition-share limit at f_pwm (./transition.ts): the linear-element bound g·V_s²/4
 *   (a linear pass element's worst case) is ADDED to the switching and C_oss parts while the
 *   modulator runs (a sum, not the maximum, so the loss stays affine in E[v] and E[v²]; still never
 *   below the hard-switching estimate);
 * - the switching parts (transitions, C_oss, the linear-element bound) times the share h(E[v]) of
 *   PWM cycles that still switch ({@link modulatorSwitchingShare}): at 100 % duty the switch stays
 *   on and none of them exists, and they fall to zero continuously as the duty approaches it (no
 *   step). Conduction and base drive go on at 100 % duty and are not tapered.
 * The freewheel diode's conduction and recovery losses are in another device and neglected here.
 *
 * @example modulatorLossParts(dev, 160, 100e3, 0.025, 80, 6400)
 */
export function modulatorLossParts(
  device: DriverDevice,
  supplyV: number,
  pwmHz: number,
  gAPerV: number,
  meanV: number,
  meanSquareV2: number,
  out?: LossParts,
): LossParts {
  const ev3 = railThirdMomentBoundV3(meanV, meanSquareV2, supplyV);
  const r = device.rdsOnOhm ?? 0;
  const vce = device.kind === 'mosfet' ? 0 : (device.vceSatV ?? 0);
  const overlapS = device.riseTimeS + device.fallTimeS + (device.kind === 'bjt' ? (device.storageTimeS ?? 0) : 0);
  const o = out ?? emptyLossParts();
  // Switch current averaged over the interval: D·I = (v/V_s)·g·v → g·E[v²]/V_s.
  const switchAvgA = (gAPerV * Math.max(meanSquareV2, 0)) / supplyV;
  o.resistiveAt25W = (r * gAPerV * gAPerV * ev3) / supplyV;
  o.conductionFixedW = vce * switchAvgA;
  if (device.kind === 'bjt') {
    // Fixed base current flows for the on-fraction D = v/V_s: averaged, I_B·E[v]/V_s.
    o.conductionFixedW +=
      device.forcedGain !== undefined && device.forcedGain !== null
        ? bjtBaseDriveW(device, switchAvgA, meanV > 0)
        : bjtBaseDriveW(device, 0, meanV > 0, Math.max(meanV, 0) / supplyV);
  }
  const h = modulatorSwitchingShare(meanV, supplyV, modulatorTaperV(device, supplyV, pwmHz));
  o.switchingW = 0.5 * supplyV * gAPerV * Math.max(meanV, 0) * overlapS * pwmHz * h;
  o.capacitiveW = meanV > 0 ? 0.5 * device.outputCapacitanceF * supplyV * supplyV * pwmHz * h : 0;
  if (meanV > 0 && tooSlow(device, pwmHz)) o.switchingW += 0.25 * gAPerV * supplyV * supplyV * h;
  return o;
}

/**
 * Width below the supply, V, over which the buck modulator's switching stops: V_s·(t_r + t_f + t_s)·f_pwm
 * (t_s, a BJT's storage time, is 0 for other kinds). At duty D the switch is off for
 * (1 − D)/f_pwm per cycle; once that is shorter than its own turn-off plus turn-on time it no
 * longer completes a transition, and at D = 1 it stays
 * on (Erickson & Maksimović ch. 2: D = v/V_s). Example: 160 V, 40 ns, 150 kHz → 0.96 V.
 */
export function modulatorTaperV(device: Pick<DriverDevice, 'kind' | 'riseTimeS' | 'fallTimeS' | 'storageTimeS'>, supplyV: number, pwmHz: number): number {
  return supplyV * (device.riseTimeS + device.fallTimeS + (device.kind === 'bjt' ? (device.storageTimeS ?? 0) : 0)) * pwmHz;
}

/**
 * Share of PWM cycles in which the buck modulator switches, as a function of the rail's frame mean
 * E[v] = m: h(m) = min(1, (V_s − m)/w) with w = {@link modulatorTaperV} (for w = 0: 1 below V_s,
 * 0 at V_s). A linear fall over the last w volts is an upper bound on the transition energy left
 * when the off-interval is cut short (the V–I overlap shrinks at least in proportion, the C_oss
 * energy with the square of the voltage reached). Both switching parts, v·h(v) and h(v) for v > 0,
 * are concave in v, so by Jensen's inequality E[v·h(v)] ≤ m·h(m) and E[h(v)] ≤ h(m): evaluating at
 * the frame mean keeps the frame's loss an upper bound (exact for a constant rail).
 *
 * @example modulatorSwitchingShare(159.52, 160, 0.96) // → 0.5
 */
export function modulatorSwitchingShare(meanV: number, supplyV: number, taperV: number): number {
  if (meanV >= supplyV) return 0;
  if (!(taperV > 0)) return 1;
  return Math.min(1, (supplyV - meanV) / taperV);
}

/**
 * Current drawn from the supply by the buck modulator in A, by power balance: the rail power g·E[v²]
 * plus the modulator's own loss, divided by V_s (input capacitor assumed: the PWM-frequency pulses
 * of the switch current are averaged).
 *
 * @example buckSupplyCurrentA(160, 0.025, 6400, 2) // → (160 + 2)/160 = 1.0125 A
 */
export function buckSupplyCurrentA(supplyV: number, gAPerV: number, meanSquareV2: number, modulatorLossW: number): number {
  return (gAPerV * meanSquareV2 + modulatorLossW) / supplyV;
}
