/**
 * Steady idle (shared/plan/idle.ts): the rail at half the supply with no music, per device the loss,
 * the junction temperature it settles at, and how long idling from cold takes to reach the limit.
 * Checked against hand values: a linear pass device dissipates g·V_s²/4 (textbook linear-regulator
 * dissipation at V_s/2), the settled junction satisfies T = T_amb + R_th(j-a)·P(T) (the steady state
 * of a series thermal path), and a sink with heat capacity C behind R_sa warms with τ = R_sa·C.
 */
import { describe, expect, it } from 'vitest';
import { DEMO_DRIVER_BUCK, DEMO_DRIVER_PULSE } from '../../../shared/demo/drivers.ts';
import { planSettings } from '../../../shared/plan/evaluate.ts';
import { idleFigures, idleWarning } from '../../../shared/plan/idle.ts';
import { COIL, halfBridgeI2rW, linearDriver, mosfet } from './fixtures.ts';

const G = 3 / 48; // A/V: the fixtures' linear driver, 3 A at a full 48 V rail
const PASS_IDLE_W = (G * 48 * 48) / 4; // 36 W

/** Bridge on 3 K/W; pass device on one cell (0.5 K/W, 4 ms) and a 100 J/K sink with 7 K/W to ambient. */
const slowSinkDriver = () =>
  linearDriver(
    mosfet('bridge', { rKPerW: 1, tauS: 0.01, sinkToAmbientKPerW: 2 }),
    mosfet('pass', { rKPerW: 0.5, tauS: 0.004, sinkToAmbientKPerW: 7, sinkHeatCapacityJPerK: 100 }),
  );

/**
 * Rise of the junction over ambient of a two-node ladder from cold: P into node 1 (C₁), R₁ to node
 * 2 (C₂), R₂ to ambient. x' = A·x + b with A = [[−1/(R₁C₁), 1/(R₁C₁)], [1/(R₁C₂), −(1/R₁ + 1/R₂)/C₂]],
 * b = [P/C₁, 0]; x(t) = x∞ + Σ cᵢ·vᵢ·e^(λᵢt) with x(0) = 0. Returns the time the junction's rise
 * reaches `riseK`, by bisection.
 */
function ladderCrossingS(pW: number, n: { r1: number; c1: number; r2: number; c2: number }, riseK: number): number {
  const a11 = -1 / (n.r1 * n.c1);
  const a12 = 1 / (n.r1 * n.c1);
  const a21 = 1 / (n.r1 * n.c2);
  const a22 = -(1 / n.r1 + 1 / n.r2) / n.c2;
  const tr = a11 + a22;
  const det = a11 * a22 - a12 * a21;
  const disc = Math.sqrt(tr * tr - 4 * det);
  const lambdas = [(tr + disc) / 2, (tr - disc) / 2];
  // Eigenvector of λ: (a12, λ − a11). Steady state: x₂ = P·R₂, x₁ = x₂ + P·R₁.
  const xs = [pW * (n.r1 + n.r2), pW * n.r2];
  const v = lambdas.map((l) => [a12, l - a11]);
  // c₁v₁ + c₂v₂ = −x∞ (Cramer's rule).
  const dv = v[0][0] * v[1][1] - v[1][0] * v[0][1];
  const c1 = (-xs[0] * v[1][1] + xs[1] * v[1][0]) / dv;
  const c2 = (-xs[1] * v[0][0] + xs[0] * v[0][1]) / dv;
  const rise = (t: number) => xs[0] + c1 * v[0][0] * Math.exp(lambdas[0] * t) + c2 * v[1][0] * Math.exp(lambdas[1] * t);
  let lo = 0;
  let hi = 3600;
  for (let i = 0; i < 200; i++) {
    const mid = (lo + hi) / 2;
    if (rise(mid) < riseK) lo = mid;
    else hi = mid;
  }
  return lo;
}

