/**
 * The coil report: every derived figure of a coil profile, computed by the published methods in
 * this folder (see docs/models-coil.md), with alternatives beside the headline values.
 */
import { InputError } from '../../errors.ts';
import { parseCoilProfile, type CoilProfile } from '../../schemas/coil.ts';
import { currentSheetInductanceH, turnSumInductanceH, wheelerInductanceH } from './inductance.ts';
import { couplingCoefficient, windingMutualInductanceH } from './mutual.ts';
import { nagaokaCoefficient } from './nagaoka.ts';
import { medhurstProximityFactor } from './proximity.ts';
import { modulationCornerHz, qualityFactor, resonanceHz, ringUpTauS } from './resonance.ts';
import { medhurstSelfCapacitanceF, medhurstTableCovers, radiotronSelfCapacitanceF } from './self-capacitance.ts';
import { type TankReport, tankReport } from './tank.ts';
import { sphereCapacitanceF, thinRingCapacitanceF, torusCapacitanceF } from './top-load.ts';
import {
  AIR_BREAKDOWN_V_PER_M,
  COIL_CAUTIONS,
  KEEP_OUT_SAFETY_FACTOR,
  LONG_GAP_BREAKDOWN_V_PER_M,
  airBreakdownGapM,
  arcReachM,
  capacitanceFromResonanceF,
  energyBoundVoltageV,
  keepOutDistance,
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
  /**
   * MEAN input power, W, averaged over seconds (the arc-reach rule's basis; never the peak during a
   * burst). Default supplyVoltageV × fullRailCurrentA: continuous full drive, an upper bound.
   */
  inputPowerW?: number;
  /** Where inputPowerW comes from and over which window it is a mean, in words (for the report). */
  inputPowerBasis?: string;
  /** Wire temperature in operation, °C (default 40 °C: assumed warm-running). */
  wireTempC?: number;
}

/**
 * Q of a secondary loaded by its own streamers, the low end of the modulation-corner range when Q
 * is not measured: an arc at the top is a resistive load of the order of 100 kΩ, and builders put a
 * running coil's loaded Q at the order of 10 ([recalled], common practice; no published
 * measurement was found to cite). An assumption, stated as such in the report.
 */
