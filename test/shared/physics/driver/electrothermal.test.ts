import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { DeviceRun, frameLossAtW } from '../../../../shared/physics/driver/device-run.ts';
import { solveElectrothermal, steadyJunctionC, steadyLoopGain } from '../../../../shared/physics/driver/electrothermal.ts';
import { emptyLossParts, railThirdMomentBoundV3 } from '../../../../shared/physics/driver/losses.ts';
import { DEMO_DRIVER_LINEAR } from '../../../../shared/demo/drivers.ts';

describe('solveElectrothermal', () => {
  it('equals the limit of fixed-point iteration P ← a(1 + α(T_free + h·P − 25)) + b when the loop gain is below 1', () => {
    // Banach fixed point of an affine contraction (common practice); 200 iterations at gain ≤ 0.9
    // leave 0.9^200 ≈ 7e-10 of the start error. Tolerance 1e-8 relative.
    fc.assert(
      fc.property(
        fc.double({ min: 0, max: 50, noNaN: true }),
        fc.double({ min: 0, max: 50, noNaN: true }),
        fc.double({ min: 0, max: 0.015, noNaN: true }),
        fc.double({ min: -20, max: 140, noNaN: true }),
        fc.double({ min: 0, max: 3, noNaN: true }),
        (a, b, alpha, tFree, h) => {
          fc.pre(a * alpha * h < 0.9);
          const s = solveElectrothermal(a, b, alpha, tFree, h, 1e6);
          let p = a + b;
          for (let i = 0; i < 200; i++) p = a * (1 + alpha * (tFree + h * p - 25)) + b;
          expect(Math.abs(s.powerW - p)).toBeLessThan(1e-8 * Math.max(1, p));
          expect(Math.abs(s.meanJunctionC - (tFree + h * s.powerW))).toBeLessThan(1e-9 * Math.max(1, Math.abs(s.meanJunctionC)));
          expect(s.runaway).toBe(false);
        },
      ),
      { numRuns: 300 },
    );
  });

  it('makes the Rds(on) feedback raise the loss above the 25 °C figure once the junction is warmer', () => {
    // Positive temperature coefficient of silicon MOSFET on-resistance (it roughly doubles from 300 K to
    // 423 K: B. J. Baliga, Fundamentals of Power Semiconductor Devices, 2008, ch. 6 [recalled]); with α = 0.007/K and a 60 °C junction the I²R part is 1.245× higher.
    const cold = solveElectrothermal(10, 2, 0, 60, 0, 150);
    const hot = solveElectrothermal(10, 2, 0.007, 60, 0, 150);
    expect(cold.powerW).toBeCloseTo(12, 12);
    expect(hot.powerW).toBeCloseTo(10 * 1.245 + 2, 12);
    const coupled = solveElectrothermal(10, 2, 0.007, 40, 2, 150);
    // Self-heating: above the loss at T_free = 40 °C (13.05 W); closed form (13.05)/(1 − 0.14) = 15.174 W.
    expect(coupled.powerW).toBeGreaterThan(13.05);
    expect(coupled.powerW).toBeCloseTo(13.05 / 0.86, 10);
  });

  it('reports runaway when no fixed point exists or it lies above Tj max', () => {
    expect(solveElectrothermal(100, 0, 0.01, 25, 1, 150).runaway).toBe(true); // loop gain 1
    const hotFix = solveElectrothermal(10, 0, 0.01, 140, 1, 150); // P = 10·2.15/0.9 → T̄ = 163.9 °C
    expect(hotFix.runaway).toBe(true);
    expect(hotFix.meanJunctionC).toBeCloseTo(140 + (10 * 2.15) / 0.9, 10);
    expect(solveElectrothermal(10, 0, 0.01, 25, 1, 150).runaway).toBe(false);
  });
});

describe('steadyJunctionC', () => {
  it('solves T = T_amb + R·(a(1 + α(T − 25)) + b) and diverges at loop gain 1', () => {
    const t = steadyJunctionC(10, 3, 0.007, 2.5, 30);
    expect(Math.abs(t - (30 + 2.5 * (10 * (1 + 0.007 * (t - 25)) + 3)))).toBeLessThan(1e-10);
    expect(steadyLoopGain(10, 0.007, 2.5)).toBeCloseTo(0.175, 14);
    expect(steadyJunctionC(40, 0, 0.01, 2.5, 25)).toBe(Infinity);
  });
});

