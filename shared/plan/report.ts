/**
 * The answer for one clip on one coil and driver: the advised gain and the limit that binds, the
 * figures at the evaluated gain, the duty-cycle budget against the clip's demand, an advised
 * peak-limiter ceiling and, where the clip's energy lies above the coil's modulation corner,
 * pre-emphasis advice. JSON-safe apart from the typed arrays of `traces` (kept out of the JSON).
 */
import type { WelchSpectrum } from '../dsp/welch.ts';
import type { CoilAtResonance, DeviceTraces, DriverSimulation, ThermalState } from '../physics/driver/types.ts';
import { ThermalNetwork } from '../physics/thermal/network.ts';
import type { DeviceRole, DriverProfile } from '../schemas/driver.ts';
import { powerToDb } from '../units.ts';
import { type Advice, adviseGain } from './advise.ts';
import { dutyBudget, firstCrossing, logSpacedLengthsS, maxWindowMean } from './demand.ts';
import { type Evaluation, type LimitCheck, type PlanClip, type PlanSettings, evaluateAtGain, railAtGain, createScratch } from './evaluate.ts';
import { dbToAmp } from '../units.ts';
import { pulsesAtGain } from './pulse-train.ts';
import { simulateSteady } from './steady.ts';

export const GAIN_CONVENTION =
  'gain 0 dB: a full-scale sample (±1.0) swings a rail scheme’s rail over its whole range (0 to the supply, around a bias at half the supply) and takes a pulse scheme’s on-time to its maximum';

export interface DeviceFigures {
  role: DeviceRole;
  count: number;
  peakJunctionC: number;
  peakAtS: number;
  meanLossW: number;
  tjMaxC: number;
  /** Tj max − margin, °C. */
  limitC: number;
  timeAboveWarnS: number;
  runawayAtS: number | null;
}

export interface BudgetCurve {
  role: DeviceRole;
  /** The device's loss in full operation (full rail; for a pass device its worst, at half rail), W. */
  fullLossW: number;
  /** Tj max − margin − ambient, K. */
  allowedRiseK: number;
  lengthsS: number[];
  /** Allowed fraction of full operation for a burst of each length (single-pulse Zth method). */
  budget: number[];
  /**
   * The clip's highest mean normalised power (or duty) over any window of each length, at the evaluated
   * gain; for a pass device its loss as a fraction of fullLossW.
   */
  demand: number[];
  /** Where the worst window of each length starts, s. */
  demandAtS: number[];
  crossing: { lengthS: number; demand: number; budget: number } | null;
}

export interface PreEmphasisAdvice {
  /** Share of the clip's power above the modulation corner. */
  energyAboveCornerFraction: number;
  /** Power-weighted loss the coil's first-order envelope response inflicts on the clip, dB. */
  envelopeLossDb: number;
  /** Advise a boost: true when the loss exceeds 1 dB. */
  advised: boolean;
  /** A first-order high shelf starting at the corner, with this gain (≤ 12 dB), dB. */
  cornerHz: number;
  shelfGainDb: number;
}

export interface PlanReport {
  clip: string;
  durationS: number;
  scheme: DriverProfile['scheme'];
  gainConvention: string;
  settings: PlanSettings;
  advisedGainDb: number | null;
  binding: { limit: LimitCheck['limit']; role: DeviceRole | null; atS: number | null; value: number; allowed: number; unit: LimitCheck['unit'] } | null;
  unsafeOnSilence: boolean;
  evaluatedGainDb: number;
  devices: DeviceFigures[];
  supply: { peakCurrentA: number; meanCurrentA: number; limitA: number };
  overModulationFraction: number;
  overModulationTimeS: number;
  pulses: Evaluation['pulses'];
  /** Pulse scheme: RF cycles per pulse at the resonant frequency and pulses shorter than the ring-up time. */
  pulseRf: DriverSimulation['pulse'] | null;
  /** Every limit at the evaluated gain, with its headroom. */
  limits: LimitCheck[];
  budget: BudgetCurve[];
  /** Peak-limiter ceiling on the modulation source before the gain, dBFS: the level whose gained sample reaches full swing. */
  limiterCeilingDbfs: number;
  preEmphasis: PreEmphasisAdvice | null;
  modulationCornerHz: number;
  warnings: string[];
  searchEvaluations: number;
}

