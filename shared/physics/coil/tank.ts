/**
 * Tuning a primary that is itself a resonant tank (spark-gap coils, dual-resonant solid-state
 * drivers) to the secondary.
 *
 * The tank is the primary winding plus its leads, L_p = L_primary + L_leads, with the capacitor C_p.
 * It is tuned when its own resonance equals the secondary's, f0:
 *   C_tune = 1/((2π·f0)²·L_p)          (Thomson's formula f = 1/(2π√(LC)) solved for C)
 * With a capacitor C_fit fitted, the primary's own resonance is f_p = 1/(2π√(L_p·C_fit)), and
 * f_p/f0 says which way to retune (above 1: too little capacitance or inductance; tap more turns or
 * fit more capacitance). Coupled, two tuned circuits ring at two frequencies about
 * f0/√(1 ± k) (Terman, *Radio Engineers' Handbook*, 1943, coupled circuits [recalled]), which the
 * report gives beside the tuning.
 *
 * Spark gap: a static gap fires when the tank capacitor's voltage breaks the air between its
 * electrodes down; at 3 kV/mm (dry air, uniform field: AMS *Glossary of Meteorology*, the figure
 * the coil report's clearance also uses) the gap that just fires at the supply's peak is
 * V_peak / 3 kV/mm. An ESTIMATE: rounded or dirty electrodes, humidity, heating and ionised air
 * from earlier firings all change it; real gaps are set by test, starting narrow.
 */
import type { CoilProfile } from '../../schemas/coil.ts';
import { resonanceHz } from './resonance.ts';
import { AIR_BREAKDOWN_V_PER_M, airBreakdownGapM } from './voltage.ts';

/** Cautions for a tank fed from the mains through a step-up transformer (common practice). */
export const TANK_MAINS_CAUTIONS: readonly string[] = [
  'A spark-gap tank is charged from a mains step-up transformer: its output and the charged capacitor are lethal. Fit bleed resistors across the capacitor, switch off, then discharge and short the capacitor with an insulated shorting stick before touching anything.',
  "Protect the transformer with a safety gap across its output and a filter between it and the tank; the tank's RF must not reach the mains.",
  'Rotary and static gaps are loud, make ultraviolet light and ozone, and can throw hot metal: enclose them, ventilate, and protect eyes and hearing.',
];

/**
 * Capacitance that tunes a tank of inductance L (H) to f0 (Hz), F: 1/((2π·f0)²·L).
 *
 * @example tankTuningCapacitanceF(318e3, 10e-6) // → 25.05 nF
 */
export function tankTuningCapacitanceF(resonanceFrequencyHz: number, inductanceH: number): number {
  const w = 2 * Math.PI * resonanceFrequencyHz;
  return 1 / (w * w * inductanceH);
}

/** The tank part of the coil report. */
export interface TankReport {
  switching: 'spark-gap' | 'solid-state';
  /** Primary winding inductance, H (the coil report's). */
  primaryInductanceH: number;
  /** Lead inductance, H (0 when not given). */
  leadInductanceH: number;
  /** L_p = winding + leads, H. */
  tankInductanceH: number;
  /** The secondary's resonance the tank is tuned to, Hz. */
  secondaryResonanceHz: number;
  /** The capacitance that tunes the tank to the secondary, F. */
  tankTuningCapacitanceF: number;
  /** The capacitance fitted, F (null: none yet). */
  fittedCapacitanceF: number | null;
  /** The primary's own resonance with the fitted capacitor, Hz (null: none fitted). */
  primaryResonanceHz: number | null;
  /** primaryResonanceHz / secondaryResonanceHz (null: none fitted). */
  primaryToSecondaryRatio: number | null;
  /** The two frequencies of the tuned, coupled pair, f0/√(1 + k) and f0/√(1 − k), Hz. */
  coupledModesHz: { lowerHz: number; upperHz: number };
  /** Spark-gap coils with a supply peak: the gap that breaks down at that peak, an estimate. */
  sparkGap: { supplyPeakV: number; breakdownGapM: number; tankEnergyJ: number | null; basis: string } | null;
  notes: string[];
  cautions: string[];
}

/**
 * The tank report for a profile whose primary is marked as a tank (null otherwise), with the
 * secondary's resonance f0 (Hz), the primary winding's inductance (H) and the coupling k.
 *
 * @example tankReport(profile, 318e3, 12e-6, 0.15)?.tankTuningCapacitanceF
 */
export function tankReport(profile: CoilProfile, secondaryResonanceHz: number, primaryInductanceH: number, couplingK: number): TankReport | null {
  const tank = profile.primary.tank;
  if (!tank) return null;
  const lead = profile.primary.leadInductanceH ?? 0;
  const lp = primaryInductanceH + lead;
  const cTune = tankTuningCapacitanceF(secondaryResonanceHz, lp);
  const cFit = tank.capacitanceF;
  const fp = cFit === null ? null : resonanceHz(lp, cFit);
  const k = Math.min(Math.max(couplingK, 0), 0.999);
  const notes: string[] = [
    'The tuning capacitance takes the primary inductance from its geometry (current sheet) plus the leads; the real tank also has the capacitor\'s own inductance and the gap\'s: tune by test around this figure.',
  ];
  if (fp !== null) {
    const ratio = fp / secondaryResonanceHz;
    notes.push(
      Math.abs(ratio - 1) <= 0.02
        ? 'The fitted capacitor tunes the primary within 2 % of the secondary.'
        : ratio > 1
          ? `The primary rings ${((ratio - 1) * 100).toFixed(1)} % above the secondary: fit more capacitance or tap more primary turns.`
          : `The primary rings ${((1 - ratio) * 100).toFixed(1)} % below the secondary: fit less capacitance or tap fewer primary turns.`,
    );
  } else notes.push('No capacitor fitted yet: start from the tuning capacitance.');
  let sparkGap: TankReport['sparkGap'] = null;
  const cautions: string[] = [];
  if (tank.switching === 'spark-gap') {
    cautions.push(...TANK_MAINS_CAUTIONS);
    const vpk = tank.supplyPeakV ?? null;
    if (vpk !== null) {
      sparkGap = {
        supplyPeakV: vpk,
        breakdownGapM: airBreakdownGapM(vpk, AIR_BREAKDOWN_V_PER_M),
        tankEnergyJ: cFit === null ? null : 0.5 * cFit * vpk * vpk,
        basis: `Estimate: the gap that breaks down at the supply's peak in dry air at ${AIR_BREAKDOWN_V_PER_M / 1e6} kV/mm in a uniform field. Electrode shape, humidity, heating and ionised air change it; set a real gap by test, starting narrow.`,
      };
    } else notes.push('No spark-gap estimate: give primary.tank.supplyPeakV (√2 × the transformer\'s RMS output).');
  }
  return {
    switching: tank.switching,
    primaryInductanceH,
    leadInductanceH: lead,
    tankInductanceH: lp,
    secondaryResonanceHz,
    tankTuningCapacitanceF: cTune,
    fittedCapacitanceF: cFit,
    primaryResonanceHz: fp,
    primaryToSecondaryRatio: fp === null ? null : fp / secondaryResonanceHz,
    coupledModesHz: { lowerHz: secondaryResonanceHz / Math.sqrt(1 + k), upperHz: secondaryResonanceHz / Math.sqrt(1 - k) },
    sparkGap,
    notes,
    cautions,
  };
}
