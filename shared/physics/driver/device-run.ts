/**
 * The running thermal state and statistics of one switch during a simulation: solves the
 * electrothermal fixed point per interval (./electrothermal.ts), advances the exact thermal update
 * (../thermal/network.ts) and keeps peak, time above the warning temperature, runaway and energy.
 * Internal to the simulations; exported for their tests.
 */
import type { DeviceRole, DriverDevice } from '../../schemas/driver.ts';
import { ThermalNetwork, type StepCoefficients } from '../thermal/network.ts';
import { solveElectrothermal, type ElectrothermalSolution } from './electrothermal.ts';
import { modulatorSwitchingShare, railThirdMomentBoundV3, type LossParts } from './losses.ts';
import type { DeviceSimulation, DeviceTraces, ThermalState } from './types.ts';

/**
 * A frame loss model, per switch: with m = E[v] and s = E[v²] of the rail over a frame,
 * I²R part at 25 °C a = rS·s + r3·E3(m, s) and other part b = (oM·m + oC·[m > 0])·h(m) + oS·s + oN·m, where
 * E3 is the upper bound of E[v³] (railThirdMomentBoundV3) and h the share of PWM cycles that
 * switch (modulatorSwitchingShare with `taperV`; h = 1 when taperV is undefined). Every loss model
 * of ./losses.ts for a rail has this form (see frameLossModel in ./simulate-rail.ts).
 */
export interface FrameLossModel {
  supplyV: number;
  rS: number;
  r3: number;
  oM: number;
  oS: number;
  oC: number;
  /** Buck modulator only: the part proportional to E[v] that is not tapered (a BJT's fixed base drive), W/V. Default 0. */
  oN?: number;
  /** Buck modulator only: the width below V_s over which its switching stops (modulatorTaperV), V. */
  taperV?: number;
}

/** The I²R part a of {@link FrameLossModel} at 25 °C, W, for a feasible (m, s). */
export function frameResistiveAt25W(model: FrameLossModel, m: number, s: number): number {
  return model.rS * s + (model.r3 !== 0 ? model.r3 * railThirdMomentBoundV3(m, s, model.supplyV) : 0);
}

/** The temperature-independent part b of {@link FrameLossModel}, W, for a feasible (m, s). */
export function frameOtherW(model: FrameLossModel, m: number, s: number): number {
  const h = model.taperV === undefined ? 1 : modulatorSwitchingShare(m, model.supplyV, model.taperV);
  return (model.oM * m + (m > 0 ? model.oC : 0)) * h + model.oS * s + (model.oN ?? 0) * m;
}

/**
 * A frame's loss at a held junction temperature tjC (°C), W: a·(1 + α(Tj − 25)) + b, with (m, s)
 * first clamped to the feasible set m ∈ [0, V_s], s ∈ [m², V_s·m].
 *
 * @example frameLossAtW(frameLossModel(DEMO_DRIVER_LINEAR, 'pass', 300e3), 24, 576, 0, 25) // → 36 W
 */
export function frameLossAtW(model: FrameLossModel, meanV: number, meanSquareV2: number, tempCoeffPerK: number, tjC: number): number {
  const vs = model.supplyV;
  const m = Math.min(Math.max(meanV, 0), vs);
  const s = Math.min(Math.max(meanSquareV2, m * m), vs * m);
  return frameResistiveAt25W(model, m, s) * (1 + tempCoeffPerK * (tjC - 25)) + frameOtherW(model, m, s);
}

/** Default margin below Tj max for the warning temperature, K (common practice: derate 20–25 K). */
export const DEFAULT_WARN_MARGIN_K = 25;

/**
 * One switch being simulated. `solve` gives the interval's loss from its {@link LossParts};
 * `advance` moves the state to the end of an interval (or a piece of one) at that loss.
 *
 * @example
 * const run = new DeviceRun('bridge', 2, device, 25, undefined, undefined);
 * const c = run.net.coefficients(1e-3);
 * run.advance(run.solve(parts, c, 0), c, 1e-3); run.junctionC() // °C after 1 ms
 */
export class DeviceRun {
  readonly net: ThermalNetwork;
  readonly state: Float64Array;
  readonly tempCoeffPerK: number;
  readonly tjMaxC: number;
  readonly warnC: number;
  energyJ = 0;
  peakC: number;
  peakAtS = 0;
  aboveWarnS = 0;
  runawayAtS: number | null = null;
  private lastJunctionC: number;
  private lastTimeS = 0;
  private readonly sol: ElectrothermalSolution = { powerW: 0, meanJunctionC: 0, runaway: false };