describe('DeviceRun.runFrames', () => {
  it('gives the same losses, temperatures and statistics as solve + advance frame by frame', () => {
    // The fused hot loop must equal the reference path (same formulas): tolerance 1e-12 relative.
    const dev = DEMO_DRIVER_LINEAR.devices[0];
    const n = 3000;
    const vs = 48;
    const meanV = new Float64Array(n);
    const ms = new Float64Array(n);
    for (let i = 0; i < n; i++) {
      meanV[i] = vs * (0.5 + 0.45 * Math.sin(i / 40));
      ms[i] = meanV[i] ** 2 * (1 + 0.1 * Math.abs(Math.sin(i / 3)));
    }
    const model = { supplyV: vs, rS: 0.002, r3: 3e-5, oM: 0.05, oS: 0.001, oC: 0.3 };
    const a = new DeviceRun('bridge', 2, dev, 25, 30, undefined);
    const b = new DeviceRun('bridge', 2, dev, 25, 30, undefined);
    const lossA = new Float64Array(n);
    a.runFrames(model, meanV, ms, 1e-3, lossA);
    const c = b.net.coefficients(1e-3);
    const parts = emptyLossParts();
    let worst = 0;
    for (let i = 0; i < n; i++) {
      const m = Math.min(Math.max(meanV[i], 0), vs);
      const s = Math.min(Math.max(ms[i], m * m), vs * m);
      parts.resistiveAt25W = model.rS * s + model.r3 * railThirdMomentBoundV3(m, s, vs);
      parts.conductionFixedW = model.oM * m + model.oS * s + (m > 0 ? model.oC : 0);
      const p = b.solve(parts, c, i * 1e-3);
      b.advance(p, c, (i + 1) * 1e-3);
      worst = Math.max(worst, Math.abs(lossA[i] / p - 1));
    }
    expect(worst).toBeLessThan(1e-12);
    expect(Math.abs(a.junctionC() / b.junctionC() - 1)).toBeLessThan(1e-12);
    expect(Math.abs(a.peakC / b.peakC - 1)).toBeLessThan(1e-12);
    expect(a.peakAtS).toBeCloseTo(b.peakAtS, 12);
    expect(Math.abs(a.aboveWarnS - b.aboveWarnS)).toBeLessThan(1e-9);
    expect(a.aboveWarnS).toBeGreaterThan(0);
    expect(Math.abs(a.energyJ / b.energyJ - 1)).toBeLessThan(1e-12);
  });

  it("counts the untapered part oN·m (a bipolar modulator's base drive) and the taper, as frameLossAtW does", () => {
    // Reference: frameLossAtW (the per-frame model written out term by term) at the temperature the
    // fused loop solved for; the loop's loss must satisfy p = a·(1 + α(Tj_free + h·p − 25)) + b,
    // which with α = 0 is p = frameLossAtW(…) exactly.
    const dev = { ...DEMO_DRIVER_LINEAR.devices[0], rdsOnTempCoeffPerK: 0 };
    const n = 400;
    const vs = 48;
    const meanV = new Float64Array(n);
    const ms = new Float64Array(n);
    for (let i = 0; i < n; i++) {
      meanV[i] = vs * (0.5 + 0.5 * Math.sin(i / 25)); // reaches V_s, where the taper stops switching
      ms[i] = Math.min(meanV[i] ** 2 * 1.05, vs * meanV[i]);
    }
    const model = { supplyV: vs, rS: 0.002, r3: 0, oM: 0.05, oS: 0.001, oC: 0.3, oN: 0.02, taperV: 2 };
    const run = new DeviceRun('modulator', 1, dev, 25, undefined, undefined);
    const loss = new Float64Array(n);
    run.runFrames(model, meanV, ms, 1e-3, loss);
    let worst = 0;
    for (let i = 0; i < n; i++) worst = Math.max(worst, Math.abs(loss[i] - frameLossAtW(model, meanV[i], ms[i], 0, 25)));
    expect(worst).toBeLessThan(1e-12);
    // Without oN the losses are lower by exactly oN·m per frame.
    const run0 = new DeviceRun('modulator', 1, dev, 25, undefined, undefined);
    const loss0 = new Float64Array(n);
    run0.runFrames({ ...model, oN: 0 }, meanV, ms, 1e-3, loss0);
    expect(loss[10] - loss0[10]).toBeCloseTo(0.02 * Math.min(meanV[10], vs), 12);
  });
});
