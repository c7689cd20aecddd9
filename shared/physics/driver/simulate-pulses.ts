/**
 * Junction temperatures of the bridge switches for a pulsed (interrupted) drive, pulse by pulse.
 */
import type { DriverProfile } from '../../schemas/driver.ts';
import type { StepCoefficients } from '../thermal/network.ts';
import { checkCoil, deviceWarnings, setUpRuns } from './common.ts';
import { ringUpTimeS } from './currents.ts';
import { bridgeLossParts, emptyLossParts } from './losses.ts';
import type { CoilAtResonance, DeviceTraces, DriverSimulation, PulseTrain, SimulationOptions } from './types.ts';

function checkPulses(p: PulseTrain, durationS: number): void {
  const fn = 'simulatePulses';
  if (!(durationS > 0) || !Number.isFinite(durationS)) throw new RangeError(`${fn}: durationS must be finite and > 0, got ${durationS}`);
  if (p.startS.length !== p.onS.length) {
    throw new RangeError(`${fn}: pulses.startS and pulses.onS differ in length (${p.startS.length} vs ${p.onS.length})`);
  }
  const tol = 1e-12 * Math.max(1, durationS);
  let prevEnd = 0;
  for (let i = 0; i < p.startS.length; i++) {
    const s = p.startS[i];
    const on = p.onS[i];
    if (!Number.isFinite(s) || !(on > 0) || !Number.isFinite(on)) {
      throw new RangeError(`${fn}: pulse ${i} needs a finite start and an on-time > 0, got start ${s} s, on ${on} s`);
    }
    if (s < prevEnd - tol) throw new RangeError(`${fn}: pulse ${i} starts at ${s} s, before the previous pulse ends (${prevEnd} s)`);
    if (s + on > durationS + tol) throw new RangeError(`${fn}: pulse ${i} ends at ${s + on} s, after durationS ${durationS} s`);
    prevEnd = s + on;
  }
}

/**
 * Simulates the pulse scheme: during each pulse the bridge runs from the full supply V_s at the
 * supply current I = fullRailCurrentA (the steady, rung-up current: conservative for pulses shorter
 * than the ring-up time); between pulses the switches have no loss. The thermal network is advanced
 * EXACTLY over each on- and each off-interval (zero-order hold), so per-pulse peaks are kept; each
 * pulse's loss is the electrothermal fixed point over that pulse (./electrothermal.ts).
 *
 * RF cycles per pulse = onS·f0; pulses shorter than the ring-up time Q/(π·f0) are counted and
 * warned about. Profile limits (maxOnTimeS, minOffTimeS, overall maxDuty) are checked and warned
 * about. Traces (opts.traces) are on a frame grid of opts.frameS (default 1 ms): per frame the mean
 * loss, the MAXIMUM junction temperature (over pulse ends and frame ends in the frame), case and
 * sink temperatures at the frame end, and the frame-mean supply current. Frame k covers
 * (k·frameS, (k+1)·frameS]. The supply's peak is the current during a pulse.
 *
 * Throws RangeError for a rail scheme, bad coil figures, or pulses that overlap, have on ≤ 0 or
 * end after durationS.
 *
 * @example simulatePulses(profile, { resonanceHz: 150e3, qualityFactor: 15 },
 *   { startS: Float64Array.of(0, 0.01), onS: Float64Array.of(1e-4, 1e-4) }, 0.02)
 */