/** Device losses in full operation, W, per device in profile order (module comment of BudgetCurve). */
export function fullOperationLossW(driver: DriverProfile, coil: CoilAtResonance, ambientC: number): number[] {
  const tS = 1;
  const frameS = 0.01;
  const run = (railV: number) => simulateSteady(driver, coil, { durationS: tS, frameS, railV, pulseOn: true, ambientC });
  const sims = driver.scheme === 'rail-linear' ? [run(driver.supplyVoltageV), run(driver.supplyVoltageV / 2)] : [run(driver.supplyVoltageV)];
  return driver.devices.map((d) =>
    Math.max(
      ...sims.map((s) => {
        const t = s.devices.find((x) => x.role === d.role)?.traces as DeviceTraces | undefined;
        return t ? Math.max(...t.lossW) : 0;
      }),
    ),
  );
}

/**
 * Pre-emphasis advice from the clip's spectrum and the coil's modulation corner fc: the coil's
 * envelope follows like a first-order low-pass |H(f)|² = 1/(1 + (f/fc)²) (a resonator driven at
 * resonance, corner f0/(2Q)); the power-weighted loss is 10·log10(ΣP / ΣP·|H|²). A first-order
 * high shelf from fc with that gain (at most 12 dB) restores the balance.
 */
export function preEmphasisAdvice(spec: WelchSpectrum, cornerHz: number): PreEmphasisAdvice | null {
  if (!(cornerHz > 0)) return null;
  let total = 0;
  let above = 0;
  let passed = 0;
  for (let k = 1; k < spec.psd.length; k++) {
    const p = spec.psd[k];
    const f = spec.frequencyHz[k];
    total += p;
    if (f > cornerHz) above += p;
    passed += p / (1 + (f / cornerHz) ** 2);
  }
  if (!(total > 0)) return null;
  const lossDb = powerToDb(total / passed);
  return {
    energyAboveCornerFraction: above / total,
    envelopeLossDb: lossDb,
    advised: lossDb > 1,
    cornerHz,
    shelfGainDb: Math.min(12, Math.round(lossDb * 10) / 10),
  };
}

/**
 * Normalised demand per frame at a gain: E[v²]/V² (rail schemes) or on-time fraction (pulse). For a
 * linear pass device, whose full-operation loss is its worst, g·V²/4 at half rail, the demand is its
 * own loss over that: g(V·E[v] − E[v²])/(g·V²/4) = 4(E[v]/V − E[v²]/V²).
 */
function demandSeries(clip: PlanClip, driver: DriverProfile, gainDb: number, role: DeviceRole = 'bridge'): Float64Array {
  const g = dbToAmp(gainDb);
  const n = clip.frames.count;
  const out = new Float64Array(n);
  if (driver.scheme === 'pulse' && clip.pulseEvents && driver.pulse) {
    const train = pulsesAtGain(clip.pulseEvents, g, driver.pulse);
    const f = clip.frames.frameS;
    for (let i = 0; i < train.count; i++) {
      // Spread each pulse over the frames it covers, by frame index (stepping by time can stall
      // where k·f rounds below t).
      const start = train.startS[i];
      const end = start + train.onS[i];
      const k1 = Math.min(n - 1, Math.floor(end / f));
      for (let k = Math.max(0, Math.floor(start / f)); k <= k1; k++) {
        const overlap = Math.min(end, (k + 1) * f) - Math.max(start, k * f);
        if (overlap > 0) out[k] += overlap / f;
      }
    }
    return out;
  }
  const v2 = driver.supplyVoltageV ** 2;
  const rail = railAtGain(clip.frames, g, driver.supplyVoltageV, createScratch(clip));
  const vs = driver.supplyVoltageV;
  if (role === 'pass') for (let k = 0; k < n; k++) out[k] = Math.max(0, 4 * (rail.meanV[k] / vs - rail.meanSquareV2[k] / v2));
  else for (let k = 0; k < n; k++) out[k] = rail.meanSquareV2[k] / v2;
  return out;
}

/**
 * Plans one clip: the advised gain by search, then the full figures at `gainDb` if given, else at
 * the advised gain. `spectrum` and `modulationCornerHz` feed the pre-emphasis advice.
 */
