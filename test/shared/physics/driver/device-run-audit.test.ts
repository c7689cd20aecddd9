import { describe, expect, it } from 'vitest';
import { DEMO_DRIVER_LINEAR } from '../../../../shared/demo/drivers.ts';
import { DeviceRun, frameLossAtW, frameOtherW, frameResistiveAt25W } from '../../../../shared/physics/driver/device-run.ts';
import { frameLossModel } from '../../../../shared/physics/driver/simulate-rail.ts';
import type { DriverDevice } from '../../../../shared/schemas/driver.ts';

// One switch's bookkeeping against hand values: the frame loss at a held temperature, the default
// warning temperature, the first runaway, and the plain-language warnings.

/** One Foster cell of 1 K/W, τ = 10 ms, to ambient directly; Tj max 150 °C. */
const DEV: DriverDevice = {
  role: 'bridge',
  kind: 'mosfet',
  rdsOnOhm: 0.1,
  rdsOnTempCoeffPerK: 0.01,
  vceSatV: null,
  riseTimeS: 0,
  fallTimeS: 0,
  outputCapacitanceF: 0,
  tjMaxC: 150,
  thermal: { foster: [{ rKPerW: 1, tauS: 0.01 }], caseToSinkKPerW: 0, sinkToAmbientKPerW: 0, sinkHeatCapacityJPerK: 0 },
};

describe('frameLossAtW', () => {
  it('evaluates a frame loss model at a held junction temperature, clamping (m, s) to the feasible set', () => {
    // Linear pass device g(V_s·m − s), g = 3/48: 36 W at 24 V (textbook g·V_s²/4); nothing at 0 V or
    // at the full 48 V, and a rail outside 0…48 V is clamped first.
    const pass = frameLossModel(DEMO_DRIVER_LINEAR, 'pass', 300e3);
    expect(Math.abs(frameLossAtW(pass, 24, 576, 0, 25) - 36)).toBeLessThan(1e-12);
    expect(frameLossAtW(pass, 60, 5000, 0, 25)).toBe(0);
    expect(frameLossAtW(pass, -5, 0, 0, 25)).toBe(0);
    // A mean square below m² is raised to m² (constant rail): 24 V with s = 0 reads as s = 576.
    expect(Math.abs(frameLossAtW(pass, 24, 0, 0, 25) - 36)).toBeLessThan(1e-12);
    // Bridge at full rail: I²R = 0.08·(π/2)²·3² = 1.7765 W at 25 °C (half-bridge, Erickson & Maksimović
    // §19.1); at 125 °C with α = 0.01 it doubles, the switching parts do not.
    const bridge = frameLossModel(DEMO_DRIVER_LINEAR, 'bridge', 300e3);
    const a = frameResistiveAt25W(bridge, 48, 2304);
    expect(Math.abs(a - 0.08 * (Math.PI / 2) ** 2 * 9)).toBeLessThan(1e-12);
    const b = frameOtherW(bridge, 48, 2304);
    expect(Math.abs(frameLossAtW(bridge, 48, 2304, 0.01, 125) - (2 * a + b))).toBeLessThan(1e-12);
    expect(Math.abs(frameLossAtW(bridge, 48, 2304, 0.01, 25) - (a + b))).toBeLessThan(1e-12);
  });
});

describe('DeviceRun bookkeeping', () => {
  it('warns 25 K below Tj max by default, or where told', () => {
    expect(new DeviceRun('bridge', 1, DEV, 25, undefined, undefined).warnC).toBe(125);
    expect(new DeviceRun('bridge', 1, DEV, 25, 90, undefined).warnC).toBe(90);
    expect(new DeviceRun('bridge', 1, DEV, 25, undefined, undefined).summary(0).meanLossW).toBe(0);
  });

  it('records the first runaway only and says so in words', () => {
    // a·α·h ≥ 1: 200 W of I²R with α = 0.01 on 1 K/W (over a long interval h → 1 K/W): loop gain 2.
    const run = new DeviceRun('bridge', 1, DEV, 25, undefined, undefined);
    const c = run.net.coefficients(1);
    const parts = { resistiveAt25W: 200, conductionFixedW: 0, switchingW: 0, capacitiveW: 0 };
    run.solve(parts, c, 0.5);
    run.solve(parts, c, 1.5);
    expect(run.runawayAtS).toBe(0.5);
    expect(run.summary(2).runaway).toEqual({ atS: 0.5 });
    expect(run.warnings()[0]).toBe(
      'bridge switch: thermal runaway at 0.500 s — its loss no longer settles below Tj max 150 °C; temperatures after that point are not physical. Lower the drive or improve the cooling.',
    );
    // A cool interval records nothing.
    const cool = new DeviceRun('pass', 1, DEV, 25, undefined, undefined);
    cool.solve({ resistiveAt25W: 1, conductionFixedW: 0, switchingW: 0, capacitiveW: 0 }, c, 0);
    expect(cool.runawayAtS).toBeNull();
    expect(cool.warnings()).toEqual([]);
  });

  it('reports a junction above Tj max and the time above the warning temperature', () => {
    // 200 W held for 1 s (≫ τ) on 1 K/W: the junction ends at 25 + 200 = 225 °C, above 150 °C.
    const run = new DeviceRun('bridge', 2, DEV, 25, undefined, undefined);
    const c = run.net.coefficients(1);
    const tj = run.advance(200, c, 1);
    expect(Math.abs(tj - 225)).toBeLessThan(1e-6);
    const w = run.warnings();
    expect(w[0]).toBe('bridge switch: junction reaches 225.0 °C at 1.000 s, above its 150 °C maximum.');
    // From 25 °C to 225 °C in one step: above 125 °C for the interpolated last half, 0.5 s.
    expect(Math.abs(run.aboveWarnS - 0.5)).toBeLessThan(1e-6);
    expect(w[1]).toBe('bridge switch: 0.500 s above the 125.0 °C warning temperature (peak 225.0 °C).');
    // Cooling back below the warning level: the crossing is interpolated too (225 → 25 °C: 0.5 s more).
    run.advance(0, c, 2);
    expect(Math.abs(run.aboveWarnS - 1)).toBeLessThan(1e-6);
    expect(run.summary(2).meanLossW).toBeCloseTo(100, 9);
  });
});
