/**
 * Upper bounds on top voltage, the air clearance they imply, the empirical arc reach, and the
 * cautions every coil report carries. These are bounds and rules of thumb for keeping people and
 * things away, never a promise that a distance is safe.
 */

/**
 * Dielectric strength of dry air in a uniform field across a short (millimetre to centimetre)
 * gap, V/m: ≈ 3 MV/m (3 kV/mm) at sea level (American Meteorological Society, *Glossary of
 * Meteorology*, "dielectric strength"). NOT the figure for a coil's clearance: see
 * {@link LONG_GAP_BREAKDOWN_V_PER_M}.
 */
export const AIR_BREAKDOWN_V_PER_M = 3e6;

/**
 * Mean breakdown field of a long air gap, V/m: 0.5 MV/m (500 kV/m). Across gaps of a metre and
 * more from a sharp or small electrode (rod–plane), leaders form and the gap breaks down at an
 * average gradient near 0.5–0.6 MV/m for positive impulses, falling further with gap length
 * (Les Renardières Group, "Positive discharges in long air gaps at Les Renardières", Electra 53,
 * 1977; Kuffel, Zaengl & Kuffel, *High Voltage Engineering: Fundamentals*, 2nd ed., 2000, §5.9,
 * long-gap breakdown [recalled]). The lower end of that range is taken: it gives the longer gap.
 */
export const LONG_GAP_BREAKDOWN_V_PER_M = 0.5e6;

/** Safety factor applied to clearance and arc reach when forming the keep-out distance. */
export const KEEP_OUT_SAFETY_FACTOR = 2;

/** Metres of arc per √W in the builders' rule: 1.7 in = 0.04318 m (inch exact, 0.0254 m). */
export const ARC_REACH_M_PER_SQRT_W = 1.7 * 0.0254;

/**
 * Energy-conservation ceiling on the top voltage, V: all energy E delivered in one maximal on-time
 * ends up, losslessly, in the secondary's capacitance, so ½CV² ≤ E and V ≤ √(2E/C).
 * Real coils lose most of it (primary and secondary resistance, radiation, corona), so the true
 * peak is lower. Example: energyBoundVoltageV(0.5, 14e-12) = 267 kV.
 */
export const energyBoundVoltageV = (energyJ: number, capacitanceF: number): number => Math.sqrt((2 * energyJ) / capacitanceF);

/**
 * Gap that `voltageV` would just break down across, m: V/E with the long-gap field
 * E = {@link LONG_GAP_BREAKDOWN_V_PER_M} (0.5 MV/m) unless another is given.
 * Example: airBreakdownGapM(300e3) = 0.6 m.
 */
export const airBreakdownGapM = (voltageV: number, breakdownVPerM = LONG_GAP_BREAKDOWN_V_PER_M): number => voltageV / breakdownVPerM;

/**
 * Capacitance at the top of the secondary implied by a resonance, F: C = 1/((2π·f)²·L). When the
 * resonance is measured this is the capacitance the coil really has; a measured resonance above
 * the computed one means less capacitance and so a higher voltage for the same energy.
 * Example: capacitanceFromResonanceF(300e3, 30e-3) = 9.38 pF.
 */
export const capacitanceFromResonanceF = (resonanceHz: number, inductanceH: number): number => 1 / ((2 * Math.PI * resonanceHz) ** 2 * inductanceH);

/**
 * Keep-out distance, m: safetyFactor × the larger of the breakdown gap and the arc reach (either
 * may be missing), and which of the two set it; null when both are missing.
 * Example: keepOutDistance(0.6, 0.4) = { keepOutM: 1.2, setBy: 'breakdown-gap' }.
 */
export function keepOutDistance(
  gapM: number | null,
  arcM: number | null,
  safetyFactor = KEEP_OUT_SAFETY_FACTOR,
): { keepOutM: number; setBy: 'breakdown-gap' | 'arc-reach' } | null {
  if (gapM === null && arcM === null) return null;
  if (arcM === null || (gapM !== null && gapM >= arcM)) return { keepOutM: safetyFactor * gapM!, setBy: 'breakdown-gap' };
  return { keepOutM: safetyFactor * arcM, setBy: 'arc-reach' };
}

/**
 * Empirical arc length from MEAN input power, m: length[in] ≈ 1.7·√(P_in[W]), i.e. 4.32 cm·√W —
 * J. Freau's rule, circulated among coil builders (Tesla Coil Mailing List, c. 2000–2005
 * [recalled]), fitted to spark-gap coils whose input power is a wall-plug average; applying it to
 * solid-state or audio-modulated drive is an extrapolation. The power is the average drawn over
 * seconds, not the peak during a burst. Example (the rule's own worked value): arcReachM(100) =
 * 17 in = 0.432 m.
 */
export const arcReachM = (meanInputPowerW: number): number => ARC_REACH_M_PER_SQRT_W * Math.sqrt(meanInputPowerW);

/** Cautions every coil report carries, in plain words. */
export const COIL_CAUTIONS: readonly string[] = [
  'High voltage and RF burns can injure or kill: never touch the coil, its arcs or the driver while powered, and discharge capacitors before handling.',
  'Arcs can reach farther than any estimate here; keep people, pets and electronics beyond the keep-out distance and use an interlock.',
  'Arcs make ozone and nitrogen oxides: run only in a ventilated space.',
  'The coil radiates RF that can interfere with radio services and nearby equipment; radio rules in your country apply.',
  'Arcs ignite paper, curtains, dust and solvents: keep flammables away and have an extinguisher at hand.',
  'Sound from arcs is loud and impulsive: protect your hearing.',
  'Follow local electrical codes and licensed practice; a ground connection that carries RF current is part of the design.',
];
