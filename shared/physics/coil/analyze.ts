/**
 * The coil report: every derived figure of a coil profile, computed by the published methods in
 * this folder (see docs/models-coil.md), with alternatives beside the headline values.
 */
import { InputError } from '../../errors.ts';
import { parseCoilProfile, type CoilProfile } from '../../schemas/coil.ts';
import { currentSheetInductanceH, turnSumInductanceH, wheelerInductanceH } from './inductance.ts';
import { couplingCoefficient, windingMutualInductanceH } from './mutual.ts';
import { nagaokaCoefficient } from './nagaoka.ts';
import { modulationCornerHz, qualityFactor, resonanceHz, ringUpTauS } from './resonance.ts';
import {
  knightAirCoreSelfCapacitanceF,
  medhurstSelfCapacitanceF,
  medhurstTableCovers,
  radiotronSelfCapacitanceF,
} from './self-capacitance.ts';
import { type TankReport, tankReport } from './tank.ts';
import { sphereCapacitanceF, thinRingCapacitanceF, torusCapacitanceF } from './top-load.ts';
import {
  AIR_BREAKDOWN_V_PER_M,
  COIL_CAUTIONS,
  KEEP_OUT_SAFETY_FACTOR,
  airBreakdownGapM,
  arcReachM,
  energyBoundVoltageV,
} from './voltage.ts';
import {
  copperDcResistanceOhm,
  copperResistivityOhmM,
  helicalWireLengthM,
  roundWireAcResistanceRatio,
  skinDepthM,
} from './wire.ts';

/** Optional operating context: drive figures for the voltage bound, and the wire temperature. */
export interface CoilDriveContext {
  /** DC rail voltage of the driver, V. */
  supplyVoltageV?: number;
  /** Current drawn from the rail at full drive, A. */
  fullRailCurrentA?: number;
  /** Longest single on-time (one burst of drive), s. */
  pulseOnTimeS?: number;
  /** Average input power, W (default supplyVoltageV × fullRailCurrentA, an upper bound). */
  inputPowerW?: number;
  /** Wire temperature in operation, °C (default 40 °C: assumed warm-running). */
  wireTempC?: number;
}

/** Default operating wire temperature, °C (an assumption: a secondary running warm). */
export const DEFAULT_WIRE_TEMP_C = 40;

/** Everything analyzeCoil derives; plain numbers, strings and nulls (JSON-serialisable). */
export interface CoilReport {
  name: string;
  secondary: {
    /** Diameter through the wire centres (former + wire), m: the D of every formula. */
    meanDiameterM: number;
    windingLengthM: number;
    turns: number;
    pitchM: number;
    lengthOverDiameter: number;
    nagaokaK: number;
    /** Current sheet, exact Nagaoka coefficient. */
    inductanceH: number;
    inductanceLundinH: number;
    inductanceWheelerH: number;
    /** Sum of round-wire loops and their mutuals (includes the wire-spacing correction). */
    inductanceTurnSumH: number;
    wireLengthM: number;
    /** At 20 °C. */
    dcResistanceOhm: number;
    wireTempC: number;
    /** At wireTempC. */
    dcResistanceHotOhm: number;
    /** At resonanceHz and wireTempC. */
    skinDepthM: number;
    /** Isolated round wire (Bessel solution) at resonanceHz and wireTempC; proximity effect neglected. */
    acResistanceOhm: number;
    acToDcRatio: number;
    /** Medhurst's table. */
    selfCapacitanceF: number;
    selfCapacitanceModels: { medhurstTableF: number; radiotronFitF: number; knightAirCoreF: number };
    /** (largest − smallest)/Medhurst of the three models, %. */
    selfCapacitanceSpreadPercent: number;
    selfCapacitanceInTable: boolean;
  };
  topLoad: { shape: 'none' | 'sphere' | 'torus'; capacitanceF: number; thinRingLimitF: number | null };
  extraCapacitanceF: number;
  /** Self (Medhurst) + top load (isolated) + extra. */
  totalCapacitanceF: number;
  /** Measured where given, else computed. */
  resonanceHz: number;
  resonanceComputedHz: number;
  resonanceMeasuredHz: number | null;
  /** (measured − computed)/computed, %. */
  resonanceDiscrepancyPercent: number | null;
  /** Computed resonance with each self-capacitance model. */
  resonanceByModelHz: { medhurstTableHz: number; radiotronFitHz: number; knightAirCoreHz: number };
  /** Measured where given, else computed. */
  qualityFactor: number;
  /** 2π f L / R_ac with the isolated-wire R_ac: an upper bound. */
  qualityFactorComputed: number;
  qualityFactorMeasured: number | null;
  modulationCornerHz: number;
  ringUpTauS: number;
  primary: { meanDiameterM: number; nagaokaK: number; inductanceH: number };
  mutualInductanceH: number;
  couplingK: number;
  voltage: {
    /** V·I·t_on, J; null without all three drive figures. */
    energyJ: number | null;
    /** √(2E/C_total), V. */
    topVoltageBoundV: number | null;
    /** topVoltageBoundV / 3 MV/m, m. */
    breakdownGapM: number | null;
    inputPowerW: number | null;
    /** 1.7 in·√W, m. */
    arcReachM: number | null;
    safetyFactor: number;
    basis: string;
  };
  /** safetyFactor × max(breakdownGapM, arcReachM); null without drive figures. */
  keepOutM: number | null;
  /** The primary as a resonant tank (./tank.ts): tuning capacitance and the rest; null unless the profile marks it. */
  tank: TankReport | null;
  cautions: string[];
  notes: string[];
}

