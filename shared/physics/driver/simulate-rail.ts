/**
 * Junction temperatures of every switch for a rail-modulated drive (rail-linear or rail-switched
 * scheme), frame by frame.
 */
import type { DeviceRole, DriverProfile } from '../../schemas/driver.ts';
import { checkCoil, deviceWarnings, setUpRuns } from './common.ts';
import { railConductanceAPerV } from './currents.ts';
import type { FrameLossModel } from './device-run.ts';
import { bridgeLossParts, buckSupplyCurrentA, modulatorLossParts, modulatorSwitchingShare, modulatorTaperV, railMoments, type LossParts } from './losses.ts';
import type { CoilAtResonance, DriverSimulation, RailFrames, SimulationOptions } from './types.ts';

/**
 * The per-switch loss of a role over a rail frame in the form of {@link FrameLossModel}
 * (a = rS·s + r3·E3, b = (oM·m + oC·[m > 0])·h(m) + oS·s + oN·m with m = E[v], s = E[v²]):
 * - bridge: {@link bridgeLossParts} of {@link railMoments}, which is affine in m and s while the
 *   switch runs — split by evaluating it at (m, s) = (0, 1), (1, 0) and (2, 0) (the constant part is
 *   a BJT's fixed base drive);
 * - pass: {@link passLossParts} = g·(V_s·m − s): oM = g·V_s, oS = −g;
 * - modulator: {@link modulatorLossParts}: r3 = R·g²/V_s; its switching parts (tapered by h, no
 *   switching at 100 % duty, taperV = modulatorTaperV) give oM and oC, its conduction and base
 *   drive (not tapered) give oS and oN, each by evaluating the parts at feasible points where h = 1
 *   (for a MOSFET: oS = 0, oN = 0, oM = ½·V_s·g·(t_r+t_f)·f_pwm, oC = ½·C_oss·V_s²·f_pwm).
 * The tests check each against the LossParts functions.
 *
 * @example frameLossModel(DEMO_DRIVER_LINEAR, 'pass', 300e3) // → { oM: 3, oS: −0.0625, … }
 */
export function frameLossModel(driver: DriverProfile, role: DeviceRole, resonanceHz: number): FrameLossModel {
  const dev = driver.devices.find((d) => d.role === role);
  if (!dev) throw new RangeError(`frameLossModel: the profile has no ${role} device`);
  const vs = driver.supplyVoltageV;
  const g = railConductanceAPerV(driver);
  const model: FrameLossModel = { supplyV: vs, rS: 0, r3: 0, oM: 0, oS: 0, oC: 0 };
  const other = (p: LossParts) => p.conductionFixedW + p.switchingW + p.capacitiveW;
  if (role === 'bridge') {
    const perS = bridgeLossParts(dev, driver.topology, resonanceHz, railMoments(g, 0, 1));
    // At E[v] = 1 and 2 V (E[v²] = 0): the part linear in E[v] and the part constant while running (a BJT's fixed base drive).
    const perM1 = other(bridgeLossParts(dev, driver.topology, resonanceHz, railMoments(g, 1, 0)));
    const perM2 = other(bridgeLossParts(dev, driver.topology, resonanceHz, railMoments(g, 2, 0)));
    model.rS = perS.resistiveAt25W;
    model.oS = other(perS);
    model.oM = perM2 - perM1;
    model.oC = 2 * perM1 - perM2;
  } else if (role === 'pass') {
    model.oM = g * vs;
    model.oS = -g;
  } else {
    // modulatorLossParts is affine in E[v] and E[v²] (apart from its E[v³] part, r3, and the taper h
    // of its switching parts, divided out here) while E[v] > 0: evaluated where the clamp to the
    // feasible set does not act (E[v²] = E[v]·V_s is feasible).
    const f = driver.pwmFrequencyHz ?? 0;
    const taperV = modulatorTaperV(dev, vs, f);
    const at = (mV: number, sV2: number) => {
      const p = modulatorLossParts(dev, vs, f, g, mV, sV2);
      return { fixed: p.conductionFixedW, switching: (p.switchingW + p.capacitiveW) / modulatorSwitchingShare(mV, vs, taperV) };
    };
    const a = vs / 4;
    const b = vs / 2;
    const pA = at(a, a * vs);
    const pB = at(b, b * vs);
    const pC = at(b, b * b);
    model.r3 = ((dev.rdsOnOhm ?? 0) * g * g) / vs;
    // Conduction and base drive: oS·s + oN·m (pB − pC differ in s only, pA − pB in m and s).
    model.oS = (pB.fixed - pC.fixed) / (b * vs - b * b);
    model.oN = (pB.fixed - pA.fixed) / (b - a) - model.oS * vs;
    // Switching parts: oM·m + oC, no dependence on s.
    model.oM = (pB.switching - pA.switching) / (b - a);
    model.oC = pA.switching - model.oM * a;
    model.taperV = taperV;
  }
  return model;
}

