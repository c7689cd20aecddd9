/**
 * Physical constants used by the physics models, SI units, each with its source.
 * Exact SI-defined constants are exact; measured ones carry their CODATA 2018 recommended value.
 */

/**
 * Vacuum magnetic permeability μ0 in H/m (N/A²). CODATA 2018 recommended value
 * 1.25663706212(19)e-6 (since the 2019 SI redefinition it is measured, 4π·1e-7 to 1e-10).
 * Example: the inductance of a 1 m current sheet of 1 turn/m and 1 m² area is μ0.
 */
export const MU0_H_PER_M = 1.25663706212e-6;

/**
 * Vacuum electric permittivity ε0 in F/m. CODATA 2018 recommended value 8.8541878128(13)e-12.
 * Example: an isolated sphere of radius 1 m has C = 4πε0 = 111.265 pF.
 */
export const EPS0_F_PER_M = 8.8541878128e-12;

/**
 * Resistivity of annealed copper at 20 °C in Ω·m: 1.7241e-8 (the 100 % IACS standard,
 * 58.0 MS/m, IEC 60028). Example: 1 m of 1 mm² copper is 17.241 mΩ.
 */
export const COPPER_RESISTIVITY_20C_OHM_M = 1.7241e-8;

/**
 * Temperature coefficient of resistance of annealed copper referred to 20 °C, 1/K: 0.00393
 * (IEC 60028 gives 0.00393 for 100 % IACS copper). ρ(T) = ρ20·(1 + α20·(T − 20 °C)).
 * Example: at 60 °C copper resists 15.7 % more than at 20 °C.
 */
export const COPPER_TEMP_COEFF_20C_PER_K = 0.00393;