function positiveDrive(drive: CoilDriveContext, key: keyof CoilDriveContext, unit: string, max: number): number | undefined {
  const v = drive[key];
  if (v === undefined) return undefined;
  if (typeof v !== 'number' || !Number.isFinite(v) || v <= 0 || v > max) {
    throw new InputError('bad-drive', `drive ${key} must be a number above 0 and at most ${max} ${unit}, got ${String(v)}; check the value and its unit.`, key);
  }
  return v;
}

/**
 * Analyses a coil profile (validated again here, so any object may be passed): inductances,
 * capacitances, resonance, losses and Q, modulation corner, coupling, a top-voltage bound and the
 * keep-out distance, with the cautions. Pure; a few milliseconds for a 1000-turn secondary.
 * Throws InputError for a bad profile ('bad-profile') or drive figure ('bad-drive').
 * Methods and sources: docs/models-coil.md. Example: analyzeCoil(DEMO_COILS['desk-lantern']).
 */
export function analyzeCoil(profileIn: CoilProfile, drive: CoilDriveContext = {}): CoilReport {
  const profile = parseCoilProfile(profileIn);
  const supplyV = positiveDrive(drive, 'supplyVoltageV', 'V', 1e5);
  const railA = positiveDrive(drive, 'fullRailCurrentA', 'A', 1e4);
  const onS = positiveDrive(drive, 'pulseOnTimeS', 's', 1);
  const powerIn = positiveDrive(drive, 'inputPowerW', 'W', 1e7);
  const tempC = drive.wireTempC ?? DEFAULT_WIRE_TEMP_C;
  if (typeof tempC !== 'number' || !(tempC >= -50 && tempC <= 200)) {
    throw new InputError('bad-drive', `drive wireTempC must be between -50 and 200 °C, got ${String(tempC)}.`, 'wireTempC');
  }

  const s = profile.secondary;
  const D = s.formDiameterM + s.wireDiameterM;
  const l = s.windingLengthM;
  const N = s.turns;
  const L2 = currentSheetInductanceH(D, l, N);
  const models = {
    medhurstTableF: medhurstSelfCapacitanceF(D, l),
    radiotronFitF: radiotronSelfCapacitanceF(D, l),
    knightAirCoreF: knightAirCoreSelfCapacitanceF(D, l, N),
  };
  const cSelf = models.medhurstTableF;
  const all = Object.values(models);
  const spreadPercent = ((Math.max(...all) - Math.min(...all)) / cSelf) * 100;

  const t = profile.topLoad;
  let cTop = 0;
  let thinRing: number | null = null;
  if (t.shape === 'sphere') cTop = sphereCapacitanceF(t.diameterM);
  else if (t.shape === 'torus') {
    cTop = torusCapacitanceF(t.outerDiameterM, t.tubeDiameterM);
    thinRing = thinRingCapacitanceF((t.outerDiameterM - t.tubeDiameterM) / 2, t.tubeDiameterM / 2);
  }
  const cOther = cTop + profile.extraCapacitanceF;
  const cTotal = cSelf + cOther;
  const f0Computed = resonanceHz(L2, cTotal);
  const f0Measured = profile.measured.resonanceHz;
  const f0 = f0Measured ?? f0Computed;

  const wireLengthM = helicalWireLengthM(D, l, N);
  const rDc20 = copperDcResistanceOhm(wireLengthM, s.wireDiameterM, 20);
  const rDcHot = copperDcResistanceOhm(wireLengthM, s.wireDiameterM, tempC);
  const delta = skinDepthM(copperResistivityOhmM(tempC), f0);
  const acRatio = roundWireAcResistanceRatio(s.wireDiameterM / 2, delta);
  const rAc = rDcHot * acRatio;
  const qComputed = qualityFactor(f0, L2, rAc);
  const qMeasured = profile.measured.qualityFactor;
  const q = qMeasured ?? qComputed;

  const pr = profile.primary;
  const L1 = currentSheetInductanceH(pr.diameterM, pr.windingLengthM, pr.turns);
  const M = windingMutualInductanceH(
    { radiusM: D / 2, centreM: l / 2, lengthM: l, turns: N },
    { radiusM: pr.diameterM / 2, centreM: pr.offsetM, lengthM: pr.windingLengthM, turns: pr.turns },
  );

  const energyJ = supplyV !== undefined && railA !== undefined && onS !== undefined ? supplyV * railA * onS : null;
  const vBound = energyJ === null ? null : energyBoundVoltageV(energyJ, cTotal);
  const gap = vBound === null ? null : airBreakdownGapM(vBound);
  const pIn = powerIn ?? (supplyV !== undefined && railA !== undefined ? supplyV * railA : null);
  const arc = pIn === null ? null : arcReachM(pIn);
  const reach = [gap, arc].filter((x): x is number => x !== null);
  const keepOutM = reach.length ? KEEP_OUT_SAFETY_FACTOR * Math.max(...reach) : null;

  const byModel = {
    medhurstTableHz: resonanceHz(L2, models.medhurstTableF + cOther),
    radiotronFitHz: resonanceHz(L2, models.radiotronFitF + cOther),
    knightAirCoreHz: resonanceHz(L2, models.knightAirCoreF + cOther),
  };
  const fModels = Object.values(byModel);
  const kHz = (f: number): string => (f / 1e3).toFixed(1);
  const notes: string[] = [
    `Self-capacitance is Medhurst's table (coils on solid polystyrene rods); the Radiotron fit and Knight's air-core model differ from it by up to ${spreadPercent.toFixed(0)} % for this coil, putting the computed resonance anywhere from ${kHz(Math.min(...fModels))} to ${kHz(Math.max(...fModels))} kHz: measure it and enter measured.resonanceHz.`,
    "Top-load capacitance is the isolated electrode's; mounted on the coil, both it and the coil's self-capacitance change, so their sum is an approximation.",
    'AC resistance is that of an isolated round wire (skin effect only); the proximity of neighbouring turns raises it further, so the computed Q is an upper bound.',
  ];
  if (!medhurstTableCovers(l / D)) notes.push(`l/D = ${(l / D).toFixed(3)} lies outside Medhurst's table (0.1 to 50); the self-capacitance is extrapolated with the Radiotron fit.`);
  if (f0Measured !== null) notes.push('Measured resonance used for the resonance, skin depth, AC resistance and modulation corner.');
  if (energyJ === null) notes.push('No top-voltage bound: give supply voltage, full-rail current and on-time.');
  if (pIn === null) notes.push('No arc-reach estimate: give the input power (or supply voltage and full-rail current).');

  return {
    name: profile.name,
    secondary: {
      meanDiameterM: D,
      windingLengthM: l,
      turns: N,
      pitchM: l / N,
      lengthOverDiameter: l / D,
      nagaokaK: nagaokaCoefficient(D / l),
      inductanceH: L2,
      inductanceLundinH: currentSheetInductanceH(D, l, N, 'lundin'),
      inductanceWheelerH: wheelerInductanceH(D, l, N),
      inductanceTurnSumH: turnSumInductanceH(D, l, N, s.wireDiameterM),
      wireLengthM,
      dcResistanceOhm: rDc20,
      wireTempC: tempC,
      dcResistanceHotOhm: rDcHot,
      skinDepthM: delta,
      acResistanceOhm: rAc,
      acToDcRatio: acRatio,
      selfCapacitanceF: cSelf,
      selfCapacitanceModels: models,
      selfCapacitanceSpreadPercent: spreadPercent,
      selfCapacitanceInTable: medhurstTableCovers(l / D),
    },
    topLoad: { shape: t.shape, capacitanceF: cTop, thinRingLimitF: thinRing },
    extraCapacitanceF: profile.extraCapacitanceF,
    totalCapacitanceF: cTotal,
    resonanceHz: f0,
    resonanceComputedHz: f0Computed,
    resonanceMeasuredHz: f0Measured,
    resonanceDiscrepancyPercent: f0Measured === null ? null : ((f0Measured - f0Computed) / f0Computed) * 100,
    resonanceByModelHz: byModel,
    qualityFactor: q,
    qualityFactorComputed: qComputed,
    qualityFactorMeasured: qMeasured,
    modulationCornerHz: modulationCornerHz(f0, q),
    ringUpTauS: ringUpTauS(f0, q),
    primary: { meanDiameterM: pr.diameterM, nagaokaK: nagaokaCoefficient(pr.diameterM / pr.windingLengthM), inductanceH: L1 },
    mutualInductanceH: M,
    couplingK: couplingCoefficient(M, L1, L2),
    voltage: {
      energyJ,
      topVoltageBoundV: vBound,
      breakdownGapM: gap,
      inputPowerW: pIn,
      arcReachM: arc,
      safetyFactor: KEEP_OUT_SAFETY_FACTOR,
      basis: `Upper bound: the energy of one longest on-time at full rail power (V·I·t_on), transferred losslessly to the secondary's total capacitance, V = √(2E/C); breakdown gap at ${AIR_BREAKDOWN_V_PER_M / 1e6} MV/m (dry air, uniform field); arc reach by the builders' rule 1.7 in·√W for spark-gap coils (an extrapolation here). Real arcs can reach farther.`,
    },
    keepOutM,
    tank: tankReport(profile, f0, L1, couplingCoefficient(M, L1, L2)),
    cautions: [...COIL_CAUTIONS],
    notes,
  };
}