  constructor(
    readonly role: DeviceRole,
    readonly count: number,
    readonly device: DriverDevice,
    readonly ambientC: number,
    warnC: number | undefined,
    initial: ThermalState | undefined,
  ) {
    this.net = ThermalNetwork.fromPath(device.thermal);
    this.state = initial === undefined ? this.net.createState() : this.net.stateFromNodeRisesK(initial);
    this.tempCoeffPerK = device.rdsOnTempCoeffPerK ?? 0; // multiplies only the I²R part (none for a plain IGBT)
    this.tjMaxC = device.tjMaxC;
    this.warnC = warnC ?? device.tjMaxC - DEFAULT_WARN_MARGIN_K;
    this.lastJunctionC = this.junctionC();
    this.peakC = this.lastJunctionC;
  }

  junctionC(): number {
    return this.ambientC + this.net.junctionRiseK(this.state);
  }
  caseC(): number {
    return this.ambientC + this.net.caseRiseK(this.state);
  }
  sinkC(): number {
    return this.ambientC + this.net.sinkRiseK(this.state);
  }

  /**
   * Loss (W) held over the interval of `c` starting at tStartS, from the electrothermal fixed point;
   * records the first runaway.
   */
  solve(parts: LossParts, c: StepCoefficients, tStartS: number): number {
    const free = this.ambientC + this.net.meanJunctionRiseK(this.state, 0, c);
    const other = parts.conductionFixedW + parts.switchingW + parts.capacitiveW;
    const s = solveElectrothermal(parts.resistiveAt25W, other, this.tempCoeffPerK, free, c.meanRisePerW, this.tjMaxC, this.sol);
    if (s.runaway && this.runawayAtS === null) this.runawayAtS = tStartS;
    return s.powerW;
  }

  /**
   * Advances to tEndS over the interval of `c` at powerW; updates energy, peak and time above warning.
   * Returns the junction temperature at tEndS in °C.
   */
  advance(powerW: number, c: StepCoefficients, tEndS: number): number {
    this.net.advance(this.state, powerW, c);
    this.energyJ += powerW * c.dtS;
    const tj = this.junctionC();
    this.record(tj, tEndS);
    return tj;
  }

