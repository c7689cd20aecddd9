/**
 * The secondary's wire: length, DC resistance with temperature, skin depth and the AC resistance
 * of an isolated round wire (Bessel-function solution). Copper constants from ../constants.ts.
 */
import { COPPER_RESISTIVITY_20C_OHM_M, COPPER_TEMP_COEFF_20C_PER_K, MU0_H_PER_M } from '../constants.ts';

/**
 * Length of a single-layer helical winding: N·√((πD)² + p²), p = l/N the pitch (the developed
 * helix: each turn is the hypotenuse of circumference πD and rise p). Geometry, exact for a helix.
 * D is the diameter through the wire centres (former diameter + wire diameter).
 * Example: helicalWireLengthM(0.1, 0.3, 1000) = 314.16 m.
 */
export function helicalWireLengthM(meanDiameterM: number, windingLengthM: number, turns: number): number {
  const pitchM = windingLengthM / turns;
  return turns * Math.hypot(Math.PI * meanDiameterM, pitchM);
}

/**
 * Copper resistivity at a temperature: ρ(T) = ρ20·(1 + α20·(T − 20 °C)), ρ20 = 1.7241e-8 Ω·m,
 * α20 = 0.00393 /K (IEC 60028, annealed copper, 100 % IACS). Linear: good to about 1 % from
 * −50 °C to 150 °C (common practice).
 * Example: copperResistivityOhmM(20) = 1.7241e-8.
 */
export function copperResistivityOhmM(temperatureC: number): number {
  return COPPER_RESISTIVITY_20C_OHM_M * (1 + COPPER_TEMP_COEFF_20C_PER_K * (temperatureC - 20));
}

/**
 * DC resistance of a round copper wire: R = ρ(T)·len/(π d²/4).
 * Example: 1 m of 1.128 mm wire (1 mm²) at 20 °C → 17.24 mΩ.
 */
export function copperDcResistanceOhm(lengthM: number, wireDiameterM: number, temperatureC = 20): number {
  return (copperResistivityOhmM(temperatureC) * lengthM) / ((Math.PI * wireDiameterM * wireDiameterM) / 4);
}

/**
 * Skin depth δ = √(ρ/(π f μ0 μr)) in m (plane-wave penetration depth, any EM textbook, e.g.
 * Ramo, Whinnery & Van Duzer, *Fields and Waves in Communication Electronics*, §5.4).
 * Example: copper at 20 °C, 1 MHz → 66.1 µm.
 */
export function skinDepthM(resistivityOhmM: number, frequencyHz: number, relativePermeability = 1): number {
  return Math.sqrt(resistivityOhmM / (Math.PI * frequencyHz * MU0_H_PER_M * relativePermeability));
}

/**
 * AC-to-DC resistance ratio of an ISOLATED straight round wire of radius r at skin depth δ, from the
 * exact Bessel-function solution for the internal impedance (Ramo, Whinnery & Van Duzer §5.12;
 * S. Ramo et al.; H. B. Dwight, *Electrical Coils and Conductors*, 1945):
 *   Z/R_dc = (w/2)·J0(w)/J1(w),  w = (1 − j)·r/δ,   R_ac/R_dc = Re(Z/R_dc).
 * J1/J0 is evaluated by its continued fraction J_ν/J_{ν−1} = 1/(2ν/w − J_{ν+1}/J_ν), summed
 * backward from depth |w| + 60 (J is the minimal solution in ν, so this is stable); for r/δ > 1000
 * the asymptotic r/(2δ) + 1/4 + 3δ/(32r) (relative error < 1e-13 there) is used.
 * Limits: r/δ → 0 gives 1 + (r/δ)⁴/48; r/δ ≫ 1 gives the thin-skin r/(2δ) + 1/4.
 * Neglects the proximity effect of neighbouring turns, which in a close-wound single-layer
 * solenoid raises the resistance further (Medhurst, Wireless Engineer 1947): a lower bound on R.
 * Example: roundWireAcResistanceRatio(1, 1) = 1.02049 (r = δ); (10, 1) = 5.25930.
 */
export function roundWireAcResistanceRatio(radiusM: number, skinDepth: number): number {
  const s = radiusM / skinDepth;
  if (s > 1000) return s / 2 + 0.25 + 3 / (32 * s);
  // w = (1 − j)s; 2ν/w = ν(1 + j)/s. h = J_ν/J_{ν−1} as a complex pair (hr, hi).
  const depth = Math.ceil(Math.SQRT2 * s) + 60;
  let hr = 0;
  let hi = 0;
  for (let nu = depth; nu >= 1; nu--) {
    const dr = nu / s - hr;
    const di = nu / s - hi;
    const d2 = dr * dr + di * di;
    hr = dr / d2;
    hi = -di / d2;
  }
  // Z/R_dc = w/(2h), w = s − js
  const h2 = hr * hr + hi * hi;
  // (s − js)(hr − j hi)/(2|h|²): real part = s(hr − hi)/(2|h|²)
  return (s * (hr - hi)) / (2 * h2);
}