/** Checks the rail frames; returns nothing, throws RangeError naming the frame and value. */
function checkRail(rail: RailFrames, supplyV: number): void {
  const fn = 'simulateRail';
  if (!(rail.frameS > 0) || !Number.isFinite(rail.frameS)) throw new RangeError(`${fn}: rail.frameS must be finite and > 0, got ${rail.frameS}`);
  if (rail.meanV.length !== rail.meanSquareV2.length) {
    throw new RangeError(`${fn}: rail.meanV and rail.meanSquareV2 differ in length (${rail.meanV.length} vs ${rail.meanSquareV2.length})`);
  }
  const tolV = 1e-6 * supplyV;
  for (let i = 0; i < rail.meanV.length; i++) {
    const m = rail.meanV[i];
    const s = rail.meanSquareV2[i];
    if (!(m >= -tolV && m <= supplyV + tolV)) throw new RangeError(`${fn}: rail.meanV[${i}] must lie in 0…${supplyV} V, got ${m}`);
    if (!(s >= -tolV * tolV && s <= (supplyV + tolV) ** 2)) {
      throw new RangeError(`${fn}: rail.meanSquareV2[${i}] must lie in 0…${supplyV ** 2} V², got ${s}`);
    }
  }
}

/**
 * Simulates a rail-modulated driver (schemes rail-linear and rail-switched) frame by frame.
 *
 * Per frame k (length Δt = rail.frameS, rail mean E[v] and mean square E[v²], clamped to the
 * feasible set E[v] ∈ [0, V_s], E[v²] ∈ [E[v]², V_s·E[v]]):
 * - rail current I = g·v with g = fullRailCurrentA/supplyVoltageV (resistive equivalent);
 * - bridge switch loss from {@link bridgeLossParts} at f0 = coil.resonanceHz, pass-device loss
 *   g(V_s·E[v] − E[v²]) (passLossParts) or buck modulator loss (modulatorLossParts), via {@link frameLossModel};
 * - each switch's loss and junction temperature solved as an electrothermal fixed point over the
 *   frame (./electrothermal.ts), then the thermal network advanced exactly over Δt (zero-order
 *   hold, ../thermal/network.ts);
 * - supply current: rail-linear g·E[v] (the pass device is in series); rail-switched
 *   (g·E[v²] + P_modulator)/V_s (buck input by power balance). The supply's peak is the highest
 *   FRAME-MEAN current: peaks within a frame are the planner's business.
 * Junction temperatures are evaluated at frame ends. Energy ledger: input V_s·I·Δt; dissipated
 * Σ count·loss·Δt; delivered g·E[v²]·Δt − bridge losses.
 *
 * Throws RangeError for the pulse scheme, bad coil figures, or rail values outside 0…V_s.
 *
 * @example simulateRail(profile, { resonanceHz: 300e3, qualityFactor: 30 },
 *   { frameS: 1e-3, meanV, meanSquareV2 }).devices[0].peakJunctionC
 */