  /**
   * Runs this switch over all frames of a rail (the hot loop of the rail schemes): per frame k the
   * loss model gives a = rS·s + r3·E3 and b = (oM·m + oC·[m > 0])·h(m) + oS·s (m = E[v], s = E[v²] clamped to
   * the feasible set, E3 = railThirdMomentBoundV3(m, s, V_s)); the electrothermal fixed point over
   * the frame and the exact update are fused into one pass over the modes. Same results as
   * {@link solve} + {@link advance} per frame (the tests check it); written out in one loop so no
   * per-frame call boxes a number. Writes each frame's loss (W) to `lossOut` and, when given, the
   * traces. The state must start at time 0.
   */
  runFrames(
    model: FrameLossModel,
    meanV: Float64Array,
    meanSquareV2: Float64Array,
    frameS: number,
    lossOut: Float64Array,
    traces?: DeviceTraces,
  ): void {
    const c = this.net.coefficients(frameS);
    const x = this.state;
    const nm = x.length;
    const mfs = c.meanFromState;
    const decay = c.decay;
    const gain = c.gain;
    const bj = this.net.junctionWeights;
    const h = c.meanRisePerW;
    const alpha = this.tempCoeffPerK;
    const tjMax = this.tjMaxC;
    const amb = this.ambientC;
    const vs = model.supplyV;
    const { rS, r3, oM, oS, oC, taperV } = model;
    const oN = model.oN ?? 0;
    const w = this.warnC;
    let free = 0;
    for (let k = 0; k < nm; k++) free += mfs[k] * x[k];
    let prevJ = this.lastJunctionC;
    let peak = this.peakC;
    let peakAt = this.peakAtS;
    let above = this.aboveWarnS;
    let energy = this.energyJ;
    let runawayAt = this.runawayAtS === null ? -1 : this.runawayAtS; // −1: none (keeps the local a double)
    const n = meanV.length;
    for (let i = 0; i < n; i++) {
      const m = Math.min(Math.max(meanV[i], 0), vs);
      const s = Math.min(Math.max(meanSquareV2[i], m * m), vs * m);
      let a = rS * s;
      if (r3 !== 0) a += r3 * railThirdMomentBoundV3(m, s, vs);
      const hm = taperV === undefined ? 1 : modulatorSwitchingShare(m, vs, taperV);
      const b = (oM * m + (m > 0 ? oC : 0)) * hm + oS * s + oN * m;
      // Electrothermal fixed point over the frame (as solveElectrothermal).
      const tFree = amb + free;
      const loop = a * alpha * h;
      let p: number;
      if (loop < 1) {
        p = (a * (1 + alpha * (tFree - 25)) + b) / (1 - loop);
        if (runawayAt < 0 && tFree + h * p > tjMax) runawayAt = i * frameS;
      } else {
        p = a * (1 + alpha * (tjMax - 25)) + b;
        if (runawayAt < 0) runawayAt = i * frameS;
      }
      let j = 0;
      let nf = 0;
      for (let k = 0; k < nm; k++) {
        const xk = x[k] * decay[k] + gain[k] * p;
        x[k] = xk;
        j += bj[k] * xk;
        nf += mfs[k] * xk;
      }
      free = nf;
      const tj = amb + j;
      const tEnd = (i + 1) * frameS;
      energy += p * frameS;
      lossOut[i] = p;
      if (tj > peak) {
        peak = tj;
        peakAt = tEnd;
      }
      if (prevJ >= w && tj >= w) above += frameS;
      else if (prevJ < w && tj >= w) above += (frameS * (tj - w)) / (tj - prevJ);
      else if (prevJ >= w && tj < w) above += (frameS * (prevJ - w)) / (prevJ - tj);
      prevJ = tj;
      if (traces) {
        traces.lossW[i] = p;
        traces.junctionC[i] = tj;
        traces.caseC[i] = this.caseC();
        traces.sinkC[i] = this.sinkC();
      }
    }
    this.lastJunctionC = prevJ;
    this.lastTimeS = n * frameS;
    this.peakC = peak;
    this.peakAtS = peakAt;
    this.aboveWarnS = above;
    this.energyJ = energy;
    this.runawayAtS = runawayAt < 0 ? null : runawayAt;
  }

  /** Peak and time-above-warning bookkeeping for a new junction temperature at tEndS. */
  private record(tj: number, tEndS: number): void {
    if (tj > this.peakC) {
      this.peakC = tj;
      this.peakAtS = tEndS;
    }
    const t0 = this.lastJunctionC;
    const w = this.warnC;
    const dt = tEndS - this.lastTimeS;
    if (t0 >= w && tj >= w) this.aboveWarnS += dt;
    else if (t0 < w && tj >= w) this.aboveWarnS += (dt * (tj - w)) / (tj - t0);
    else if (t0 >= w && tj < w) this.aboveWarnS += (dt * (t0 - w)) / (t0 - tj);
    this.lastJunctionC = tj;
    this.lastTimeS = tEndS;
  }

  /** The summary (without traces) over a simulation of durationS seconds. */
  summary(durationS: number): DeviceSimulation {
    return {
      role: this.role,
      count: this.count,
      peakJunctionC: this.peakC,
      peakAtS: this.peakAtS,
      meanLossW: durationS > 0 ? this.energyJ / durationS : 0,
      timeAboveWarnS: this.aboveWarnS,
      warnC: this.warnC,
      runaway: this.runawayAtS === null ? null : { atS: this.runawayAtS },
    };
  }

  /** Warnings about this switch, in words. */
  warnings(): string[] {
    const out: string[] = [];
    const who = `${this.role} switch`;
    if (this.runawayAtS !== null) {
      out.push(
        `${who}: thermal runaway at ${this.runawayAtS.toFixed(3)} s — its loss no longer settles below Tj max ${this.tjMaxC} °C; ` +
          'temperatures after that point are not physical. Lower the drive or improve the cooling.',
      );
    } else if (this.peakC > this.tjMaxC) {
      out.push(`${who}: junction reaches ${this.peakC.toFixed(1)} °C at ${this.peakAtS.toFixed(3)} s, above its ${this.tjMaxC} °C maximum.`);
    }
    if (this.aboveWarnS > 0) {
      out.push(`${who}: ${this.aboveWarnS.toFixed(3)} s above the ${this.warnC.toFixed(1)} °C warning temperature (peak ${this.peakC.toFixed(1)} °C).`);
    }
    return out;
  }
}