export function simulatePulses(
  driver: DriverProfile,
  coil: CoilAtResonance,
  pulses: PulseTrain,
  durationS: number,
  opts: SimulationOptions = {},
): DriverSimulation {
  const fn = 'simulatePulses';
  if (driver.scheme !== 'pulse') throw new RangeError(`${fn}: the profile uses the ${driver.scheme} scheme; use simulateRail`);
  checkCoil(fn, coil);
  checkPulses(pulses, durationS);
  const frameS = opts.frameS ?? 1e-3;
  if (!(frameS > 0) || !Number.isFinite(frameS)) throw new RangeError(`${fn}: opts.frameS must be finite and > 0, got ${frameS}`);
  const { runs, warnings } = setUpRuns(fn, driver, opts);
  const run = runs[0];
  const vs = driver.supplyVoltageV;
  const ia = driver.fullRailCurrentA;
  const f0 = coil.resonanceHz;
  const parts = bridgeLossParts(
    run.device,
    driver.topology,
    f0,
    { meanCurrentA: ia, meanSquareCurrentA2: ia * ia, meanPowerW: vs * ia, meanSquareV2: vs * vs },
    emptyLossParts(),
  );
  const net = run.net;
  const np = pulses.startS.length;

  const traces = opts.traces === true;
  const nFrames = traces ? Math.max(1, Math.ceil(durationS / frameS - 1e-9)) : 0;
  const lossE = new Float64Array(nFrames);
  const jMax = new Float64Array(nFrames).fill(-Infinity);
  const caseEnd = new Float64Array(nFrames);
  const sinkEnd = new Float64Array(nFrames);
  const charge = new Float64Array(nFrames);
  if (traces) jMax[0] = run.junctionC();
  const frameCoeff: StepCoefficients | null = traces ? net.coefficients(frameS) : null;
  const scratch = net.coefficients(0);
  const onCoeff = net.coefficients(0);
  let onCoeffDt = -1;
  // Between pulses the power is zero: only the decay is needed (a buffer of its own, since
  // decayCoefficients leaves the mean terms that `solve` reads unset).
  const idleCoeff = net.coefficients(0);
  const frameIdle = traces ? net.decayCoefficients(frameS, net.coefficients(0)) : null;

  /** Advance from t0 to t1 at power p (split on the frame grid when tracing). */
  const advance = (t0: number, t1: number, p: number, whole: StepCoefficients | null): void => {
    if (t1 <= t0) return;
    if (!traces) {
      run.advance(p, whole ?? (p === 0 ? net.decayCoefficients(t1 - t0, idleCoeff) : net.coefficients(t1 - t0, scratch)), t1);
      return;
    }
    let t = t0;
    let k = Math.min(nFrames - 1, Math.floor(t / frameS));
    while (t < t1) {
      let frameEnd = (k + 1) * frameS;
      if (frameEnd <= t * (1 + 1e-15) && k < nFrames - 1) {
        k++;
        frameEnd = (k + 1) * frameS;
      }
      const end = k === nFrames - 1 ? t1 : Math.min(t1, frameEnd);
      const dt = end - t;
      const full = Math.abs(dt - frameS) <= 1e-12 * frameS;
      const c = p === 0 ? (full ? frameIdle! : net.decayCoefficients(dt, idleCoeff)) : full ? frameCoeff! : net.coefficients(dt, scratch);
      const tj = run.advance(p, c, end);
      if (p > 0) {
        lossE[k] += p * dt;
        charge[k] += ia * dt;
      }
      if (tj > jMax[k]) jMax[k] = tj;
      // Case and sink at the frame's end: the last piece ending in frame k ends there (the run is
      // continuous to durationS), so only pieces that reach it (within rounding) are read.
      if (frameEnd - end <= 1e-9 * frameS || k === nFrames - 1) {
        caseEnd[k] = run.caseC();
        sinkEnd[k] = run.sinkC();
      }
      t = end;
    }
  };

  let t = 0;
  let onTotal = 0;
  let onMin = Infinity;
  let tooLong = 0;
  let tooClose = 0;
  let shortRing = 0;
  const ringS = ringUpTimeS(f0, coil.qualityFactor);
  const lim = driver.pulse;
  for (let i = 0; i < np; i++) {
    const start = Math.max(pulses.startS[i], t);
    const on = pulses.onS[i];
    if (i > 0 && lim && start - t < lim.minOffTimeS * (1 - 1e-9)) tooClose++;
    advance(t, start, 0, null);
    if (on !== onCoeffDt) {
      net.coefficients(on, onCoeff);
      onCoeffDt = on;
    }
    const p = run.solve(parts, onCoeff, start);
    advance(start, start + on, p, onCoeff);
    t = start + on;
    onTotal += on;
    if (on < onMin) onMin = on;
    if (lim && on > lim.maxOnTimeS * (1 + 1e-9)) tooLong++;
    if (on < ringS) shortRing++;
  }
  advance(t, durationS, 0, null);

  warnings.push(...deviceWarnings(driver, f0));
  for (const r of runs) warnings.push(...r.warnings());
  const duty = onTotal / durationS;
  if (lim) {
    if (tooLong > 0) warnings.push(`pulses: ${tooLong} pulse(s) longer than the ${lim.maxOnTimeS * 1e6} µs maximum on-time.`);
    if (tooClose > 0) warnings.push(`pulses: ${tooClose} gap(s) shorter than the ${lim.minOffTimeS * 1e6} µs minimum off-time.`);
    if (duty > lim.maxDuty) warnings.push(`pulses: overall duty ${(duty * 100).toFixed(2)} % exceeds the ${(lim.maxDuty * 100).toFixed(2)} % maximum.`);
  }
  if (shortRing > 0) {
    warnings.push(
      `pulses: ${shortRing} of ${np} pulse(s) are shorter than the tank's ring-up time Q/(π·f0) = ${(ringS * 1e6).toFixed(1)} µs; ` +
        'their current stays below the full-supply figure used here (the loss estimate is conservative for them).',
    );
  }
  if (np > 0 && ia > driver.supplyCurrentLimitA) {
    warnings.push(`supply: the pulse current ${ia} A exceeds the ${driver.supplyCurrentLimitA} A supply limit.`);
  }

  const summary = run.summary(durationS);
  let devTraces: DeviceTraces | undefined;
  let currentA: Float32Array | undefined;
  if (traces) {
    const lossW = new Float32Array(nFrames);
    currentA = new Float32Array(nFrames);
    for (let k = 0; k < nFrames; k++) {
      const span = Math.min(frameS, durationS - k * frameS);
      lossW[k] = lossE[k] / span;
      currentA[k] = charge[k] / span;
    }
    devTraces = { lossW, junctionC: new Float32Array(jMax), caseC: new Float32Array(caseEnd), sinkC: new Float32Array(sinkEnd) };
  }
  const count = run.count;
  const inputJ = vs * ia * onTotal;
  const dissipatedJ = count * run.energyJ;
  return {
    devices: [devTraces ? { ...summary, traces: devTraces } : summary],
    supply: { peakCurrentA: np > 0 ? ia : 0, meanCurrentA: (ia * onTotal) / durationS, ...(currentA ? { currentA } : {}) },
    finalState: [net.nodeRisesK(run.state)],
    warnings,
    energy: { inputJ, deliveredJ: inputJ - dissipatedJ, dissipatedJ },
    pulse: {
      count: np,
      rfCyclesMin: np > 0 ? onMin * f0 : 0,
      rfCyclesMean: np > 0 ? (onTotal / np) * f0 : 0,
      shorterThanRingUp: shortRing,
    },
  };
}