export function simulateRail(
  driver: DriverProfile,
  coil: CoilAtResonance,
  rail: RailFrames,
  opts: SimulationOptions = {},
): DriverSimulation {
  const fn = 'simulateRail';
  if (driver.scheme === 'pulse') throw new RangeError(`${fn}: the profile uses the pulse scheme; use simulatePulses`);
  checkCoil(fn, coil);
  const vs = driver.supplyVoltageV;
  checkRail(rail, vs);
  const { runs, warnings } = setUpRuns(fn, driver, opts);
  const [bridge, aux] = runs;
  const linear = driver.scheme === 'rail-linear';
  const pwmHz = driver.pwmFrequencyHz ?? 0;
  if (!linear && !(pwmHz > 0)) throw new RangeError(`${fn}: rail-switched needs pwmFrequencyHz > 0, got ${pwmHz}`);
  const g = railConductanceAPerV(driver);
  const f0 = coil.resonanceHz;
  const dt = rail.frameS;
  const n = rail.meanV.length;
  const durationS = n * dt;
  const traces = opts.traces === true;
  const mk = () => ({ lossW: new Float32Array(n), junctionC: new Float32Array(n), caseC: new Float32Array(n), sinkC: new Float32Array(n) });
  const tr = traces ? runs.map(mk) : null;
  const lossB = new Float64Array(n);
  const lossA = new Float64Array(n);
  bridge.runFrames(frameLossModel(driver, 'bridge', f0), rail.meanV, rail.meanSquareV2, dt, lossB, tr?.[0]);
  aux.runFrames(frameLossModel(driver, linear ? 'pass' : 'modulator', f0), rail.meanV, rail.meanSquareV2, dt, lossA, tr?.[1]);
  const currentTrace = traces ? new Float32Array(n) : null;
  let inputJ = 0;
  let dissipatedJ = 0;
  let deliveredJ = 0;
  let peakCurrentA = 0;
  let peakCurrentAtS = 0;
  let chargeC = 0;
  let negativeDeliveredAtS = -1;
  const countB = bridge.count;
  for (let k = 0; k < n; k++) {
    const m = Math.min(Math.max(rail.meanV[k], 0), vs);
    const s = Math.min(Math.max(rail.meanSquareV2[k], m * m), vs * m);
    const supplyA = linear ? g * m : buckSupplyCurrentA(vs, g, s, lossA[k]);
    if (supplyA > peakCurrentA) {
      peakCurrentA = supplyA;
      peakCurrentAtS = k * dt;
    }
    chargeC += supplyA * dt;
    const inW = vs * supplyA;
    const deliveredW = g * s - countB * lossB[k];
    if (deliveredW < -1e-9 * Math.max(1, inW) && negativeDeliveredAtS < 0) negativeDeliveredAtS = k * dt;
    inputJ += inW * dt;
    dissipatedJ += (countB * lossB[k] + lossA[k]) * dt;
    deliveredJ += deliveredW * dt;
    if (currentTrace) currentTrace[k] = supplyA;
  }
  warnings.push(...deviceWarnings(driver, f0));
  for (const r of runs) warnings.push(...r.warnings());
  if (peakCurrentA > driver.supplyCurrentLimitA) {
    warnings.push(
      `supply: frame-mean current reaches ${peakCurrentA.toFixed(2)} A at ${peakCurrentAtS.toFixed(3)} s, ` +
        `above the ${driver.supplyCurrentLimitA} A supply limit.`,
    );
  }
  if (negativeDeliveredAtS >= 0) {
    warnings.push(
      `bridge: the modelled bridge losses exceed the rail power (first at ${negativeDeliveredAtS.toFixed(3)} s): ` +
        "check the device figures (rise/fall times, C_oss) against the coil's resonance.",
    );
  }
  return {
    devices: runs.map((r, d) => (tr ? { ...r.summary(durationS), traces: tr[d] } : r.summary(durationS))),
    supply: {
      peakCurrentA,
      meanCurrentA: durationS > 0 ? chargeC / durationS : 0,
      ...(currentTrace ? { currentA: currentTrace } : {}),
    },
    finalState: runs.map((r) => r.net.nodeRisesK(r.state)),
    warnings,
    energy: { inputJ, deliveredJ, dissipatedJ },
  };
}
