import { describe, expect, it } from 'vitest';
import { DeviceRun, type FrameLossModel } from '../../../../shared/physics/driver/device-run.ts';
import type { DriverDevice } from '../../../../shared/schemas/driver.ts';

// The fused frame loop DeviceRun.runFrames against hand values and closed forms: the per-frame loss
// model term by term, thermal runaway (loop gain a·α·h ≥ 1, or a mean junction above Tj max), and
// the time above the warning temperature across crossings up and down.

/** One Foster cell R = 1 K/W, τ = 10 ms, straight to ambient; Tj max 150 °C. */
function device(tempCoeffPerK: number, tjMaxC = 150): DriverDevice {
  return {
    role: 'bridge',
    kind: 'mosfet',
    rdsOnOhm: 0.1,
    rdsOnTempCoeffPerK: tempCoeffPerK,
    vceSatV: null,
    riseTimeS: 0,
    fallTimeS: 0,
    outputCapacitanceF: 0,
    tjMaxC,
    thermal: { foster: [{ rKPerW: 1, tauS: 0.01 }], caseToSinkKPerW: 0, sinkToAmbientKPerW: 0, sinkHeatCapacityJPerK: 0 },
  };
}

/** Runs `model` over the frames (m, s) from rest at 25 °C; returns the run and the per-frame losses. */
function frames(dev: DriverDevice, model: FrameLossModel, rail: [number, number][], frameS: number, warnC?: number) {
  const run = new DeviceRun('bridge', 1, dev, 25, warnC, undefined);
  const loss = new Float64Array(rail.length);
  run.runFrames(model, Float64Array.from(rail, (r) => r[0]), Float64Array.from(rail, (r) => r[1]), frameS, loss);
  return { run, loss };
}

describe('DeviceRun.runFrames: the frame loss model', () => {
  // V_s = 10 V; a = rS·s + r3·E3(m, s), b = (oM·m + oC·[m > 0])·h(m) + oS·s + oN·m with
  // h(m) = min(1, (V_s − m)/taper), 0 at m = V_s. α = 0, so each frame's loss is a + b exactly.
  const model: FrameLossModel = { supplyV: 10, rS: 0.1, r3: 0.01, oM: 0.2, oS: 0.05, oC: 1, oN: 0.3, taperV: 4 };

  it('gives each frame the hand-worked loss, clamping (m, s) to the feasible set first', () => {
    const rail: [number, number][] = [
      [0, 0], // silence: no term
      [5, 25], // constant 5 V: E3 = 125; a = 2.5 + 1.25, b = (1 + 1)·1 + 1.25 + 1.5
      [5, 40], // varying: E3 bound 380 (y = 2); a = 4 + 3.8, b = 2 + 2 + 1.5
      [8, 0], // s below m² is raised to 64: E3 = 512; a = 6.4 + 5.12, h = 0.5: b = 2.6·0.5 + 3.2 + 2.4
      [10, 100], // full rail: E3 = 1000; h = 0: b = 5 + 3
      [12, 200], // above V_s: clamped to (10, 100)
      [-1, 5], // below 0: clamped to (0, 0)
    ];
    const { loss } = frames(device(0), model, rail, 1e-3);
    // Hand values, W; tolerance 1e-12 W (a few roundings of numbers near 10).
    const hand = [0, 8.5, 13.3, 18.42, 28, 28, 0];
    hand.forEach((w, i) => expect(Math.abs(loss[i] - w)).toBeLessThan(1e-12));
  });

  it('switches at full rail when the model has no taper, and counts oC only while the rail is up', () => {
    // No taper: h = 1 everywhere, so at m = V_s: a = 10 + 10, b = (2 + 1) + 5 + 3 = 11 (hand value).
    const { loss } = frames(device(0), { ...model, taperV: undefined }, [[10, 100], [0, 0], [1e-9, 1e-18]], 1e-3);
    expect(Math.abs(loss[0] - 31)).toBeLessThan(1e-12);
    expect(loss[1]).toBe(0);
    // A rail just above 0 switches: oC = 1 W is counted in full (the rest is ~1e-9 W).
    expect(Math.abs(loss[2] - 1)).toBeLessThan(1e-8);
  });
});

