/**
 * Cautions where the risk is: beside a plan's or a render's advice, what that advice rests on.
 * Every figure the planner gives is computed from the coil and driver profiles; the ones a builder
 * usually estimates rather than measures are named, with how to measure them (common practice of
 * the trade: bench measurements with a signal generator, an oscilloscope and a thermometer). The
 * keep-out distance comes with the interlock and the emergency stop, which are what actually
 * protect people when an estimate is wrong.
 */
import type { CoilReport } from '../physics/coil/analyze.ts';
import type { DriverProfile } from '../schemas/driver.ts';

/** The advice holds only if the profiles are right. */
export const PROFILE_CAUTION = 'This advice holds only if the coil and driver profiles are right: every limit is computed from them, not measured on your coil.';

/** What the advice rests on that is estimated, not measured, with how to measure it; then the keep-out with interlock and emergency stop. */
export interface PlanCautions {
  profile: string;
  /** One line per estimated figure: what it is and how to measure it. */
  estimated: string[];
  /** The keep-out distance with the interlock and emergency stop (null distance when the coil model has no drive figures). */
  keepOut: string;
}

/**
 * The cautions for a plan or a render on `coil` (its report: which figures are measured) and
 * `driver` (its thermal path and switching figures, which the profile does not mark as measured,
 * so they are named whenever they matter).
 */
export function planCautions(coil: Pick<CoilReport, 'resonanceMeasuredHz' | 'qualityFactorMeasured' | 'keepOutM'>, driver: Pick<DriverProfile, 'devices' | 'scheme'>): PlanCautions {
  const estimated: string[] = [];
  if (coil.resonanceMeasuredHz === null) {
    estimated.push(
      'coil resonance: computed from the geometry (self- and top-load capacitance estimated); measure it with a signal generator into the primary and a scope probe or a wire loop a safe distance from the top load, at low power, and put it in the coil profile (measured.resonanceHz).',
    );
  }
  if (coil.qualityFactorMeasured === null) {
    estimated.push(
      'coil Q: computed from the wire alone, an upper bound (it sets the envelope corner and the pre-emphasis); measure the ring-down after a short burst: Q = π·f0·τ with τ the time the amplitude takes to fall to 1/e, and put it in measured.qualityFactor.',
    );
  }
  const sinks = driver.devices.filter((d) => d.thermal.sinkToAmbientKPerW > 0).map((d) => d.role);
  if (sinks.length) {
    estimated.push(
      `heat sinks (${[...new Set(sinks)].join(', ')}): sink–ambient resistance and heat capacity are usually estimates; measure them by dissipating a known steady loss P in the device (or a resistor on the sink) until the sink stops warming: R = ΔT/P, and the time to reach 63 % of ΔT is τ = R·C.`,
    );
  }
  estimated.push(
    'switch figures (on-resistance or saturation voltage, rise and fall times, output capacitance) come from datasheets at their test conditions; your gate drive sets the real switching times: measure them on a scope at the switch node, at low supply voltage first.',
  );
  const dist = coil.keepOutM === null ? 'the keep-out distance' : `the keep-out distance (${coil.keepOutM.toFixed(2)} m from the top load)`;
  const keepOut =
    `Keep everyone beyond ${dist}; fit an interlock that removes the drive when the barrier or enclosure is opened, and an emergency stop within reach of the operator that cuts the supply itself, not only the audio.`;
  return { profile: PROFILE_CAUTION, estimated, keepOut };
}
