// Bipolar switches (shared/physics/driver/bjt.ts), the transition share and the linear-element bound
// past it (shared/physics/driver/transition.ts), as the loss functions and the rail frame model use them.
import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { bjtBaseDriveW, bjtBridgeLossParts, bjtSaturationWarning } from '../../../../shared/physics/driver/bjt.ts';
import { deviceWarnings } from '../../../../shared/physics/driver/common.ts';
import { bridgeCurrentFactors } from '../../../../shared/physics/driver/currents.ts';
import { bridgeLossParts, emptyLossParts, modulatorLossParts, railMoments, railThirdMomentBoundV3 } from '../../../../shared/physics/driver/losses.ts';
import { frameLossModel } from '../../../../shared/physics/driver/simulate-rail.ts';
import { frameOtherW, frameResistiveAt25W } from '../../../../shared/physics/driver/device-run.ts';
import {
  TRANSITION_SHARE_LIMIT,
  deviceSwitching,
  linearElementBoundW,
  tooSlowLabel,
  tooSlowWarning,
  transitionShare,
} from '../../../../shared/physics/driver/transition.ts';
import type { DriverDevice, DriverProfile } from '../../../../shared/schemas/driver.ts';

const THERMAL = { foster: [{ rKPerW: 2, tauS: 0.01 }], caseToSinkKPerW: 0, sinkToAmbientKPerW: 60, sinkHeatCapacityJPerK: 0 };
/** An invented small bipolar switch (no real part): the figures of the worked example. */
const BJT: DriverDevice = {
  role: 'bridge',
  kind: 'bjt',
  vceSatV: 0.3,
  vceSatAtCurrentA: 3,
  forcedGain: 10,
  vbeSatV: 0.9,
  riseTimeS: 50e-9,
  fallTimeS: 80e-9,
  storageTimeS: 200e-9,
  outputCapacitanceF: 50e-12,
  tjMaxC: 150,
  thermal: THERMAL,
};
const MOSFET: DriverDevice = {
  role: 'bridge',
  kind: 'mosfet',
  rdsOnOhm: 0.08,
  rdsOnTempCoeffPerK: 0.007,
  riseTimeS: 25e-9,
  fallTimeS: 20e-9,
  outputCapacitanceF: 180e-12,
  tjMaxC: 150,
  thermal: THERMAL,
};
/** k_pk of the class-E single switch: 1 + √(1 + π²/4) (Kazimierczuk, RF Power Amplifiers, class-E chapter [recalled]). */
const K_PK_SINGLE = 1 + Math.sqrt(1 + (Math.PI * Math.PI) / 4);