export const LOADED_Q = 10;
const LOADED_Q_BASIS = 'the order of Q a coil running arcs is loaded to by its streamers (common practice [recalled])';

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
    /**
     * At resonanceHz and wireTempC with the proximity effect of the winding: Medhurst's factor Φ
     * times the isolated round wire's AC resistance (Bessel solution).
     */
    acResistanceOhm: number;
    /** Isolated round wire (skin effect only) at resonanceHz and wireTempC. */
    acResistanceIsolatedOhm: number;
    /** Isolated round wire's AC-to-DC ratio (skin effect only). */
    acToDcRatio: number;
    /** Medhurst's proximity factor Φ = R_coil/R_straight (1947 table) at this l/D and d/p. */
    proximityFactor: number;
    /** Medhurst's table. */
    selfCapacitanceF: number;
    selfCapacitanceModels: { medhurstTableF: number; radiotronFitF: number };
    /** (largest − smallest)/Medhurst of the two models, %. */
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
  resonanceByModelHz: { medhurstTableHz: number; radiotronFitHz: number };
  /** Measured where given, else computed. */
  qualityFactor: number;
  /**
   * 2π f L / R_ac with the winding's R_ac (skin and proximity effect, Medhurst 1947): still an upper
   * bound, since the former's dielectric loss, radiation and the top load's losses are not in it.
   */
  qualityFactorComputed: number;
  /** 2π f L / R_ac with the isolated wire's R_ac (skin effect only): the loosest bound, for comparison. */
  qualityFactorSkinOnly: number;
  qualityFactorMeasured: number | null;
  /** The Q assumed for a coil running arcs, the low end of the range (min of LOADED_Q and the Q above). */
  qualityFactorLoaded: number;
  /** f0/(2·qualityFactor): the corner at the coil's own (measured, else computed) Q; the low end of the range. */
  modulationCornerHz: number;
  /**
   * The modulation corner as a range: lowHz = f0/(2Q) at the Q above, highHz = f0/(2·Q_loaded) with
   * streamers loading the coil. One value (lowHz = highHz) when Q is measured.
   */
  modulationCornerRangeHz: { lowHz: number; highHz: number; basis: string };
  ringUpTauS: number;
  primary: {
    meanDiameterM: number;
    nagaokaK: number;
    /** Turn-by-turn sum when the conductor diameter is given (method 'turn-sum'), else the current sheet. */
    inductanceH: number;
    inductanceMethod: 'turn-sum' | 'current-sheet';
    /** Current sheet with Nagaoka's coefficient (low by up to ~8 % for thin, widely spaced turns). */
    inductanceCurrentSheetH: number;
  };
  mutualInductanceH: number;
  couplingK: number;
  voltage: {
    /** V·I·t_on, J; null without all three drive figures. */
    energyJ: number | null;
    /** Upper bound √(2E/C) with C = boundCapacitanceF, V. */
    topVoltageBoundV: number | null;
    /** The capacitance of the bound, F: implied by the measured resonance, 1/((2π f)²L), else the computed total. */
    boundCapacitanceF: number;
    boundCapacitanceFrom: 'measured-resonance' | 'computed';
    /** Long-gap mean breakdown field used for the gap, V/m. */
    breakdownFieldVPerM: number;
    /** topVoltageBoundV / breakdownFieldVPerM, m. */
    breakdownGapM: number | null;
    /** Mean input power of the arc-reach rule, W. */
    inputPowerW: number | null;
    /** Where that mean power comes from and its averaging window, in words. */
    inputPowerBasis: string | null;
    /** Freau's rule 1.7 in·√W on the mean input power, m. */
    arcReachM: number | null;
    safetyFactor: number;
    basis: string;
  };
  /** safetyFactor × max(breakdownGapM, arcReachM); null without drive figures. */
  keepOutM: number | null;
  /** Which of the two set the keep-out distance; null without drive figures. */
  keepOutSetBy: 'breakdown-gap' | 'arc-reach' | null;
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
  const rAcIsolated = rDcHot * acRatio;
  const phi = medhurstProximityFactor(l / D, l / N / s.wireDiameterM);
  const rAc = rAcIsolated * phi;
  const qComputed = qualityFactor(f0, L2, rAc);
  const qMeasured = profile.measured.qualityFactor;
  const q = qMeasured ?? qComputed;
  const qLoaded = Math.min(LOADED_Q, q);
  const cornerRange =
    qMeasured !== null
      ? { lowHz: modulationCornerHz(f0, q), highHz: modulationCornerHz(f0, q), basis: 'measured Q: one corner f0/(2Q)' }
      : {
          lowHz: modulationCornerHz(f0, q),
          highHz: modulationCornerHz(f0, qLoaded),
          basis: `from f0/(2Q) at the computed Q ${q.toFixed(0)} (skin and proximity effect, Medhurst 1947: an upper bound) to f0/(2Q) at Q ${qLoaded.toFixed(0)}, ${LOADED_Q_BASIS}; a measured Q would narrow it to one value`,
        };

  const pr = profile.primary;
  // Thin, widely spaced primary turns carry more inductance than the current sheet (Rosa's
  // round-wire correction A = 5/4 − ln(2p/d) turns negative for p/d > 1.7): with the conductor's
  // diameter the turn-by-turn sum is used, which includes that correction.
  const L1Sheet = currentSheetInductanceH(pr.diameterM, pr.windingLengthM, pr.turns);
  const L1 = pr.wireDiameterM !== undefined ? turnSumInductanceH(pr.diameterM, pr.windingLengthM, pr.turns, pr.wireDiameterM) : L1Sheet;
  const M = windingMutualInductanceH(
    { radiusM: D / 2, centreM: l / 2, lengthM: l, turns: N },
    { radiusM: pr.diameterM / 2, centreM: pr.offsetM, lengthM: pr.windingLengthM, turns: pr.turns },
  );

  const energyJ = supplyV !== undefined && railA !== undefined && onS !== undefined ? supplyV * railA * onS : null;
  // A measured resonance fixes the capacitance the coil really has (a resonance above the computed
  // one means less capacitance, so a higher voltage for the same energy).
  const cBound = f0Measured !== null ? capacitanceFromResonanceF(f0Measured, L2) : cTotal;
  const vBound = energyJ === null ? null : energyBoundVoltageV(energyJ, cBound);
  const gap = vBound === null ? null : airBreakdownGapM(vBound);
  const pIn = powerIn ?? (supplyV !== undefined && railA !== undefined ? supplyV * railA : null);
  const pInBasis =
    pIn === null
      ? null
      : powerIn !== undefined
        ? (drive.inputPowerBasis ?? 'the mean input power given, averaged over seconds')
        : 'supply voltage × full-rail current: continuous full drive, the highest mean the driver can draw';
  const arc = pIn === null ? null : arcReachM(pIn);
  const keepOut = keepOutDistance(gap, arc, KEEP_OUT_SAFETY_FACTOR);
  const keepOutM = keepOut?.keepOutM ?? null;

  const byModel = {
    medhurstTableHz: resonanceHz(L2, models.medhurstTableF + cOther),
    radiotronFitHz: resonanceHz(L2, models.radiotronFitF + cOther),
  };
  const fModels = Object.values(byModel);
  const kHz = (f: number): string => (f / 1e3).toFixed(1);
  const notes: string[] = [
    `Self-capacitance is Medhurst's table (coils on solid polystyrene rods); the Radiotron fit differs from it by ${spreadPercent.toFixed(0)} % for this coil (computed resonance ${kHz(Math.min(...fModels))} to ${kHz(Math.max(...fModels))} kHz), and an air-wound coil on a thin tube can have markedly less: measure the resonance and enter measured.resonanceHz.`,
    "Top-load capacitance is the isolated electrode's; mounted on the coil, both it and the coil's self-capacitance change, so their sum is an approximation.",
    `AC resistance includes the proximity of neighbouring turns by Medhurst's 1947 factor (×${phi.toFixed(2)} at l/D ${(l / D).toFixed(2)}, d/p ${((s.wireDiameterM * N) / l).toFixed(2)}, measured where the skin effect is fully developed); the former's dielectric loss and radiation are not in it, so the computed Q is still an upper bound: measure Q and enter measured.qualityFactor.`,
  ];
  if (!medhurstTableCovers(l / D)) notes.push(`l/D = ${(l / D).toFixed(3)} lies outside Medhurst's table (0.1 to 50); the self-capacitance is extrapolated with the Radiotron fit.`);
  if (pr.wireDiameterM === undefined) {
    notes.push("Primary inductance is the current sheet: for thin, widely spaced turns it reads low (up to about 8 %), which overstates the coupling by up to about 4 %; give primary.wireDiameterM to sum it turn by turn.");
  }
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
      acResistanceIsolatedOhm: rAcIsolated,
      acToDcRatio: acRatio,
      proximityFactor: phi,
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
    qualityFactorSkinOnly: qualityFactor(f0, L2, rAcIsolated),
    qualityFactorMeasured: qMeasured,
    qualityFactorLoaded: qLoaded,
    modulationCornerHz: modulationCornerHz(f0, q),
    modulationCornerRangeHz: cornerRange,
    ringUpTauS: ringUpTauS(f0, q),
    primary: {
      meanDiameterM: pr.diameterM,
      nagaokaK: nagaokaCoefficient(pr.diameterM / pr.windingLengthM),
      inductanceH: L1,
      inductanceMethod: pr.wireDiameterM !== undefined ? 'turn-sum' : 'current-sheet',
      inductanceCurrentSheetH: L1Sheet,
    },
    mutualInductanceH: M,
    couplingK: couplingCoefficient(M, L1, L2),
    voltage: {
      energyJ,
      topVoltageBoundV: vBound,
      boundCapacitanceF: cBound,
      boundCapacitanceFrom: f0Measured !== null ? 'measured-resonance' : 'computed',
      breakdownFieldVPerM: LONG_GAP_BREAKDOWN_V_PER_M,
      breakdownGapM: gap,
      inputPowerW: pIn,
      inputPowerBasis: pInBasis,
      arcReachM: arc,
      safetyFactor: KEEP_OUT_SAFETY_FACTOR,
      basis:
        `Top voltage is an upper bound, not an estimate: the energy of one longest on-time at full rail power (V·I·t_on), transferred losslessly to the capacitance at the top, V = √(2E/C), with C ${f0Measured !== null ? 'implied by the measured resonance, 1/((2π f)²·L)' : 'computed from the geometry (measure the resonance to pin it)'}; ` +
        `breakdown gap at the long-gap mean field ${LONG_GAP_BREAKDOWN_V_PER_M / 1e6} MV/m (rod–plane gaps of a metre and more; a uniform millimetre gap holds ${AIR_BREAKDOWN_V_PER_M / 1e6} MV/m, far more); ` +
        `arc reach by Freau's rule 1.7 in·√W on the mean input power (${pInBasis ?? 'not given'}), fitted to spark-gap coils (an extrapolation here); ` +
        `the keep-out is ${KEEP_OUT_SAFETY_FACTOR} × the larger of the two${keepOut ? `, here the ${keepOut.setBy === 'arc-reach' ? 'arc reach' : 'breakdown gap'}` : ''}. Real arcs can reach farther.`,
    },
    keepOutM,
    keepOutSetBy: keepOut?.setBy ?? null,
    tank: tankReport(profile, f0, L1, couplingCoefficient(M, L1, L2)),
    cautions: [...COIL_CAUTIONS],
    notes,
  };
}
