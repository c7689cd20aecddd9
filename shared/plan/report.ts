/**
 * The answer for one clip on one coil and driver: the advised gain and the limit that binds, the
 * figures at the evaluated gain, the duty-cycle budget against the clip's demand, an advised
 * peak-limiter ceiling and, where the clip's energy lies above the coil's modulation corner,
 * pre-emphasis advice that holds across the corner's range. JSON-safe apart from the typed arrays of `traces` (kept out of the JSON).
 */
import type { WelchSpectrum } from '../dsp/welch.ts';
import type { CoilAtResonance, DriverSimulation, ThermalState } from '../physics/driver/types.ts';
import { frameLossAtW } from '../physics/driver/device-run.ts';
import { bridgeLossParts, totalLossW } from '../physics/driver/losses.ts';
import { frameLossModel } from '../physics/driver/simulate-rail.ts';
import { ThermalNetwork } from '../physics/thermal/network.ts';
import { deviceSwitching, tooSlowLabel } from '../physics/driver/transition.ts';
import type { DeviceRole, DriverDevice, DriverProfile } from '../schemas/driver.ts';
import { powerToDb } from '../units.ts';
import { type Advice, type GainSearch, adviseGain } from './advise.ts';
import { dutyBudget, firstCrossing, logSpacedLengthsS, maxWindowMean } from './demand.ts';
import { type EvalScratch, type Evaluation, type LimitCheck, type PlanClip, type PlanSettings, evaluateAtGain, railAtGain, createScratch } from './evaluate.ts';
import { dbToAmp } from '../units.ts';
import { pulseLimitsFor, pulsesAtGain } from './pulse-train.ts';
import { type DutyCycleFigures, dutyCycleFigures } from './duty-cycle.ts';
import { limitLabel } from './limit-labels.ts';
import { type LimitingNote, limitingNote } from './quality.ts';
import { type IdleFigures, idleFigures, idleWarning } from './idle.ts';

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
  /** Switching speed (shared/physics/driver/transition.ts): the frequency it switches at (null: a pass device), t_r + t_f + t_s, their share of each cycle, and whether it is past the limit. */
  switchingHz: number | null;
  transitionTimeS: number;
  transitionShare: number | null;
  tooSlow: boolean;
}

export interface BudgetCurve {
  role: DeviceRole;
  /**
   * The device's loss in full operation, W: its worst at a constant operating point with the
   * on-resistance at the limit temperature (bridge: full rail; pass device: half rail; buck
   * modulator: just below 100 % duty; pulse scheme: during a pulse). See fullOperationLossW.
   */
  fullLossW: number;
  /** Tj max − margin − ambient, K. */
  allowedRiseK: number;
  lengthsS: number[];
  /** Allowed fraction of full operation for a burst of each length (single-pulse Zth method). */
  budget: number[];
  /**
   * The clip's highest mean demand over any window of each length, at the evaluated gain: the
   * device's own per-frame loss as a fraction of fullLossW (pulse scheme: the on-time fraction).
   */
  demand: number[];
  /** Where the worst window of each length starts, s. */
  demandAtS: number[];
  crossing: { lengthS: number; demand: number; budget: number } | null;
}

/** The modulation corner as a range of Hz (lowHz = highHz when the coil's Q is measured). */
export interface CornerRangeHz {
  lowHz: number;
  highHz: number;
}

export interface PreEmphasisAdvice {
  /** Share of the clip's power above cornerHz. */
  energyAboveCornerFraction: number;
  /**
   * Power-weighted loss the coil's first-order envelope response inflicts on the clip at the HIGH
   * end of the corner range (the least loss the coil can cause: what holds across the range), dB.
   */
  envelopeLossDb: number;
  /** The loss at each end of the corner range, dB: the most (low corner) and the least (high corner). */
  envelopeLossRangeDb: { atLowCornerDb: number; atHighCornerDb: number };
  /** Advise a boost: true when envelopeLossDb (the least loss over the range) exceeds 1 dB. */
  advised: boolean;
  /** Where the advised first-order high shelf starts: the high end of the corner range, Hz. */
  cornerHz: number;
  cornerRangeHz: CornerRangeHz;
  /** The shelf's gain (≤ 12 dB), from envelopeLossDb, dB. */
  shelfGainDb: number;
  /** Why this much and no more, in words. */
  basis: string;
}