describe('bipolar switch losses', () => {
  it('reproduces a hand calculation for a single switch at 12 V, 1 A, 400 kHz', () => {
    // Hand calculation with the cited formulas (Mohan, Undeland & Robbins, Power Electronics, 3rd ed.,
    // ch. 21 and eqs. 2-6, 2-7 [recalled]); class-E single switch: I_avg = I_s = 1 A, k_pk = 2.86210:
    //   conduction V_CE(sat)·I_avg          = 0.3 V · 1 A                         = 0.300 W
    //   base drive V_BE(sat)·I_avg/β_F      = 0.9 V · 1 A / 10                    = 0.090 W
    //   transitions ½·k_pk·V·I·(t_r+t_f+t_s)·f0 = ½ · 2.86210 · 12 W · 330 ns · 400 kHz = 2.26678 W
    //   output capacitance ½·C_oss·V²·f0     = ½ · 50 pF · 144 V² · 400 kHz        = 0.00144 W
    // Tolerance 1e-5 W: rounding of the hand figures to six digits.
    const p = bjtBridgeLossParts(BJT, 'single-switch', 400e3, railMoments(1 / 12, 12, 144), emptyLossParts());
    expect(Math.abs(p.conductionFixedW - 0.39)).toBeLessThan(1e-9);
    expect(Math.abs(p.switchingW - 2.26678)).toBeLessThan(1e-5);
    expect(Math.abs(p.capacitiveW - 0.00144)).toBeLessThan(1e-9);
    expect(p.resistiveAt25W).toBe(0);
    // Below the share limit (0.132 < 0.2) the bridge loss is exactly this hard-switching estimate.
    const viaBridge = bridgeLossParts(BJT, 'single-switch', 400e3, railMoments(1 / 12, 12, 144));
    expect(viaBridge).toEqual(p);
  });

  it('counts a fixed base current for the on half-cycle, only while the switch runs', () => {
    // 0.9 V · 0.1 A · ½ = 0.045 W, whatever the collector current; none with the rail at zero.
    const fixed: DriverDevice = { ...BJT, forcedGain: null, baseCurrentA: 0.1 };
    expect(bjtBaseDriveW(fixed, 5, true)).toBeCloseTo(0.045, 12);
    expect(bjtBaseDriveW(fixed, 0.2, true)).toBeCloseTo(0.045, 12);
    expect(bjtBaseDriveW(fixed, 0, false)).toBe(0);
    expect(bjtBaseDriveW(MOSFET, 1, true)).toBe(0);
    const p = bjtBridgeLossParts(fixed, 'single-switch', 400e3, railMoments(1 / 12, 12, 144), emptyLossParts());
    expect(Math.abs(p.conductionFixedW - (0.3 + 0.045))).toBeLessThan(1e-12);
  });

  it('says when the peak collector current is above the current V_CE(sat) is stated at', () => {
    expect(bjtSaturationWarning(BJT, 'bridge', 2.9)).toBe('');
    expect(bjtSaturationWarning(BJT, 'bridge', 3.4)).toMatch(/bridge switch: peak collector current 3\.40 A is above the 3 A/);
    expect(bjtSaturationWarning({ ...BJT, forcedGain: null, baseCurrentA: 0.2 }, 'bridge', 4)).toMatch(/forced gain there is 20\.0/);
  });
});

