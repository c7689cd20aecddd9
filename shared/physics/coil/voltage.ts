/**
 * Upper bounds on top voltage, the air clearance they imply, the empirical arc reach, and the
 * cautions every coil report carries. These are bounds and rules of thumb for keeping people and
 * things away, never a promise that a distance is safe.
 */

/**
 * Dielectric strength of dry air, V/m: ≈ 3 MV/m (3 kV/mm) for uniform fields at sea level
 * (American Meteorological Society, *Glossary of Meteorology*, "dielectric strength"). Sharp edges
 * start corona far lower; metre-scale gaps break down near 0.6 MV/m average.
 */
export const AIR_BREAKDOWN_V_PER_M = 3e6;

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
 * Gap that `voltageV` would just break down in a uniform field of dry air, m: V/(3 MV/m).
 * Example: airBreakdownGapM(300e3) = 0.1 m.
 */
export const airBreakdownGapM = (voltageV: number, breakdownVPerM = AIR_BREAKDOWN_V_PER_M): number => voltageV / breakdownVPerM;

/**
 * Empirical arc length from input power, m: length[in] ≈ 1.7·√(input W), i.e. 4.32 cm·√W (the rule
 * circulated among coil builders, 2005, fitted to spark-gap coils; applying it to solid-state or
 * audio-modulated drive is an extrapolation). Example: arcReachM(100) = 0.432 m.
 */
export const arcReachM = (inputPowerW: number): number => ARC_REACH_M_PER_SQRT_W * Math.sqrt(inputPowerW);

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