describe('DeviceRun.runFrames: thermal runaway', () => {
  // α = 0.01/K on R = 1 K/W, τ = 10 ms; over a 1 s frame the mean rise per watt from rest is
  // h = R·(1 − (τ/Δt)(1 − e^(−Δt/τ))) = 0.99 K/W (mean of a first-order RC step response, hand value).
  // rS = 2 W/V², V_s = 10 V: a full rail (s = 100) gives a = 200 W, loop gain 200·0.01·0.99 = 1.98.
  const model: FrameLossModel = { supplyV: 10, rS: 2, r3: 0, oM: 0, oS: 0.5, oC: 0 };

  it('records the first frame whose loop gain reaches 1, and holds the loss at its Tj max value', () => {
    const { run, loss } = frames(device(0.01), model, [[1, 1], [1, 1], [10, 100], [10, 100]], 1);
    expect(run.net.coefficients(1).meanRisePerW).toBeCloseTo(0.99, 12);
    expect(run.runawayAtS).toBe(2);
    expect(run.summary(4).runaway).toEqual({ atS: 2 });
    // In runaway the loss is a·(1 + α(Tj max − 25)) + b = 200·2.25 + 50 = 500 W (hand value).
    expect(Math.abs(loss[2] - 500)).toBeLessThan(1e-9);
    expect(Math.abs(loss[3] - 500)).toBeLessThan(1e-9);
    // The first frame settles: p = (a + b)/(1 − a·α·h) with a = 2, b = 0.5 from 25 °C (hand formula).
    expect(Math.abs(loss[0] - 2.5 / (1 - 2 * 0.01 * 0.99))).toBeLessThan(1e-9);
    // Energy: the sum of loss × frame length.
    expect(Math.abs(run.energyJ - (loss[0] + loss[1] + 1000))).toBeLessThan(1e-9);
  });

  it('keeps a runaway in the very first frame at t = 0', () => {
    const { run } = frames(device(0.01), model, [[10, 100], [10, 100]], 1);
    expect(run.runawayAtS).toBe(0);
  });

  it('keeps the first runaway by temperature, and times it in frames of any length', () => {
    // α = 0, Tj max 50 °C: 50 W gives a mean rise of h·50 W ≫ 25 K from the first frame (hand value),
    // so the first frame is the runaway, at t = 0, and the second does not move it.
    const hot = frames(device(0, 50), { supplyV: 10, rS: 0, r3: 0, oM: 0, oS: 0.5, oC: 0 }, [[10, 100], [10, 100]], 1).run;
    expect(hot.runawayAtS).toBe(0);
    // Half-second frames: loop gain 200·0.01·h(0.5 s) = 1.96 (h = 1 − 0.02 = 0.98 K/W): the third frame, at 1 s.
    const { run } = frames(device(0.01), model, [[1, 1], [1, 1], [10, 100]], 0.5);
    expect(run.runawayAtS).toBe(1);
  });

  it('keeps a runaway recorded before the frames', () => {
    const run = new DeviceRun('bridge', 1, device(0.01), 25, undefined, undefined);
    run.solve({ resistiveAt25W: 200, conductionFixedW: 0, switchingW: 0, capacitiveW: 0 }, run.net.coefficients(1), 0.5);
    run.runFrames(model, Float64Array.of(10, 10), Float64Array.of(100, 100), 1, new Float64Array(2));
    expect(run.runawayAtS).toBe(0.5);
  });

  it('counts a loop gain of exactly 1 as runaway', () => {
    // s = 1 makes a = rS exactly; pick rS with (rS·α)·h = 1 in floating point.
    const probe = new DeviceRun('bridge', 1, device(0.01), 25, undefined, undefined);
    const h = probe.net.coefficients(1).meanRisePerW;
    let rS = 1 / (0.01 * h);
    for (let k = 0; k < 8 && rS * 0.01 * h !== 1; k++) rS = rS * 0.01 * h > 1 ? rS * (1 - Number.EPSILON) : rS * (1 + Number.EPSILON);
    expect(rS * 0.01 * h).toBe(1);
    const { run, loss } = frames(device(0.01), { supplyV: 10, rS, r3: 0, oM: 0, oS: 0, oC: 0 }, [[1, 1]], 1);
    expect(run.runawayAtS).toBe(0);
    expect(Math.abs(loss[0] / (rS * 2.25) - 1)).toBeLessThan(1e-12);
  });

  it('flags a settled loss whose mean junction passes Tj max, but not one that only reaches it', () => {
    // α = 0 and rS = 0: p = oS·s = 50 W at a full rail, mean rise over a 1 s frame h·p = 49.5 K.
    const plain: FrameLossModel = { supplyV: 10, rS: 0, r3: 0, oM: 0, oS: 0.5, oC: 0 };
    const atMax = 25 + 0.99 * 50; // the frame's mean junction temperature, °C (hand value)
    const h = new DeviceRun('bridge', 1, device(0), 25, undefined, undefined).net.coefficients(1).meanRisePerW;
    const meanC = 25 + h * 50; // the same with the network's h, to the last bit
    expect(Math.abs(meanC - atMax)).toBeLessThan(1e-9);
    expect(frames(device(0, meanC), plain, [[10, 100]], 1).run.runawayAtS).toBeNull();
    expect(frames(device(0, meanC - 1e-9), plain, [[0, 0], [10, 100]], 1).run.runawayAtS).toBe(1);
  });
});

