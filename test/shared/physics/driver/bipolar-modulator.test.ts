import { describe, expect, it } from 'vitest';
import { bjtBridgeLossParts, bjtSaturationWarning } from '../../../../shared/physics/driver/bjt.ts';
import { emptyLossParts, modulatorLossParts, modulatorTaperV, railMoments } from '../../../../shared/physics/driver/losses.ts';
import { frameOtherW, frameResistiveAt25W } from '../../../../shared/physics/driver/device-run.ts';
import { frameLossModel } from '../../../../shared/physics/driver/simulate-rail.ts';
import { deviceSwitching, tooSlowLabel, tooSlowWarning } from '../../../../shared/physics/driver/transition.ts';
import { DEMO_DRIVER_BUCK, DEMO_DRIVER_LINEAR } from '../../../../shared/demo/drivers.ts';
import { deviceWarnings } from '../../../../shared/physics/driver/common.ts';
import { bridgeCurrentFactors } from '../../../../shared/physics/driver/currents.ts';
import type { DriverDevice, DriverProfile } from '../../../../shared/schemas/driver.ts';

// A bipolar buck modulator's loss term by term against hand values, the bipolar saturation warning
// word for word, and the switching-speed record of each role.

const THERMAL = { foster: [{ rKPerW: 2, tauS: 0.01 }], caseToSinkKPerW: 0, sinkToAmbientKPerW: 1, sinkHeatCapacityJPerK: 0 };
/** An invented bipolar modulator switch with a fixed base current (no real part). */
const BJT: DriverDevice = {
  role: 'modulator',
  kind: 'bjt',
  vceSatV: 0.3,
  vceSatAtCurrentA: 3,
  baseCurrentA: 0.5,
  vbeSatV: 0.9,
  riseTimeS: 50e-9,
  fallTimeS: 80e-9,
  storageTimeS: 200e-9,
  outputCapacitanceF: 50e-12,
  tjMaxC: 150,
  thermal: THERMAL,
};

describe('bipolar buck modulator losses', () => {
  // V_s = 100 V, g = 0.1 A/V, f_pwm = 20 kHz; t_r + t_f + t_s = 330 ns, taper V_s·330 ns·f = 0.66 V.
  it('takes the storage time into the taper width of a BJT only', () => {
    expect(Math.abs(modulatorTaperV(BJT, 100, 20e3) - 0.66)).toBeLessThan(1e-12);
    expect(Math.abs(modulatorTaperV({ ...BJT, kind: 'igbt' }, 100, 20e3) - 0.26)).toBeLessThan(1e-12);
    // An IGBT's turn-off delay (given as storageTimeS) adds no switching overlap: ½·100·0.1·50·130 ns·20 kHz = 0.65 W.
    const igbt = { ...BJT, kind: 'igbt' as const, baseCurrentA: undefined };
    expect(Math.abs(modulatorLossParts(igbt, 100, 20e3, 0.1, 50, 2500, emptyLossParts()).switchingW - 0.65)).toBeLessThan(1e-12);
  });

  it('gives the hand-worked parts for a fixed base current at half rail', () => {
    // Constant 50 V rail: switch current D·I = g·E[v²]/V_s = 2.5 A.
    //   conduction V_CE(sat)·2.5 A = 0.75 W; base V_BE·I_B·D = 0.9·0.5·0.5 = 0.225 W;
    //   switching ½·V_s·g·E[v]·330 ns·f = ½·100·0.1·50·0.0066 = 1.65 W; C_oss ½·50 pF·100²·20 kHz = 5 mW.
    const p = modulatorLossParts(BJT, 100, 20e3, 0.1, 50, 2500, emptyLossParts());
    expect(p.resistiveAt25W).toBe(0);
    expect(Math.abs(p.conductionFixedW - 0.975)).toBeLessThan(1e-12);
    expect(Math.abs(p.switchingW - 1.65)).toBeLessThan(1e-12);
    expect(Math.abs(p.capacitiveW - 0.005)).toBeLessThan(1e-15);
    // Off: no base current, no switching.
    const off = modulatorLossParts(BJT, 100, 20e3, 0.1, 0, 0, emptyLossParts());
    expect(off).toEqual({ resistiveAt25W: 0, conductionFixedW: 0, switchingW: 0, capacitiveW: 0 });
  });

  it('gives the base drive of a forced gain from the switch current', () => {
    // β = 5: V_BE·(D·I)/β = 0.9·2.5/5 = 0.45 W, plus conduction 0.75 W.
    const forced = { ...BJT, baseCurrentA: undefined, forcedGain: 5 };
    const p = modulatorLossParts(forced, 100, 20e3, 0.1, 50, 2500, emptyLossParts());
    expect(Math.abs(p.conductionFixedW - 1.2)).toBeLessThan(1e-12);
  });

  it('adds the linear-element bound when the switch is too slow for its PWM frequency', () => {
    // At 1 MHz the transitions take 33 % of a cycle (> 20 %): switching ½·100·0.1·50·0.33 = 82.5 W plus
    // the bound ¼·g·V_s² = 250 W; the taper is then 33 V, so at 50 V the switch still switches fully.
    const p = modulatorLossParts(BJT, 100, 1e6, 0.1, 50, 2500, emptyLossParts());
    expect(Math.abs(p.switchingW - 332.5)).toBeLessThan(1e-9);
    // Without a rail it does not switch at all.
    expect(modulatorLossParts(BJT, 100, 1e6, 0.1, 0, 0, emptyLossParts()).switchingW).toBe(0);
  });
});

