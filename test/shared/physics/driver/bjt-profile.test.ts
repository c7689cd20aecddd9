// Bipolar devices and the new fields of the driver profile (shared/schemas/driver.ts).
import { describe, expect, it } from 'vitest';
import { DEMO_SMALL_DRIVER } from '../../../../shared/demo/small-rig.ts';
import { InputError } from '../../../../shared/errors.ts';
import { DriverProfileSchema, parseDriverProfile } from '../../../../shared/schemas/driver.ts';

function failure(mutate: (p: any) => void): InputError {
  const p = JSON.parse(JSON.stringify(DEMO_SMALL_DRIVER));
  mutate(p);
  try {
    parseDriverProfile(p);
  } catch (e) {
    expect(e).toBeInstanceOf(InputError);
    return e as InputError;
  }
  throw new Error('expected parseDriverProfile to throw');
}

describe('bipolar driver profile', () => {
  it('accepts the demo small rig (a BJT bridge and a MOSFET pass device) as JSON round-trips', () => {
    expect(parseDriverProfile(JSON.parse(JSON.stringify(DEMO_SMALL_DRIVER)))).toEqual(DEMO_SMALL_DRIVER);
    // A fixed base current instead of the forced gain is as good.
    const fixed = JSON.parse(JSON.stringify(DEMO_SMALL_DRIVER));
    fixed.devices[0].forcedGain = null;
    fixed.devices[0].baseCurrentA = 0.2;
    expect(parseDriverProfile(fixed).devices[0].baseCurrentA).toBe(0.2);
  });

  it('refuses a bipolar profile with a missing or out-of-range field, naming the dotted field', () => {
    const cases: [(p: any) => void, string, RegExp][] = [
      [(p) => delete p.devices[0].vbeSatV, 'devices.0.vbeSatV', /BJT needs its base–emitter saturation voltage/],
      [(p) => (p.devices[0].vceSatV = null), 'devices.0.vceSatV', /BJT needs its collector–emitter saturation voltage/],
      [(p) => delete p.devices[0].vceSatAtCurrentA, 'devices.0.vceSatAtCurrentA', /collector current in A at which/],
      [(p) => delete p.devices[0].storageTimeS, 'devices.0.storageTimeS', /storage time/],
      [(p) => (p.devices[0].forcedGain = 0.5), 'devices.0.forcedGain', /must be ≥ 1, got 0\.5.*forced current gain/],
      [(p) => (p.devices[0].vbeSatV = 7), 'devices.0.vbeSatV', /must be ≤ 3, got 7/],
      [(p) => (p.devices[0].storageTimeS = 1e-3), 'devices.0.storageTimeS', /must be ≤ 0\.0001, got 0\.001/],
      [(p) => (p.devices[0].baseCurrentA = 0.1), 'devices.0.forcedGain', /both forcedGain and baseCurrentA/],
      [(p) => (p.devices[0].forcedGain = null), 'devices.0.forcedGain', /neither forcedGain nor baseCurrentA/],
      [(p) => (p.devices[0].kind = 'bipolar'), 'devices.0.kind', /one of "mosfet", "igbt", "bjt", got "bipolar"/],
    ];
    for (const [mutate, field, msg] of cases) {
      const e = failure(mutate);
      expect(e.field, field).toBe(field);
      expect(e.message, field).toMatch(msg);
    }
  });

  it('every numeric field carries minimum, maximum and a description with its unit and range', () => {
    const walk = (s: Record<string, unknown>, path: string): void => {
      if (s.type === 'number') {
        expect(typeof (s.minimum ?? s.exclusiveMinimum), path).toBe('number');
        expect(typeof s.maximum, path).toBe('number');
        expect(String(s.description), path).toMatch(/\(.*[≤<].*\)/);
      }
      for (const [k, v] of Object.entries((s.properties as Record<string, Record<string, unknown>>) ?? {})) walk(v, `${path}.${k}`);
      for (const v of (s.anyOf as Record<string, unknown>[]) ?? []) walk(v, path);
      if (s.items) walk(s.items as Record<string, unknown>, `${path}[]`);
    };
    walk(DriverProfileSchema as unknown as Record<string, unknown>, 'profile');
    // The free-air advice sits in the sink field's description.
    const sink = (DriverProfileSchema as any).properties.devices.items.properties.thermal.properties.sinkToAmbientKPerW;
    expect(sink.description).toMatch(/free air.*junction–ambient resistance/);
  });
});