describe('transition share', () => {
  it('flags a slow bipolar part at 3.1 MHz and passes a fast MOSFET at 318 kHz', () => {
    // Hand values: (100 + 200 + 1200) ns · 3.1 MHz = 4.65; (25 + 20) ns · 318 kHz = 0.01431.
    const slow: DriverDevice = { ...BJT, riseTimeS: 100e-9, fallTimeS: 200e-9, storageTimeS: 1.2e-6 };
    expect(transitionShare(slow, 3.1e6)).toBeCloseTo(4.65, 10);
    expect(transitionShare(MOSFET, 318e3)).toBeCloseTo(0.01431, 10);
    const drv = (d: DriverDevice): DriverProfile => ({
      name: 't',
      topology: 'single-switch',
      supplyVoltageV: 12,
      fullRailCurrentA: 1,
      supplyCurrentLimitA: 3,
      ambientC: 25,
      scheme: 'pulse',
      pulse: { maxOnTimeS: 1e-4, minOffTimeS: 1e-3, maxDuty: 0.1 },
      devices: [d],
    });
    const s = deviceSwitching(drv(slow), 'bridge', 3.1e6);
    expect(s.tooSlow).toBe(true);
    expect(tooSlowLabel(s)).toBe('bridge switch: too slow for 3.1 MHz');
    expect(tooSlowWarning(s)).toMatch(/465\.0 % of each cycle at the coil's resonance 3\.1 MHz, past 20 %.*faster part.*lower resonance.*larger top load/);
    expect(deviceWarnings(drv(slow), 3.1e6).join(' ')).toMatch(/too slow for 3\.1 MHz/);
    const f = deviceSwitching(drv(MOSFET), 'bridge', 318e3);
    expect(f.tooSlow).toBe(false);
    expect(tooSlowWarning(f)).toBe('');
    expect(deviceWarnings(drv(MOSFET), 318e3)).toEqual([]);
  });

  it('past the limit uses the linear-element bound, which is never below the hard-switching estimate', () => {
    // Worked example at 800 kHz: share 0.264 > 0.2. Hard-switching transitions + C_oss:
    // 2·2.26678 + 2·0.00144 = 4.53644 W; linear-element bound ¼·k_pk·V·I = ¼·2.86210·12 = 8.58629 W.
    const m = railMoments(1 / 12, 12, 144);
    const hard = bjtBridgeLossParts(BJT, 'single-switch', 800e3, m, emptyLossParts());
    expect(Math.abs(hard.switchingW + hard.capacitiveW - 4.53644)).toBeLessThan(1e-5);
    const b = bridgeLossParts(BJT, 'single-switch', 800e3, m);
    expect(Math.abs(b.switchingW - 8.58629)).toBeLessThan(1e-5);
    expect(b.capacitiveW).toBe(0);
    expect(b.conductionFixedW).toBeCloseTo(hard.conductionFixedW, 12);
    expect(linearElementBoundW(12, K_PK_SINGLE)).toBeCloseTo(b.switchingW, 12);

    // Property: for any device, topology, frequency and rail, the loss used is at least the
    // hard-switching estimate and, past the limit, at least the linear-element bound.
    const topologies = ['half-bridge', 'full-bridge', 'single-switch'] as const;
    fc.assert(
      fc.property(
        fc.constantFrom(...topologies),
        fc.boolean(),
        fc.double({ min: 0, max: 2e-6, noNaN: true }),
        fc.double({ min: 1e4, max: 5e6, noNaN: true }),
        fc.double({ min: 1, max: 400, noNaN: true }),
        fc.double({ min: 0.01, max: 20, noNaN: true }),
        fc.double({ min: 0, max: 1e-9, noNaN: true }),
        (topology, bipolar, ts, f0, v, i, coss) => {
          const dev: DriverDevice = bipolar ? { ...BJT, storageTimeS: ts, outputCapacitanceF: coss } : { ...MOSFET, storageTimeS: ts, outputCapacitanceF: coss };
          const mm = railMoments(i / v, v, v * v);
          const used = bridgeLossParts(dev, topology, f0, mm);
          let hardSw: number;
          let hardCond: number;
          if (bipolar) {
            const h = bjtBridgeLossParts(dev, topology, f0, mm, emptyLossParts());
            hardSw = h.switchingW + h.capacitiveW;
            hardCond = h.conductionFixedW + h.resistiveAt25W;
          } else {
            const k = bridgeCurrentFactors(topology);
            hardSw = 0.5 * k.switchPeak * v * i * (dev.riseTimeS + dev.fallTimeS) * f0 + 0.5 * coss * v * v * f0;
            hardCond = used.resistiveAt25W + used.conductionFixedW;
          }
          const total = used.resistiveAt25W + used.conductionFixedW + used.switchingW + used.capacitiveW;
          expect(total).toBeGreaterThanOrEqual((hardCond + hardSw) * (1 - 1e-12));
          if (transitionShare(dev, f0) > TRANSITION_SHARE_LIMIT) {
            expect(used.switchingW).toBeGreaterThanOrEqual(0.25 * bridgeCurrentFactors(topology).switchPeak * v * i * (1 - 1e-12));
          } else {
            expect(Math.abs(used.switchingW + used.capacitiveW - hardSw)).toBeLessThanOrEqual(1e-12 * (1 + hardSw));
          }
        },
      ),
      { numRuns: 300 },
    );
  });
});

describe('rail frame model with bipolar devices', () => {
  const single = (bridge: DriverDevice, aux: DriverDevice, over: Partial<DriverProfile> = {}): DriverProfile => ({
    name: 't',
    topology: 'single-switch',
    supplyVoltageV: 15,
    fullRailCurrentA: 1.2,
    supplyCurrentLimitA: 3,
    ambientC: 25,
    scheme: 'rail-linear',
    devices: [bridge, aux],
    ...over,
  });
  const pass: DriverDevice = { ...MOSFET, role: 'pass', riseTimeS: 0, fallTimeS: 0 };
  const modulator = (d: DriverDevice): DriverDevice => ({ ...d, role: 'modulator' });

  it('equals the loss functions for forced-gain and fixed-base bridges and bipolar modulators, slow or not', () => {
    const drivers: DriverProfile[] = [
      single(BJT, pass),
      single({ ...BJT, forcedGain: null, baseCurrentA: 0.08 }, pass),
      single({ ...BJT, storageTimeS: 3e-6 }, pass),
      single(BJT, modulator({ ...BJT, forcedGain: 20 }), { scheme: 'rail-switched', pwmFrequencyHz: 100e3 }),
      single(BJT, modulator({ ...BJT, forcedGain: null, baseCurrentA: 0.05 }), { scheme: 'rail-switched', pwmFrequencyHz: 100e3 }),
      single(BJT, modulator({ ...BJT, storageTimeS: 4e-6 }), { scheme: 'rail-switched', pwmFrequencyHz: 100e3 }),
    ];
    const f0 = 450e3;
    fc.assert(
      fc.property(fc.double({ min: 0, max: 1, noNaN: true }), fc.double({ min: 0, max: 1, noNaN: true }), (u, w) => {
        for (const d of drivers) {
          const vs = d.supplyVoltageV;
          const g = d.fullRailCurrentA / vs;
          const m = u * vs;
          const s = m * m + w * (vs * m - m * m);
          const other = (p: { conductionFixedW: number; switchingW: number; capacitiveW: number }) => p.conductionFixedW + p.switchingW + p.capacitiveW;
          const evalModel = (role: 'bridge' | 'modulator') => {
            const f = frameLossModel(d, role, f0);
            return [frameResistiveAt25W(f, m, s), frameOtherW(f, m, s)];
          };
          const pb = bridgeLossParts(d.devices[0], d.topology, f0, railMoments(g, m, s));
          const [ra, oa] = evalModel('bridge');
          expect(Math.abs(ra - pb.resistiveAt25W)).toBeLessThan(1e-12 * (1 + pb.resistiveAt25W));
          expect(Math.abs(oa - other(pb))).toBeLessThan(1e-10 * (1 + other(pb)));
          if (d.scheme === 'rail-switched') {
            const pm = modulatorLossParts(d.devices[1], vs, d.pwmFrequencyHz!, g, m, s);
            const [rx, ox] = evalModel('modulator');
            expect(Math.abs(rx - pm.resistiveAt25W)).toBeLessThan(1e-12 * (1 + pm.resistiveAt25W));
            expect(Math.abs(ox - other(pm))).toBeLessThan(1e-9 * (1 + other(pm)));
          }
        }
      }),
      { numRuns: 200 },
    );
  });

  it('gives a bipolar buck modulator its hand-computed loss', () => {
    // 15 V supply, g = 0.08 A/V, constant 7.5 V rail (D = ½, I = 0.6 A), 100 kHz, β_F 20:
    // conduction D·I·V_CE = 0.5·0.6·0.3 = 0.09 W; base D·I/β·V_BE = 0.5·0.6/20·0.9 = 0.0135 W;
    // switching ½·V_s·I·(t_r+t_f+t_s)·f = ½·15·0.6·330 ns·100 kHz = 0.1485 W; C_oss ½·50 pF·225·100 kHz = 0.5625 mW.
    const p = modulatorLossParts({ ...BJT, role: 'modulator', forcedGain: 20 }, 15, 100e3, 0.08, 7.5, 56.25);
    expect(Math.abs(p.conductionFixedW - 0.1035)).toBeLessThan(1e-12);
    expect(Math.abs(p.switchingW - 0.1485)).toBeLessThan(1e-12);
    expect(Math.abs(p.capacitiveW - 0.0005625)).toBeLessThan(1e-15);
  });
});