export interface PlanReport {
  clip: string;
  durationS: number;
  scheme: DriverProfile['scheme'];
  gainConvention: string;
  settings: PlanSettings;
  advisedGainDb: number | null;
  binding: { limit: LimitCheck['limit']; label: string; role: DeviceRole | null; atS: number | null; value: number; allowed: number; unit: LimitCheck['unit']; frequencyHz?: number } | null;
  unsafeOnSilence: boolean;
  evaluatedGainDb: number;
  devices: DeviceFigures[];
  /**
   * Supply current. peakCurrentA is what the limit (the most current the supply may deliver, an
   * instantaneous figure) is checked against: for the pulse scheme the current during a pulse
   * (`peakIs: 'pulse-current'`, the same in every pulse), for rail schemes the highest mean over
   * one frame of `peakWindowS` (`'frame-mean'`). meanCurrentA is the mean over the whole clip.
   */
  supply: { peakCurrentA: number; peakIs: 'pulse-current' | 'frame-mean'; peakWindowS: number | null; meanCurrentA: number; limitA: number };
  overModulationFraction: number;
  overModulationTimeS: number;
  pulses: Evaluation['pulses'];
  /** Pulse scheme: RF cycles per pulse at the resonant frequency and pulses shorter than the ring-up time. */
  pulseRf: DriverSimulation['pulse'] | null;
  /** Every limit at the evaluated gain, with its headroom and the name a person reads (shared/plan/limit-labels.ts). */
  limits: (LimitCheck & { label: string })[];
  /** Pulse scheme: the duty cycle run over the duty limit's window, mean and worst, against the profile's maximum duty. */
  dutyCycle: DutyCycleFigures | null;
  /** Quality note, apart from safety: how much the peak limiter (ceiling at the rail's ends, or the longest on-time) would cut at the evaluated gain. */
  limiting: LimitingNote;
  budget: BudgetCurve[];
  /** Peak-limiter ceiling on the modulation source before the gain, dBFS: the level whose gained sample reaches full swing. */
  limiterCeilingDbfs: number;
  preEmphasis: PreEmphasisAdvice | null;
  /** The coil's f0/(2Q) at its own (measured, else computed) Q. */
  modulationCornerHz: number;
  /** The corner as a range (see CoilReport.modulationCornerRangeHz); one value when Q is measured. */
  modulationCornerRangeHz: CornerRangeHz;
  warnings: string[];
  searchEvaluations: number;
  /** Steady idle (supply on, no music) per device of a rail scheme (./idle.ts); [] for the pulse scheme. */
  idle: IdleFigures[];
}

/**
 * Each device's loss in full operation, W, per device in profile order (0 for a device the scheme
 * does not use): the largest loss of its own loss model at any constant operating point, with the
 * on-resistance held at the limit temperature Tj max − marginK (the hottest the budget lets it
 * run, so the figure is on the safe side):
 * - rail schemes: the frame loss model (frameLossModel) at constant rails v on a grid over
 *   0…V_s that includes the buck modulator's last taperV volts: the bridge's worst is at V_s, the
 *   linear pass device's at V_s/2 (g·V_s²/4), the buck modulator's just below 100 % duty, where it
 *   still switches (at 100 % it stays on and only conducts);
 * - pulse scheme: the bridge during a pulse (full rail).
 */
