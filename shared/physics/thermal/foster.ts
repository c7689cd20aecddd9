/**
 * Foster thermal networks: the form vendors publish transient thermal impedance in.
 *
 * A Foster network is a series chain of parallel RC cells, Zth(t) = Σ Rᵢ(1 − e^(−t/τᵢ)),
 * τᵢ = RᵢCᵢ (NXP AN11261 "Using RC Thermal Models", 2013; Infineon AN2008-03 "Thermal equivalent
 * circuit models"). Its internal nodes are not physical, so a Foster set must not be chained with
 * other thermal elements directly (convert to Cauer first: ./cauer.ts); the functions here are for
 * a junction-to-reference response with the reference held at a fixed temperature.
 */

/** One parallel RC cell of a Foster network: Rᵢ in K/W, τᵢ = RᵢCᵢ in s. */
export interface FosterStage {
  rKPerW: number;
  tauS: number;
}

/**
 * Sum of the Foster resistances ΣRᵢ in K/W: the steady-state thermal resistance, Zth(∞).
 *
 * @example totalResistanceKPerW([{ rKPerW: 1, tauS: 1 }, { rKPerW: 0.5, tauS: 0.1 }]) // → 1.5
 */
export function totalResistanceKPerW(stages: readonly FosterStage[]): number {
  let s = 0;
  for (const st of stages) s += st.rKPerW;
  return s;
}

/**
 * Single-pulse transient thermal impedance of a Foster network in K/W at time t ≥ 0 after a step
 * of power: Zth(t) = Σ Rᵢ(1 − e^(−t/τᵢ)) (NXP AN11261; Infineon AN2008-03). The junction
 * rise for a constant power P from rest is P·Zth(t). t ≤ 0 gives 0; t = ∞ gives ΣRᵢ.
 * Uses −expm1(−t/τ) so very short times keep full relative precision.
 *
 * @example fosterZthKPerW([{ rKPerW: 2, tauS: 0.01 }], 0.01) // → 2·(1 − e⁻¹) = 1.264241 K/W
 */
export function fosterZthKPerW(stages: readonly FosterStage[], tS: number): number {
  if (!(tS > 0)) return 0;
  let z = 0;
  for (const st of stages) z += st.rKPerW * -Math.expm1(-tS / st.tauS);
  return z;
}

/**
 * Exact update of a Foster network's cell rises θᵢ (K) over an interval Δt (s) of constant power
 * P (W): θᵢ ← θᵢ·e^(−Δt/τᵢ) + Rᵢ·P·(1 − e^(−Δt/τᵢ)) (zero-order hold; exact for piecewise-constant
 * power; NXP AN11261). Updates `rises` in place and returns the junction rise Σθᵢ in K.
 * Valid only with the reference (case) at a fixed temperature — see the module note.
 *
 * @example const th = new Float64Array(1); fosterStep([{ rKPerW: 2, tauS: 0.01 }], th, 50, 0.01) // → 63.2121 K
 */
export function fosterStep(stages: readonly FosterStage[], rises: Float64Array, powerW: number, dtS: number): number {
  let sum = 0;
  for (let i = 0; i < stages.length; i++) {
    const g = -Math.expm1(-dtS / stages[i].tauS);
    rises[i] = rises[i] * (1 - g) + stages[i].rKPerW * powerW * g;
    sum += rises[i];
  }
  return sum;
}

/**
 * Peak junction rise per watt (K/W) in the periodic steady state of rectangular power pulses of
 * width tp every period T (tp ≤ T), from the exact superposition of the Foster response:
 * ΔT/P = Σ Rᵢ(1 − e^(−tp/τᵢ))/(1 − e^(−T/τᵢ)). The geometric series of all earlier pulses sums
 * in closed form per cell (NXP AN11261 and Infineon AN2008-03 treat repetitive pulses by
 * superposition; this closed form is the exact limit). Reached at the end of each pulse.
 * tp ≥ T gives ΣRᵢ (continuous power).
 *
 * @example fosterPeriodicPeakKPerW([{ rKPerW: 1, tauS: 1 }], 0.5, 1) // → (1 − e^−0.5)/(1 − e^−1) = 0.622459
 */
export function fosterPeriodicPeakKPerW(stages: readonly FosterStage[], pulseS: number, periodS: number): number {
  if (!(pulseS > 0)) return 0;
  if (pulseS >= periodS) return totalResistanceKPerW(stages);
  let z = 0;
  for (const st of stages) z += (st.rKPerW * Math.expm1(-pulseS / st.tauS)) / Math.expm1(-periodS / st.tauS);
  return z;
}
