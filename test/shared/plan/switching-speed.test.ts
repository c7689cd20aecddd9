// The switching-speed limit in the advice (shared/plan/evaluate.ts, shared/plan/report.ts): a switch
// too slow for the coil fails every gain and reads "bridge switch: too slow for 3.1 MHz".
import { describe, expect, it } from 'vitest';
import { adviseGain } from '../../../shared/plan/advise.ts';
import { evaluateAtGain, planSettings } from '../../../shared/plan/evaluate.ts';
import { planClipReport } from '../../../shared/plan/report.ts';
import { parseDriverProfile, type DriverDevice, type DriverProfile } from '../../../shared/schemas/driver.ts';
import { planClip, tone } from './fixtures.ts';

/** An invented slow bipolar switch: t_r + t_f + t_s = 1.5 µs. */
const slowBjt: DriverDevice = {
  role: 'bridge',
  kind: 'bjt',
  vceSatV: 0.4,
  vceSatAtCurrentA: 5,
  forcedGain: 10,
  vbeSatV: 1,
  riseTimeS: 100e-9,
  fallTimeS: 200e-9,
  storageTimeS: 1.2e-6,
  outputCapacitanceF: 60e-12,
  tjMaxC: 150,
  thermal: { foster: [{ rKPerW: 3, tauS: 0.02 }], caseToSinkKPerW: 0, sinkToAmbientKPerW: 5, sinkHeatCapacityJPerK: 5 },
};
const pass: DriverDevice = {
  role: 'pass',
  kind: 'mosfet',
  rdsOnOhm: 0.05,
  rdsOnTempCoeffPerK: 0.007,
  riseTimeS: 0,
  fallTimeS: 0,
  outputCapacitanceF: 0,
  tjMaxC: 175,
  thermal: { foster: [{ rKPerW: 1, tauS: 0.02 }], caseToSinkKPerW: 0.5, sinkToAmbientKPerW: 3, sinkHeatCapacityJPerK: 50 },
};
const driver = (bridge: DriverDevice): DriverProfile =>
  parseDriverProfile({
    name: 'small single switch (invented)',
    topology: 'single-switch',
    supplyVoltageV: 12,
    fullRailCurrentA: 0.5,
    supplyCurrentLimitA: 3,
    ambientC: 25,
    scheme: 'rail-linear',
    devices: [bridge, pass],
  });

describe('switching speed in the advice', () => {
  const clip = planClip('tone', tone(220, 0.3, 1));

  it('a slow bipolar switch on a 3.1 MHz coil: no gain, binding "bridge switch: too slow for 3.1 MHz"', () => {
    // Transition share (100 + 200 + 1200) ns · 3.1 MHz = 4.65, past 0.2 (hand value).
    const coil = { resonanceHz: 3.1e6, qualityFactor: 60, modulationCornerHz: 3.1e6 / 120 };
    const d = driver(slowBjt);
    const a = adviseGain(clip, coil, d, planSettings(d));
    expect(a.advisedGainDb).toBeNull();
    expect(a.binding).toMatchObject({ limit: 'switching-speed', role: 'bridge', allowed: 0.2, frequencyHz: 3.1e6 });
    expect(a.binding!.value).toBeCloseTo(4.65, 10);
    // It fails whatever the gain, and it is the worst limit even when another fails too.
    for (const db of [-40, 0, 6]) {
      const e = evaluateAtGain(clip, coil, d, db, planSettings(d));
      expect(e.worst!.limit).toBe('switching-speed');
    }
    const { report } = planClipReport(clip, coil, d, planSettings(d));
    expect(report.binding).toMatchObject({ limit: 'switching-speed', frequencyHz: 3.1e6 });
    expect(report.devices[0]).toMatchObject({ role: 'bridge', switchingHz: 3.1e6, tooSlow: true });
    expect(report.devices[0].transitionShare).toBeCloseTo(4.65, 10);
    expect(report.devices[1]).toMatchObject({ role: 'pass', switchingHz: null, transitionShare: null, tooSlow: false });
    expect(report.warnings[0]).toMatch(/^No gain is safe: bridge switch: too slow for 3\.1 MHz/);
    expect(report.warnings.join(' ')).toMatch(/465\.0 % of each cycle at the coil's resonance 3\.1 MHz.*linear element.*What helps: a faster part/);
    // JSON carries the share per device.
    expect(JSON.parse(JSON.stringify(report)).devices[0].transitionShare).toBeCloseTo(4.65, 10);
  });

  it('the same switch on a 120 kHz coil is fast enough (share 0.18) and another limit binds', () => {
    const coil = { resonanceHz: 120e3, qualityFactor: 60, modulationCornerHz: 1e3 };
    const d = driver(slowBjt);
    const a = adviseGain(clip, coil, d, planSettings(d));
    expect(a.advisedGainDb).not.toBeNull();
    expect(a.binding?.limit).not.toBe('switching-speed');
    const speed = a.atAdvised.limits.find((l) => l.limit === 'switching-speed')!;
    expect(speed.ok).toBe(true);
    expect(speed.value).toBeCloseTo(0.18, 10);
  });
});

describe('switching speed: the search stops at once', () => {
  it('needs only a couple of evaluations to refuse a too-slow switch', () => {
    const coil = { resonanceHz: 3.1e6, qualityFactor: 60 };
    const d = driver(slowBjt);
    const a = adviseGain(planClip('tone', tone(220, 0.3, 1)), coil, d, planSettings(d));
    expect(a.advisedGainDb).toBeNull();
    expect(a.binding!.limit).toBe('switching-speed');
    expect(a.unsafeOnSilence).toBe(true);
    // The first grid gain, then silence.
    expect(a.evaluations).toBe(2);
  });
});