export function fullOperationLossW(driver: DriverProfile, coil: CoilAtResonance, settings: Pick<PlanSettings, 'marginK'>): number[] {
  const vs = driver.supplyVoltageV;
  return driver.devices.map((d) => {
    const alpha = d.rdsOnTempCoeffPerK ?? 0;
    const hotC = d.tjMaxC - settings.marginK;
    if (driver.scheme === 'pulse') {
      if (d.role !== 'bridge') return 0;
      const ia = driver.fullRailCurrentA;
      const parts = bridgeLossParts(d, driver.topology, coil.resonanceHz, { meanCurrentA: ia, meanSquareCurrentA2: ia * ia, meanPowerW: vs * ia, meanSquareV2: vs * vs });
      return totalLossW(parts, alpha, hotC);
    }
    const aux = driver.scheme === 'rail-linear' ? 'pass' : 'modulator';
    if (d.role !== 'bridge' && d.role !== aux) return 0;
    const model = frameLossModel(driver, d.role, coil.resonanceHz);
    let worst = 0;
    const at = (v: number) => {
      worst = Math.max(worst, frameLossAtW(model, v, v * v, alpha, hotC));
    };
    for (let k = 0; k <= FULL_GRID; k++) at((vs * k) / FULL_GRID);
    const w = Math.min(vs, model.taperV ?? 0);
    for (let k = 0; k <= FULL_GRID; k++) at(vs - (w * k) / FULL_GRID);
    return worst;
  });
}
/** Grid points per sweep of fullOperationLossW (the losses are smooth: the worst is found to < 0.1 %). */
const FULL_GRID = 64;

/** Power-weighted envelope loss 10·log10(ΣP/ΣP·|H|²) at corner fc, dB, and the share of power above fc. */
function envelopeLoss(spec: WelchSpectrum, cornerHz: number): { lossDb: number; aboveFraction: number } | null {
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
  return { lossDb: powerToDb(total / passed), aboveFraction: above / total };
}

/**
 * Pre-emphasis advice from the clip's spectrum and the coil's modulation corner fc: the coil's
 * envelope follows like a first-order low-pass |H(f)|² = 1/(1 + (f/fc)²) (a resonator driven at
 * resonance, corner f0/(2Q)); the power-weighted loss is 10·log10(ΣP / ΣP·|H|²).
 *
 * Without a measured Q the corner is only known as a range (`corner` = { lowHz, highHz }: the
 * computed Q is an upper bound, streamers load a running coil down further). The loss falls as the
 * corner rises, so the advice is the one that holds across the whole range: the loss at the HIGH
 * corner, restored by a first-order high shelf starting there (gain at most 12 dB; advised above
 * 1 dB). A stronger boost, right for the low end, would over-drive the treble if the coil's real
 * corner is higher. A single number is a range of one (measured Q).
 */
export function preEmphasisAdvice(spec: WelchSpectrum, corner: number | CornerRangeHz): PreEmphasisAdvice | null {
  const range = typeof corner === 'number' ? { lowHz: corner, highHz: corner } : { lowHz: corner.lowHz, highHz: corner.highHz };
  if (!(range.lowHz > 0) || !(range.highHz >= range.lowHz)) return null;
  const hi = envelopeLoss(spec, range.highHz);
  const lo = envelopeLoss(spec, range.lowHz);
  if (!hi || !lo) return null;
  const one = range.highHz === range.lowHz;
  const advised = hi.lossDb > 1;
  const basis = one
    ? `one corner (measured Q): the coil's envelope response costs this clip ${hi.lossDb.toFixed(1)} dB`
    : `the corner lies between ${range.lowHz.toFixed(0)} and ${range.highHz.toFixed(0)} Hz (Q not measured), costing this clip from ${hi.lossDb.toFixed(1)} to ${lo.lossDb.toFixed(1)} dB; ` +
      `only the ${hi.lossDb.toFixed(1)} dB that holds across the range is ${advised ? 'restored' : 'considered'}, since a stronger boost over-drives the treble if the real corner is higher; a measured Q would sharpen this`;
  return {
    energyAboveCornerFraction: hi.aboveFraction,
    envelopeLossDb: hi.lossDb,
    envelopeLossRangeDb: { atLowCornerDb: lo.lossDb, atHighCornerDb: hi.lossDb },
    advised,
    cornerHz: range.highHz,
    cornerRangeHz: range,
    shelfGainDb: Math.min(12, Math.round(hi.lossDb * 10) / 10),
    basis,
  };
}