describe('bipolar bridge conduction and saturation', () => {
  it('takes the on-resistance part as r·(k_rms·I)²', () => {
    // Half bridge: switch I_rms = (π/2)·I_s (Erickson & Maksimović §19.1); r = 0.1 Ω at I_s = 2 A:
    // 0.1·(π/2)²·4 = 0.98696 W (hand value).
    const p = bjtBridgeLossParts({ ...BJT, role: 'bridge', rdsOnOhm: 0.1 }, 'half-bridge', 100e3, railMoments(0.1, 20, 400), emptyLossParts());
    expect(Math.abs(p.resistiveAt25W - 0.1 * (Math.PI / 2) ** 2 * 4)).toBeLessThan(1e-12);
  });

  it('warns above the current its V_CE(sat) is stated at, word for word, and only then', () => {
    expect(bjtSaturationWarning(BJT, 'modulator', 4)).toBe(
      'modulator switch: peak collector current 4.00 A is above the 3 A at which its V_CE(sat) is stated, so its conduction loss is underestimated; ' +
        "at the fixed 0.5 A base current the forced gain there is 8.0, check that the part's h_FE still saturates it. Use the datasheet's V_CE(sat) at this current.",
    );
    expect(bjtSaturationWarning({ ...BJT, baseCurrentA: null, forcedGain: 10 }, 'bridge', 4)).toBe(
      "bridge switch: peak collector current 4.00 A is above the 3 A at which its V_CE(sat) is stated, so its conduction loss is underestimated. Use the datasheet's V_CE(sat) at this current.",
    );
    expect(bjtSaturationWarning({ ...BJT, baseCurrentA: undefined, forcedGain: 10 }, 'bridge', 4)).not.toContain('base current');
    expect(bjtSaturationWarning(BJT, 'modulator', 3)).toBe('');
    expect(bjtSaturationWarning({ ...BJT, vceSatAtCurrentA: undefined }, 'modulator', 4)).toBe('');
    expect(bjtSaturationWarning({ ...BJT, vceSatAtCurrentA: null }, 'modulator', 4)).toBe('');
    expect(bjtSaturationWarning({ ...BJT, kind: 'igbt' }, 'modulator', 4)).toBe('');
  });
});

describe('switching speed of each role', () => {
  const withBjt = (p: DriverProfile, pwmHz?: number): DriverProfile => ({ ...structuredClone(p), pwmFrequencyHz: pwmHz, devices: [...p.devices.filter((d) => d.role !== 'modulator'), BJT] });

  it('takes the bridge at the resonance, the modulator at the PWM frequency, and the pass device at none', () => {
    const buck = withBjt(DEMO_DRIVER_BUCK, 20e3);
    expect(deviceSwitching(buck, 'modulator', 300e3)).toEqual({
      role: 'modulator',
      kind: 'bjt',
      switchingHz: 20e3,
      transitionTimeS: 330e-9,
      transitionShare: expect.closeTo(0.0066, 12),
      limitShare: 0.2,
      tooSlow: false,
    });
    expect(deviceSwitching(withBjt(DEMO_DRIVER_BUCK), 'modulator', 300e3).switchingHz).toBeNull();
    const pass = deviceSwitching({ ...DEMO_DRIVER_LINEAR, pwmFrequencyHz: 20e3 }, 'pass', 300e3);
    expect([pass.switchingHz, pass.transitionShare, pass.tooSlow]).toEqual([null, null, false]);
    expect(deviceSwitching(DEMO_DRIVER_LINEAR, 'bridge', 300e3).switchingHz).toBe(300e3);
    expect(() => deviceSwitching(DEMO_DRIVER_LINEAR, 'modulator', 300e3)).toThrow(new RangeError('deviceSwitching: the profile has no modulator device'));
  });

  it('is too slow only past 20 % of a cycle, and says so word for word', () => {
    // 330 ns of transitions: at 1 MHz (exactly the MHz wording's threshold) 33 % of a cycle, at 20 kHz 0.66 %.
    const slow = deviceSwitching(withBjt(DEMO_DRIVER_BUCK, 1e6), 'modulator', 300e3);
    expect(slow.tooSlow).toBe(true);
    expect(tooSlowWarning(slow)).toBe(
      'modulator switch: too slow for 1.0 MHz: its transitions (t_r + t_f + t_s = 330 ns) take 33.0 % of each cycle at the PWM frequency 1.0 MHz, past 20 %, ' +
        'so it cannot switch cleanly: it spends much of each cycle in its active region. Its loss is taken as the bound for a linear element ' +
        '(not the hard-switching estimate, which no longer holds) and no gain is advised. What helps: a faster part or a lower PWM frequency.',
    );
    const bridge = deviceSwitching({ ...withBjt(DEMO_DRIVER_BUCK, 20e3), devices: [{ ...BJT, role: 'bridge' }, BJT] }, 'bridge', 800e3);
    expect(tooSlowWarning(bridge)).toContain("of each cycle at the coil's resonance 800 kHz");
    expect(tooSlowWarning(bridge)).toContain('What helps: a faster part (shorter storage');
    expect(tooSlowWarning(deviceSwitching(withBjt(DEMO_DRIVER_BUCK, 20e3), 'modulator', 300e3))).toBe('');
    expect(tooSlowLabel({ role: 'pass', switchingHz: null })).toBe('pass switch: too slow for its switching frequency');
    expect(tooSlowLabel({ role: 'bridge', switchingHz: 999e3 })).toBe('bridge switch: too slow for 999 kHz');
  });
});