describe('idleFigures', () => {
  it('gives a linear pass device g·V_s²/4, its settled junction, and when a slow sink brings it to the limit', () => {
    // Pass: one cell (0.5 K/W, 4 ms: C₁ = 0.008 J/K at the junction), then a sink of C₂ = 100 J/K
    // with 7 K/W to ambient. Settled: 25 + 36·7.5 = 295 °C, above 150 − 25 = 125 °C. From cold the
    // two-node ladder is solved here in closed form (eigenvalues of its 2×2 system) and the
    // crossing of 125 °C found by bisection: ≈ 275.57 s, about −700·ln(1 − 82/252) = 275.54 s plus
    // the junction cell's own share of the heat. The model reads it off 0.5 s frames (float32
    // temperatures, linear interpolation): within 0.005 s.
    const d = slowSinkDriver();
    const [b, p] = idleFigures(d, COIL, planSettings(d));
    expect(p.role).toBe('pass');
    expect(p.railV).toBe(24);
    expect(p.lossW).toBeCloseTo(PASS_IDLE_W, 12);
    expect(p.steadyJunctionC).toBeCloseTo(25 + PASS_IDLE_W * 7.5, 9);
    expect(p.limitC).toBe(125);
    const expectedS = ladderCrossingS(PASS_IDLE_W, { r1: 0.5, c1: 0.004 / 0.5, r2: 7, c2: 100 }, 100);
    expect(expectedS).toBeGreaterThan(275.5);
    expect(expectedS).toBeLessThan(275.6);
    expect(Math.abs(p.reachesLimitAfterS! - expectedS)).toBeLessThan(0.005);
    // Bridge at E[v²] = V_s²/4 = 576 V²: (π/2)²·R·g²·576 = 0.555 W on 3 K/W, far below its limit.
    expect(b.role).toBe('bridge');
    expect(b.lossW).toBeCloseTo(halfBridgeI2rW(0.1, G, 576), 12);
    expect(b.steadyJunctionC).toBeCloseTo(25 + 3 * halfBridgeI2rW(0.1, G, 576), 9);
    expect(b.reachesLimitAfterS).toBeNull();
  });

  it('reads the limit with the plan margin and the ambient of the settings', () => {
    const bridge = mosfet('bridge', { rKPerW: 1, tauS: 0.01, sinkToAmbientKPerW: 2 });
    const pass = mosfet('pass', { rKPerW: 0.5, tauS: 0.004, sinkToAmbientKPerW: 1 });
    const d = linearDriver(bridge, pass);
    // 36 W on 1.5 K/W: 54 K above a 40 °C ambient = 94 °C, under 150 − 10 = 140 °C.
    const [, p] = idleFigures(d, COIL, planSettings(d, { marginK: 10, ambientC: 40 }));
    expect(p.limitC).toBe(140);
    expect(p.steadyJunctionC).toBeCloseTo(94, 9);
    expect(p.reachesLimitAfterS).toBeNull();
    // With a 70 K margin the same device is over its 80 °C limit at once: its single cell holds
    // almost no heat, so it gets there within the first half-second frame.
    const [, hot] = idleFigures(d, COIL, planSettings(d, { marginK: 70, ambientC: 40 }));
    expect(hot.limitC).toBe(80);
    expect(hot.reachesLimitAfterS).toBeGreaterThan(0);
    expect(hot.reachesLimitAfterS).toBeLessThan(0.5);
  });

  it('settles an Rds(on) that grows with temperature at its electrothermal fixed point', () => {
    // Demo buck modulator at half rail (80 V), hand values as in report.test.ts: conduction at 25 °C
    // R·g²·v³/V_s = 0.1·(4/160)²·80³/160 = 0.2 W, growing by 0.8 %/K; switching ½·V_s·g·v·(t_r+t_f)·f
    // = 0.96 W and C_oss ½·C·V_s²·f = 0.384 W. Thermal path 2.8 K/W, ambient 30 °C. The settled
    // junction is the T with T = 30 + 2.8·P(T): solving by hand, T = 34.2112/0.99552.
    const d = DEMO_DRIVER_BUCK;
    const figures = idleFigures(d, COIL, planSettings(d));
    expect(figures.map((f) => f.role)).toEqual(['bridge', 'modulator']);
    const mod = figures[1];
    const lossAt = (tC: number) => 0.2 * (1 + 0.008 * (tC - 25)) + 0.96 + 0.384;
    expect(mod.steadyJunctionC).toBeCloseTo(34.2112 / 0.99552, 9);
    expect(mod.steadyJunctionC).toBeCloseTo(30 + 2.8 * lossAt(mod.steadyJunctionC), 9);
    expect(mod.lossW).toBeCloseTo(lossAt(mod.steadyJunctionC), 9);
    expect(mod.railV).toBe(80);
    // The bridge: its own fixed point, with its own thermal path.
    const br = figures[0];
    const rBridge = 0.05 + 0.15 + 0.25 + 0.15 + 0.4 + 2.5;
    expect(br.steadyJunctionC).toBeCloseTo(30 + rBridge * br.lossW, 9);
    expect(br.lossW).toBeGreaterThan(0);
  });

  it('reports thermal runaway when the loop gain reaches 1, and still finds when the limit is crossed', () => {
    // Bridge of 1 Ω: I²R at idle (π/2)²·1·g²·576 = 5.55 W at 25 °C; α = 0.01/K on 20 K/W gives a
    // loop gain of 5.55·0.01·20 = 1.11 ≥ 1: no steady state.
    const bridge = mosfet('bridge', { rKPerW: 1, tauS: 0.01, sinkToAmbientKPerW: 19, sinkHeatCapacityJPerK: 1 }, { rdsOnOhm: 1, rdsOnTempCoeffPerK: 0.01 });
    const pass = mosfet('pass', { rKPerW: 0.5, tauS: 0.004, sinkToAmbientKPerW: 1 });
    const d = linearDriver(bridge, pass);
    const [b] = idleFigures(d, COIL, planSettings(d));
    expect(b.steadyJunctionC).toBe(Infinity);
    expect(b.lossW).toBe(Infinity);
    expect(b.reachesLimitAfterS).toBeGreaterThan(0);
    expect(Number.isFinite(b.reachesLimitAfterS)).toBe(true);
    expect(idleWarning(b)).toMatch(/^bridge switch: idling .* it runs away thermally, above its 125 °C limit, which it reaches after \d+ s of idling from cold\./);
  });

  it('gives nothing for the pulse scheme, which sends no pulses when idle', () => {
    expect(idleFigures(DEMO_DRIVER_PULSE, COIL, planSettings(DEMO_DRIVER_PULSE))).toEqual([]);
  });
});

describe('idleWarning', () => {
  it('words the hot device with its figures, and says nothing of a cool one', () => {
    const d = slowSinkDriver();
    const [b, p] = idleFigures(d, COIL, planSettings(d));
    expect(idleWarning(b)).toBe('');
    expect(idleWarning(p)).toBe(
      'pass device: idling (supply on, no music: rail at 24.0 V, 36.00 W) it settles at 295 °C, above its 125 °C limit, ' +
        'which it reaches after 276 s of idling from cold. The plan starts from ambient: switch the supply off between clips, or improve the cooling.',
    );
    // No crossing found within the search: the sentence leaves the time out.
    expect(idleWarning({ ...p, reachesLimitAfterS: null })).toBe(
      'pass device: idling (supply on, no music: rail at 24.0 V, 36.00 W) it settles at 295 °C, above its 125 °C limit. ' +
        'The plan starts from ambient: switch the supply off between clips, or improve the cooling.',
    );
    // Exactly at the limit is not above it.
    expect(idleWarning({ ...p, steadyJunctionC: p.limitC })).toBe('');
  });
});