/**
 * A role's demand per frame at a gain: its own per-frame loss divided by its full-operation loss
 * (both from the same loss model, on-resistance at the same limit temperature; see
 * fullOperationLossW). Rail schemes: the frame loss model (frameLossModel) at the frame's E[v] and
 * E[v²] — for a MOSFET bridge E[v²]/V_s², for the linear pass device 4(E[v]/V_s − E[v²]/V_s²),
 * for the buck modulator its E[v³] conduction, E[v] switching and constant C_oss parts. Pulse
 * scheme: the on-time fraction (the loss during a pulse is the full-operation loss).
 */
function demandSeries(
  clip: PlanClip,
  coil: CoilAtResonance,
  driver: DriverProfile,
  gainDb: number,
  device: DriverDevice,
  fullLossW: number,
  marginK: number,
  /** The evaluation's buffers when it ran at this very gain: its clamped rail or its pulse train (not recomputed). */
  atGain: EvalScratch | null,
): Float64Array {
  const g = dbToAmp(gainDb);
  const n = clip.frames.count;
  const out = new Float64Array(n);
  if (driver.scheme === 'pulse' && clip.pulseEvents && driver.pulse) {
    const train = atGain?.train ?? pulsesAtGain(clip.pulseEvents, g, pulseLimitsFor(driver.pulse, coil.resonanceHz));
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
  if (driver.scheme === 'pulse' || !(fullLossW > 0)) return out;
  const rail = atGain ?? railAtGain(clip.frames, g, driver.supplyVoltageV, createScratch(clip));
  const model = frameLossModel(driver, device.role, coil.resonanceHz);
  const alpha = device.rdsOnTempCoeffPerK ?? 0;
  const hotC = device.tjMaxC - marginK;
  for (let k = 0; k < n; k++) out[k] = frameLossAtW(model, rail.meanV[k], rail.meanSquareV2[k], alpha, hotC) / fullLossW;
  return out;
}

/**
 * Plans one clip: the advised gain by search, then the full figures at `gainDb` if given, else at
 * the advised gain. `spectrum` and `modulationCornerHz` feed the pre-emphasis advice.
 */
export function planClipReport(
  clip: PlanClip,
  coil: CoilAtResonance & { modulationCornerHz: number; modulationCornerRangeHz?: CornerRangeHz },
  driver: DriverProfile,
  settings: PlanSettings,
  opts: { gainDb?: number; spectrum?: WelchSpectrum; initial?: ThermalState[]; traces?: boolean; advice?: Advice | GainSearch } = {},
): { report: PlanReport; advice: Advice | GainSearch; evaluation: Evaluation } {
  // `advice`: a gain search already made for this very clip, coil, driver, settings and initial
  // state (a re-evaluation at another gain reuses it: it does not depend on the gain asked for).
  const advice = opts.advice ?? adviseGain(clip, coil, driver, settings, { initial: opts.initial });
  const evaluatedGainDb = opts.gainDb ?? advice.advisedGainDb ?? advice.atAdvisedGainDb;
  const reuse = opts.gainDb === undefined && !opts.traces && advice.advisedGainDb !== null && 'atAdvised' in advice;
  // A fresh evaluation leaves its clamped rail or pulse train in `scratch`: the demand reads them.
  const scratch = reuse ? null : createScratch(clip);
  const evaluation = reuse ? (advice as Advice).atAdvised : evaluateAtGain(clip, coil, driver, evaluatedGainDb, settings, { initial: opts.initial, traces: opts.traces, scratch: scratch! });
  const sim = evaluation.sim;
  const devices: DeviceFigures[] = sim.devices.map((d) => {
    const p = driver.devices.find((x) => x.role === d.role)!;
    const sw = deviceSwitching(driver, d.role, coil.resonanceHz);
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
      switchingHz: sw.switchingHz,
      transitionTimeS: sw.transitionTimeS,
      transitionShare: sw.transitionShare,
      tooSlow: sw.tooSlow,
    };
  });

  const lengths = logSpacedLengthsS(0.001, Math.max(0.001, clip.durationS), 4);
  const demandGainDb = Number.isFinite(evaluatedGainDb) ? evaluatedGainDb : -Infinity;
  const fullLoss = fullOperationLossW(driver, coil, settings);
  const used = driver.devices.map((d, i) => ({ d, i })).filter(({ d }) => sim.devices.some((s) => s.role === d.role));
  const budget: BudgetCurve[] = used.map(({ d, i }) => {
    const net = ThermalNetwork.fromPath(d.thermal);
    const allowedRiseK = d.tjMaxC - settings.marginK - settings.ambientC;
    const b = dutyBudget(lengths, allowedRiseK, fullLoss[i], (t) => net.zthKPerW(t));
    const demand = maxWindowMean(demandSeries(clip, coil, driver, demandGainDb, d, fullLoss[i], settings.marginK, scratch), clip.frames.frameS, lengths);
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

  const cornerRange: CornerRangeHz = coil.modulationCornerRangeHz
    ? { lowHz: coil.modulationCornerRangeHz.lowHz, highHz: coil.modulationCornerRangeHz.highHz }
    : { lowHz: coil.modulationCornerHz, highHz: coil.modulationCornerHz };
  const b = advice.binding;
  const report: PlanReport = {
    clip: clip.name,
    durationS: clip.durationS,
    scheme: driver.scheme,
    gainConvention: GAIN_CONVENTION,
    settings,
    advisedGainDb: advice.advisedGainDb,
    binding: b ? { limit: b.limit, label: limitLabel(b), role: b.role, atS: b.atS, value: b.value, allowed: b.allowed, unit: b.unit, ...(b.frequencyHz !== undefined ? { frequencyHz: b.frequencyHz } : {}) } : null,
    unsafeOnSilence: advice.unsafeOnSilence,
    evaluatedGainDb,
    devices,
    supply: {
      peakCurrentA: sim.supply.peakCurrentA,
      peakIs: driver.scheme === 'pulse' ? 'pulse-current' : 'frame-mean',
      peakWindowS: driver.scheme === 'pulse' ? null : clip.frames.frameS,
      meanCurrentA: sim.supply.meanCurrentA,
      limitA: driver.supplyCurrentLimitA,
    },
    overModulationFraction: evaluation.overModulationFraction,
    overModulationTimeS: evaluation.overModulationTimeS,
    pulses: evaluation.pulses,
    pulseRf: sim.pulse ?? null,
    limits: evaluation.limits.map((l) => ({ ...l, label: limitLabel(l) })),
    dutyCycle:
      driver.scheme === 'pulse' && clip.pulseEvents && driver.pulse
        ? dutyCycleFigures(scratch?.train ?? pulsesAtGain(clip.pulseEvents, dbToAmp(demandGainDb), pulseLimitsFor(driver.pulse, coil.resonanceHz)), clip.durationS, driver.pulse.maxDuty)
        : null,
    limiting: limitingNote(clip.histogram, Number.isFinite(evaluatedGainDb) ? evaluatedGainDb : -Infinity, 0),
    budget,
    limiterCeilingDbfs: Number.isFinite(evaluatedGainDb) ? -evaluatedGainDb : 0,
    preEmphasis: opts.spectrum ? preEmphasisAdvice(opts.spectrum, cornerRange) : null,
    modulationCornerHz: coil.modulationCornerHz,
    modulationCornerRangeHz: cornerRange,
    warnings: [...sim.warnings],
    searchEvaluations: advice.evaluations,
    idle: idleFigures(driver, coil, settings),
  };
  for (const f of report.idle) {
    // A device too slow for its switching frequency is already refused; its idle figure is the bound's.
    if (devices.some((d) => d.role === f.role && d.tooSlow)) continue;
    const w = idleWarning(f);
    if (w) report.warnings.push(w);
  }
  if (b && b.limit === 'switching-speed' && !b.ok) {
    report.warnings.unshift(`No gain is safe: ${tooSlowLabel({ role: b.role ?? 'bridge', switchingHz: b.frequencyHz ?? null })} (see below); no gain changes that.`);
  } else if (advice.unsafeOnSilence) {
    report.warnings.unshift('No gain is safe: a device exceeds its limit even on silence. Improve the cooling, lower the supply, or change the scheme before playing anything.');
  } else if (advice.advisedGainDb === null) {
    report.warnings.unshift(`No gain down to ${-60} dB keeps every limit; the clip cannot be played safely on this driver as it stands.`);
  }
  return { report, advice, evaluation };
}