describe('deviceWarnings: bipolar saturation per role', () => {
  it("takes the bridge's peak as k_pk·I and the modulator's as I, and skips the pass device", () => {
    // Full bridge at I = 4 A: switch peak (π/2)·4 = 6.28 A (Erickson & Maksimović §19.1); the buck
    // modulator carries the rail current itself, 4 A. Both are above the 3 A V_CE(sat) is stated at.
    const buck: DriverProfile = { ...structuredClone(DEMO_DRIVER_BUCK), devices: [{ ...BJT, role: 'bridge' }, BJT] };
    expect(deviceWarnings(buck, 120e3)).toEqual([bjtSaturationWarning(BJT, 'bridge', 2 * Math.PI), bjtSaturationWarning(BJT, 'modulator', 4)]);
    expect(deviceWarnings(buck, 120e3)[0]).toContain('peak collector current 6.28 A');
    // A bipolar pass device works in its linear region: no saturation warning for it.
    const linear: DriverProfile = { ...structuredClone(DEMO_DRIVER_LINEAR), fullRailCurrentA: 40, supplyCurrentLimitA: 50 };
    linear.devices[1] = { ...BJT, role: 'pass', riseTimeS: 0, fallTimeS: 0, storageTimeS: 0 };
    expect(deviceWarnings(linear, 120e3)).toEqual([]);
  });
});

describe('frameLossModel of a modulator whose taper reaches below half rail', () => {
  it('matches modulatorLossParts term by term where the switching share is below 1', () => {
    // 330 ns at 2 MHz: taper V_s·0.66, so at E[v] = V_s/2 (one of the points the model is fitted at)
    // the share is 0.5/0.66 = 0.76. Reference: the LossParts function itself at the same (m, s).
    const slow: DriverProfile = { ...structuredClone(DEMO_DRIVER_BUCK), pwmFrequencyHz: 2e6, devices: [DEMO_DRIVER_BUCK.devices[0], BJT] };
    const g = slow.fullRailCurrentA / slow.supplyVoltageV;
    const model = frameLossModel(slow, 'modulator', 120e3);
    for (const [m, s] of [[80, 80 * 160], [120, 120 * 120], [150, 150 * 155]]) {
      const p = modulatorLossParts(BJT, 160, 2e6, g, m, s, emptyLossParts());
      const want = p.resistiveAt25W + p.conductionFixedW + p.switchingW + p.capacitiveW;
      expect(Math.abs(frameResistiveAt25W(model, m, s) + frameOtherW(model, m, s) - want)).toBeLessThan(1e-9 * want);
    }
  });
});

describe('deviceWarnings: each role its own device', () => {
  it("reads each role's own V_CE(sat) current, and skips a role the profile lacks", () => {
    // Bridge stated at 5 A (peak 6.28 A: warned), modulator at 3 A (peak 4 A: warned); with the
    // modulator stated at 5 A it is not.
    const bridge = { ...BJT, role: 'bridge' as const, vceSatAtCurrentA: 5 };
    const buck: DriverProfile = { ...structuredClone(DEMO_DRIVER_BUCK), devices: [bridge, BJT] };
    expect(deviceWarnings(buck, 120e3)).toEqual([bjtSaturationWarning(bridge, 'bridge', 2 * Math.PI), bjtSaturationWarning(BJT, 'modulator', 4)]);
    const noMod: DriverProfile = { ...structuredClone(DEMO_DRIVER_BUCK), devices: [bridge] };
    expect(deviceWarnings(noMod, 120e3)).toEqual([bjtSaturationWarning(bridge, 'bridge', 2 * Math.PI)]);
  });

  it('rejects an unknown topology by name', () => {
    expect(() => bridgeCurrentFactors('triple-bridge' as never)).toThrow(new RangeError('bridgeCurrentFactors: unknown topology triple-bridge'));
  });
});