describe('DeviceRun.runFrames: peak and time above the warning temperature', () => {
  // 50 W held (oS·s, α = 0) on R = 1 K/W, τ = 10 ms, frames of 10 ms: the junction at the end of
  // frame k is 25 + 50·(1 − e^(−k)) °C (closed form of a first-order RC step); with the power off
  // after K frames it falls as 25 + θ_K·e^(−j). Between frame ends the loop interpolates linearly.
  const model: FrameLossModel = { supplyV: 10, rS: 0, r3: 0, oM: 0, oS: 0.5, oC: 0 };
  const frameS = 0.01;
  const rise = (k: number) => 50 * (1 - Math.exp(-k));

  it('interpolates the crossings up and down and counts the frames between them', () => {
    const on = 4;
    const off = 3;
    const rail: [number, number][] = [];
    for (let i = 0; i < on; i++) rail.push([10, 100]);
    for (let i = 0; i < off; i++) rail.push([0, 0]);
    const w = 60;
    const { run } = frames(device(0), model, rail, frameS, w);
    // Closed-form junction temperatures at the frame ends, then the time above 60 °C by linear
    // interpolation between them, worked out here frame by frame.
    const tj = [25];
    for (let k = 1; k <= on; k++) tj.push(25 + rise(k));
    for (let j = 1; j <= off; j++) tj.push(25 + rise(on) * Math.exp(-j));
    let above = 0;
    for (let i = 1; i < tj.length; i++) {
      const [t0, t1] = [tj[i - 1], tj[i]];
      if (t0 >= w && t1 >= w) above += frameS;
      else if (t0 < w && t1 >= w) above += (frameS * (t1 - w)) / (t1 - t0);
      else if (t0 >= w && t1 < w) above += (frameS * (t0 - w)) / (t0 - t1);
    }
    // 56.6 → 68.2 °C in frame 2 (up), 74.1 → 52.0 °C in frame 6 (down): above for part of each.
    expect(tj[1]).toBeLessThan(w);
    expect(tj[2]).toBeGreaterThan(w);
    expect(tj[6]).toBeLessThan(w);
    // Tolerance 1e-12 s: the network's exponentials against Math.exp, scaled by 10 ms.
    expect(Math.abs(run.aboveWarnS - above)).toBeLessThan(1e-12);
    expect(Math.abs(run.peakC - tj[on])).toBeLessThan(1e-9);
    expect(run.peakAtS).toBeCloseTo(on * frameS, 15);
    expect(Math.abs(run.junctionC() - tj[on + off])).toBeLessThan(1e-9);
    expect(Math.abs(run.energyJ - 50 * on * frameS)).toBeLessThan(1e-12);
  });

  it('continues the count in a later advance from where the frames ended', () => {
    // Four frames up (74.1 °C at 40 ms, above 60 °C), then one 10 ms step without power: the
    // junction falls to 25 + θ₄·e⁻¹ = 52.0 °C, so the step adds 10 ms·(74.1 − 60)/(74.1 − 52.0).
    const { run } = frames(device(0), model, [[10, 100], [10, 100], [10, 100], [10, 100]], frameS, 60);
    const before = run.aboveWarnS;
    const t0 = 25 + rise(4);
    const t1 = 25 + rise(4) * Math.exp(-1);
    run.advance(0, run.net.coefficients(frameS), 5 * frameS);
    expect(Math.abs(run.aboveWarnS - before - (frameS * (t0 - 60)) / (t0 - t1))).toBeLessThan(1e-12);
  });

  it('counts time spent at the warning temperature as above it', () => {
    // Warning level at ambient (25 °C): from rest every frame starts at 25 °C exactly or above it.
    // One frame on, then a frame 10 s long (e^(−1000) = 0: back to exactly 25 °C), then one idle.
    const { run } = frames(device(0), model, [[10, 100]], frameS, 25);
    expect(run.aboveWarnS).toBeCloseTo(frameS, 15);
    const long = frames(device(0), model, [[10, 100], [0, 0], [0, 0]], 10, 25).run;
    expect(long.junctionC()).toBe(25);
    expect(long.aboveWarnS).toBeCloseTo(30, 12);
  });

  it('adds nothing while the junction stays below the warning temperature, and keeps the first time of a peak', () => {
    const { run } = frames(device(0), model, [[10, 100], [10, 100], [0, 0]], frameS, 100);
    expect(run.aboveWarnS).toBe(0);
    expect(run.warnings()).toEqual([]);
    // No power at all: the junction stays at 25 °C, so the peak is the start, at t = 0.
    const idle = frames(device(0), model, [[0, 0], [0, 0]], frameS).run;
    expect(idle.peakC).toBe(25);
    expect(idle.peakAtS).toBe(0);
  });
});

describe('DeviceRun step by step: peak time and the Tj max warning', () => {
  it('keeps the first time of a peak and does not call a peak at exactly Tj max above it', () => {
    const run = new DeviceRun('bridge', 1, device(0), 25, undefined, undefined);
    const c = run.net.coefficients(0.01);
    run.advance(0, c, 0.01);
    expect(run.peakAtS).toBe(0);
    run.advance(100, c, 0.02);
    const peak = run.peakC;
    // The same run on a device whose Tj max is that peak: reached, not passed, so no warning.
    const again = new DeviceRun('bridge', 1, device(0, peak), 25, undefined, undefined);
    again.advance(0, c, 0.01);
    again.advance(100, c, 0.02);
    expect(again.peakC).toBe(peak);
    expect(again.warnings().some((s) => s.includes('maximum'))).toBe(false);
  });

  it('counts time at the warning temperature as above it, as the frame loop does', () => {
    const run = new DeviceRun('bridge', 1, device(0), 25, 25, undefined);
    const c = run.net.coefficients(10);
    run.advance(0, c, 10);
    run.advance(100, c, 20);
    run.advance(0, c, 30);
    expect(run.junctionC()).toBe(25);
    expect(run.aboveWarnS).toBeCloseTo(30, 12);
  });
});
