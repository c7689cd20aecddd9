// Tests for shared/schemas/driver.ts and shared/demo/drivers.ts (kept beside the driver tests, the
// folder this work owns).
import { describe, expect, it } from 'vitest';
import { DEMO_DRIVERS, DEMO_DRIVER_BUCK, DEMO_DRIVER_LINEAR, DEMO_DRIVER_PULSE } from '../../../../shared/demo/drivers.ts';
import { InputError } from '../../../../shared/errors.ts';
import { BRIDGE_SWITCH_COUNT, DriverProfileSchema, parseDriverProfile } from '../../../../shared/schemas/driver.ts';

/** Parses a mutated copy of a profile and returns the InputError it throws. */
function failure(base: object, mutate: (p: any) => void): InputError {
  const p = structuredClone(base);
  mutate(p);
  try {
    parseDriverProfile(JSON.parse(JSON.stringify(p)));
  } catch (e) {
    expect(e).toBeInstanceOf(InputError);
    expect((e as InputError).code).toBe('bad-profile');
    return e as InputError;
  }
  throw new Error('expected parseDriverProfile to throw');
}

describe('parseDriverProfile', () => {
  it('accepts every demo profile (one per scheme) as JSON round-trips', () => {
    expect(new Set(DEMO_DRIVERS.map((d) => d.scheme))).toEqual(new Set(['rail-linear', 'rail-switched', 'pulse']));
    for (const d of DEMO_DRIVERS) expect(parseDriverProfile(JSON.parse(JSON.stringify(d)))).toEqual(d);
  });

  it('accepts a sink without thermal mass (heat capacity 0)', () => {
    const p = structuredClone(DEMO_DRIVER_LINEAR);
    p.devices[0].thermal.sinkHeatCapacityJPerK = 0;
    expect(parseDriverProfile(p).devices[0].thermal.sinkHeatCapacityJPerK).toBe(0);
  });

  it('names field, rule and value for range and type errors', () => {
    let e = failure(DEMO_DRIVER_LINEAR, (p) => (p.supplyVoltageV = -5));
    expect(e.field).toBe('supplyVoltageV');
    expect(e.message).toMatch(/supplyVoltageV must be > 0, got -5/);
    expect(e.message).toMatch(/in V/);
    e = failure(DEMO_DRIVER_LINEAR, (p) => (p.devices[0].thermal.foster[1].tauS = 0));
    expect(e.field).toBe('devices.0.thermal.foster.1.tauS');
    expect(e.message).toMatch(/must be > 0, got 0/);
    e = failure(DEMO_DRIVER_LINEAR, (p) => (p.devices[1].rdsOnOhm = -0.1));
    expect(e.field).toBe('devices.1.rdsOnOhm');
    expect(e.message).toMatch(/must be > 0, got -0.1/);
    e = failure(DEMO_DRIVER_LINEAR, (p) => (p.ambientC = 'warm'));
    expect(e.field).toBe('ambientC');
    expect(e.message).toMatch(/must be a finite number, got "warm"/);
    e = failure(DEMO_DRIVER_LINEAR, (p) => (p.topology = 'push-pull'));
    expect(e.field).toBe('topology');
    expect(e.message).toMatch(/one of "half-bridge", "full-bridge", "single-switch", got "push-pull"/);
  });

  it('names missing and unknown fields', () => {
    let e = failure(DEMO_DRIVER_LINEAR, (p) => delete p.fullRailCurrentA);
    expect(e.field).toBe('fullRailCurrentA');
    expect(e.message).toMatch(/is missing .*add it/);
    e = failure(DEMO_DRIVER_LINEAR, (p) => (p.devices[0].rdsOnOhms = 0.1));
    expect(e.field).toBe('devices.0.rdsOnOhms');
    expect(e.message).toMatch(/unknown field/);
  });

  it('enforces the cross-field rules', () => {
    const cases: [object, (p: any) => void, string, RegExp][] = [
      [DEMO_DRIVER_LINEAR, (p) => (p.devices[0].thermal.foster = []), 'devices.0.thermal.foster', /is empty/],
      [DEMO_DRIVER_PULSE, (p) => delete p.pulse, 'pulse', /pulse scheme needs it/],
      [DEMO_DRIVER_BUCK, (p) => delete p.pwmFrequencyHz, 'pwmFrequencyHz', /rail-switched scheme needs/],
      [DEMO_DRIVER_LINEAR, (p) => p.devices.pop(), 'devices', /no "pass" device/],
      [DEMO_DRIVER_BUCK, (p) => (p.devices[1].role = 'pass'), 'devices', /no "modulator" device/],
      [DEMO_DRIVER_PULSE, (p) => (p.devices[0].role = 'pass'), 'devices', /no "bridge" device/],
      [DEMO_DRIVER_LINEAR, (p) => (p.devices[1].role = 'bridge'), 'devices.1.role', /repeats devices.0/],
      [DEMO_DRIVER_LINEAR, (p) => (p.devices[0].rdsOnOhm = null), 'devices.0.rdsOnOhm', /MOSFET needs its on-resistance/],
      [DEMO_DRIVER_LINEAR, (p) => delete p.devices[0].rdsOnTempCoeffPerK, 'devices.0.rdsOnTempCoeffPerK', /temperature coefficient/],
      [DEMO_DRIVER_PULSE, (p) => (p.devices[0].vceSatV = null), 'devices.0.vceSatV', /IGBT needs/],
      [DEMO_DRIVER_LINEAR, (p) => (p.ambientC = 80) && (p.devices[0].tjMaxC = 75), 'devices.0.tjMaxC', /above ambientC/],
    ];
    for (const [base, mutate, field, msg] of cases) {
      const e = failure(base, mutate);
      expect(e.field).toBe(field);
      expect(e.message).toMatch(msg);
    }
  });

  it('documents unit and range on every numeric field of the schema', () => {
    // House rule (DEVELOPERS.md): numeric fields carry unit and range.
    const walk = (node: any, path: string): void => {
      if (node?.type === 'number') {
        expect(typeof node.description, path).toBe('string');
        expect(node.minimum !== undefined || node.exclusiveMinimum !== undefined, path).toBe(true);
        expect(node.maximum, path).toBeDefined();
      }
      for (const [k, v] of Object.entries(node ?? {})) if (v && typeof v === 'object') walk(v, `${path}.${k}`);
    };
    walk(DriverProfileSchema, 'profile');
    expect(BRIDGE_SWITCH_COUNT).toEqual({ 'half-bridge': 2, 'full-bridge': 4, 'single-switch': 1 });
  });
});