export function planClipReport(
  clip: PlanClip,
  coil: CoilAtResonance & { modulationCornerHz: number },
  driver: DriverProfile,
  settings: PlanSettings,
  opts: { gainDb?: number; spectrum?: WelchSpectrum; initial?: ThermalState[]; traces?: boolean; advice?: Advice } = {},
): { report: PlanReport; advice: Advice; evaluation: Evaluation } {
  // `advice`: a gain search already made for this very clip, coil, driver, settings and initial
  // state (a re-evaluation at another gain reuses it: it does not depend on the gain asked for).
  const advice = opts.advice ?? adviseGain(clip, coil, driver, settings, { initial: opts.initial });
  const evaluatedGainDb = opts.gainDb ?? advice.advisedGainDb ?? advice.atAdvised.gainDb;
  const evaluation =
    opts.gainDb === undefined && !opts.traces && advice.advisedGainDb !== null
      ? advice.atAdvised
      : evaluateAtGain(clip, coil, driver, evaluatedGainDb, settings, { initial: opts.initial, traces: opts.traces });
  const sim = evaluation.sim;
  const devices: DeviceFigures[] = sim.devices.map((d) => {
    const p = driver.devices.find((x) => x.role === d.role)!;
    return {
      role: d.role,
      count: d.count,
      peakJunctionC: d.peakJunctionC,
      peakAtS: d.peakAtS,
      meanLossW: d.meanLossW,
      tjMaxC: p.tjMaxC,
      limitC: p.tjMaxC - settings.marginK,
      timeAboveWarnS: d.timeAboveWarnS,
      runawayAtS: d.runaway?.atS ?? null,
    };
  });

  const lengths = logSpacedLengthsS(0.001, Math.max(0.001, clip.durationS), 4);
  const demandGainDb = Number.isFinite(evaluatedGainDb) ? evaluatedGainDb : -Infinity;
  const fullLoss = fullOperationLossW(driver, coil, settings.ambientC);
  const used = driver.devices.map((d, i) => ({ d, i })).filter(({ d }) => sim.devices.some((s) => s.role === d.role));
  const budget: BudgetCurve[] = used.map(({ d, i }) => {
    const net = ThermalNetwork.fromPath(d.thermal);
    const allowedRiseK = d.tjMaxC - settings.marginK - settings.ambientC;
    const b = dutyBudget(lengths, allowedRiseK, fullLoss[i], (t) => net.zthKPerW(t));
    const demand = maxWindowMean(demandSeries(clip, driver, demandGainDb, d.role), clip.frames.frameS, lengths);
    return {
      role: d.role,
      fullLossW: fullLoss[i],
      allowedRiseK,
      lengthsS: Array.from(lengths),
      budget: Array.from(b),
      demand: Array.from(demand.meanMax),
      demandAtS: Array.from(demand.atS),
      crossing: firstCrossing(lengths, demand.meanMax, b),
    };
  });

  const b = advice.binding;
  const report: PlanReport = {
    clip: clip.name,
    durationS: clip.durationS,
    scheme: driver.scheme,
    gainConvention: GAIN_CONVENTION,
    settings,
    advisedGainDb: advice.advisedGainDb,
    binding: b ? { limit: b.limit, role: b.role, atS: b.atS, value: b.value, allowed: b.allowed, unit: b.unit } : null,
    unsafeOnSilence: advice.unsafeOnSilence,
    evaluatedGainDb,
    devices,
    supply: { peakCurrentA: sim.supply.peakCurrentA, meanCurrentA: sim.supply.meanCurrentA, limitA: driver.supplyCurrentLimitA },
    overModulationFraction: evaluation.overModulationFraction,
    overModulationTimeS: evaluation.overModulationTimeS,
    pulses: evaluation.pulses,
    pulseRf: sim.pulse ?? null,
    limits: evaluation.limits,
    budget,
    limiterCeilingDbfs: Number.isFinite(evaluatedGainDb) ? -evaluatedGainDb : 0,
    preEmphasis: opts.spectrum ? preEmphasisAdvice(opts.spectrum, coil.modulationCornerHz) : null,
    modulationCornerHz: coil.modulationCornerHz,
    warnings: [...sim.warnings],
    searchEvaluations: advice.evaluations,
  };
  if (advice.unsafeOnSilence) {
    report.warnings.unshift('No gain is safe: a device exceeds its limit even on silence. Improve the cooling, lower the supply, or change the scheme before playing anything.');
  } else if (advice.advisedGainDb === null) {
    report.warnings.unshift(`No gain down to ${-60} dB keeps every limit; the clip cannot be played safely on this driver as it stands.`);
  }
  return { report, advice, evaluation };
}
