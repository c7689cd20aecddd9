/**
 * Electrothermal coupling of one switch: its loss depends on its junction temperature through
 * Rds(on)(Tj) = Rds(25 °C)·(1 + α(Tj − 25)) (a linear fit of the datasheet's normalised
 * Rds(on)-vs-Tj curve; Graovac, Pürschel & Kiep, Infineon 2006 [recalled]), and its junction
 * temperature depends on the loss through the thermal network.
 *
 * Per interval of held power (a frame or a pulse) the fixed point is solved in closed form. The
 * loss uses the junction temperature AVERAGED over the interval — with a loss linear in Tj this
 * makes the interval's energy consistent with the temperature it produces. Both maps are affine:
 *   P = a·(1 + α(T̄ − 25)) + b,   T̄ = T_free + h·P
 * (a = I²R part at 25 °C, b = the rest, T_free = interval-mean junction temperature with no power,
 * h = interval-mean rise per watt, ./../thermal/network.ts), so
 *   P* = (a·(1 + α(T_free − 25)) + b) / (1 − a·α·h)   when the loop gain a·α·h < 1.
 * Thermal runaway: no fixed point (a·α·h ≥ 1), or the fixed point's junction temperature is above
 * Tj max (the device would pass its rating before the loss settles). The interval's power is then
 * evaluated at Tj max (a lower bound: figures after runaway only show that it happened).
 */

/** Result of {@link solveElectrothermal}. */
export interface ElectrothermalSolution {
  /** Interval-average loss in W. */
  powerW: number;
  /** Interval-average junction temperature in °C at that loss. */
  meanJunctionC: number;
  /** True when no fixed point exists below Tj max. */
  runaway: boolean;
}

/**
 * Closed-form fixed point of loss and junction temperature over one interval (see the module
 * note). `resistiveAt25W` (a) scales with 1 + α(Tj − 25); `otherW` (b) does not; `freeMeanJunctionC`
 * is the interval-mean junction temperature without power (°C); `meanRisePerW` (K/W) the
 * interval-mean rise per watt from rest. Pass `out` to avoid allocation in loops.
 *
 * @example solveElectrothermal(10, 0, 0.01, 25, 2, 150) // → P = 10/(1 − 0.2) = 12.5 W, T̄ = 50 °C
 */
export function solveElectrothermal(
  resistiveAt25W: number,
  otherW: number,
  tempCoeffPerK: number,
  freeMeanJunctionC: number,
  meanRisePerW: number,
  tjMaxC: number,
  out?: ElectrothermalSolution,
): ElectrothermalSolution {
  const o = out ?? { powerW: 0, meanJunctionC: 0, runaway: false };
  const loop = resistiveAt25W * tempCoeffPerK * meanRisePerW;
  if (loop < 1) {
    const p = (resistiveAt25W * (1 + tempCoeffPerK * (freeMeanJunctionC - 25)) + otherW) / (1 - loop);
    o.powerW = p;
    o.meanJunctionC = freeMeanJunctionC + meanRisePerW * p;
    o.runaway = o.meanJunctionC > tjMaxC;
  } else {
    o.powerW = resistiveAt25W * (1 + tempCoeffPerK * (tjMaxC - 25)) + otherW;
    o.meanJunctionC = freeMeanJunctionC + meanRisePerW * o.powerW;
    o.runaway = true;
  }
  return o;
}

/**
 * Steady-state electrothermal loop gain a·α·R_th for a held I²R loss a (W at 25 °C): below 1 a
 * steady junction temperature exists, T = T_amb + R_th·(a(1 + α(T − 25)) + b)/(…); at or above 1
 * the temperature grows without bound (thermal runaway of a positive-coefficient device).
 *
 * @example steadyLoopGain(10, 0.007, 2) // → 0.14
 */
export function steadyLoopGain(resistiveAt25W: number, tempCoeffPerK: number, totalRKPerW: number): number {
  return resistiveAt25W * tempCoeffPerK * totalRKPerW;
}

/**
 * Steady junction temperature in °C of a switch holding the loss a·(1 + α(T − 25)) + b on a
 * junction-to-ambient resistance R: T = (T_amb + R·(a(1 − 25α) + b)) / (1 − aαR); Infinity when
 * the loop gain aαR ≥ 1.
 *
 * @example steadyJunctionC(10, 0, 0.01, 2, 25) // → 50 °C (loss 12.5 W: 25 + 2·12.5)
 */
export function steadyJunctionC(resistiveAt25W: number, otherW: number, tempCoeffPerK: number, totalRKPerW: number, ambientC: number): number {
  const loop = steadyLoopGain(resistiveAt25W, tempCoeffPerK, totalRKPerW);
  if (loop >= 1) return Infinity;
  return (ambientC + totalRKPerW * (resistiveAt25W * (1 - 25 * tempCoeffPerK) + otherW)) / (1 - loop);
}
