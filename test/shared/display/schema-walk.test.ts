import { describe, expect, it } from 'vitest';
import Type from 'typebox';
import {
  boundsInWords,
  defaultFor,
  describeNode,
  fieldKind,
  getAt,
  labelOfKey,
  setAt,
  unitOfKey,
  withinBounds,
  type SchemaNode,
} from '../../../shared/display/schema-walk.ts';
import { CoilProfileSchema, parseCoilProfile } from '../../../shared/schemas/coil.ts';
import { DriverProfileSchema } from '../../../shared/schemas/driver.ts';
import { DEMO_COILS } from '../../../shared/demo/coils.ts';

const coil = CoilProfileSchema as unknown as SchemaNode;
const driver = DriverProfileSchema as unknown as SchemaNode;

describe('fieldKind reads the profile schemas as inputs', () => {
  it('numbers carry the schema bounds, integers are marked', () => {
    const k = fieldKind(coil.properties!.secondary.properties!.turns);
    expect(k).toEqual({ kind: 'number', integer: true, nullable: false, bounds: { min: 10, max: 20000, minExclusive: false, maxExclusive: false } });
  });
  it('exclusive bounds are kept as such', () => {
    const k = fieldKind(driver.properties!.supplyVoltageV);
    expect(k.kind === 'number' && k.bounds).toEqual({ min: 0, max: 2000, minExclusive: true, maxExclusive: false });
  });
  it('a nullable number (measured resonance) is a number that may be empty', () => {
    const k = fieldKind(coil.properties!.measured.properties!.resonanceHz);
    expect(k.kind).toBe('number');
    expect(k.kind === 'number' && k.nullable).toBe(true);
    expect(describeNode(coil.properties!.measured.properties!.resonanceHz)).toMatch(/resonant frequency/);
  });
  it('a union of literals is a choice; a union of tagged objects is a set of variants', () => {
    expect(fieldKind(driver.properties!.scheme)).toEqual({ kind: 'choice', options: ['rail-linear', 'rail-switched', 'pulse'] });
    const top = fieldKind(coil.properties!.topLoad);
    expect(top.kind).toBe('variants');
    expect(top.kind === 'variants' && top.tag).toBe('shape');
    expect(top.kind === 'variants' && top.variants.map((v) => v.value)).toEqual(['none', 'sphere', 'torus']);
  });
  it('arrays are lists with their item bounds', () => {
    const k = fieldKind(driver.properties!.devices);
    expect(k.kind === 'list' && [k.minItems, k.maxItems]).toEqual([1, 3]);
  });
  it('a field added to a schema is read without any change here', () => {
    const s = Type.Object({ extraM: Type.Number({ minimum: 1, maximum: 2, description: 'new' }) }) as unknown as SchemaNode;
    const k = fieldKind(s);
    expect(k.kind === 'object' && k.properties.map(([n]) => n)).toEqual(['extraM']);
    expect(unitOfKey('extraM')).toBe('m');
  });
});

describe('units and labels from field names', () => {
  it.each([
    ['formDiameterM', 'm', 'form diameter'],
    ['resonanceHz', 'Hz', 'resonance'],
    ['extraCapacitanceF', 'F', 'extra capacitance'],
    ['riseTimeS', 's', 'rise time'],
    ['tjMaxC', '°C', 'Tj max'],
    ['rKPerW', 'K/W', 'r'],
    ['sinkHeatCapacityJPerK', 'J/K', 'sink heat capacity'],
    ['rdsOnTempCoeffPerK', '1/K', 'Rds on temp coeff'],
    ['rdsOnOhm', 'Ω', 'Rds on'],
    ['turns', '', 'turns'],
    ['maxDuty', '', 'max duty'],
    ['pwmFrequencyHz', 'Hz', 'PWM frequency'],
  ])('%s → %s, "%s"', (key, unit, label) => {
    expect(unitOfKey(key)).toBe(unit);
    expect(labelOfKey(key)).toBe(label);
  });
});

describe('bounds', () => {
  const b = { min: 0, max: 100, minExclusive: true, maxExclusive: false };
  it('states them in words', () => {
    expect(boundsInWords(b)).toBe('above 0, at most 100');
    expect(boundsInWords({ min: 1, max: 2, minExclusive: false, maxExclusive: false })).toBe('1 to 2');
  });
  it('checks them, exclusive bounds included', () => {
    expect(withinBounds(0, b)).toBe(false);
    expect(withinBounds(1e-9, b)).toBe(true);
    expect(withinBounds(100, b)).toBe(true);
    expect(withinBounds(100.0001, b)).toBe(false);
    expect(withinBounds(2.5, { min: 1, max: 5, minExclusive: false, maxExclusive: false }, true)).toBe(false);
    expect(withinBounds(Number.NaN, b)).toBe(false);
  });
});

describe('values by dotted path', () => {
  const p = { a: { b: [1, { c: 2 }] } };
  it('reads and writes without changing the original', () => {
    expect(getAt(p, 'a.b.1.c')).toBe(2);
    const q = setAt(p, 'a.b.1.c', 3);
    expect(getAt(q, 'a.b.1.c')).toBe(3);
    expect(getAt(p, 'a.b.1.c')).toBe(2);
    expect(Array.isArray(getAt(q, 'a.b'))).toBe(true);
  });
  it('undefined removes the key (an optional field left empty is absent)', () => {
    const q = setAt({ x: 1, y: 2 }, 'y', undefined);
    expect(Object.keys(q)).toEqual(['x']);
  });
});

describe('defaultFor', () => {
  it('a default top-load variant and a default coil validate where the schema allows', () => {
    expect(defaultFor((coil.properties!.topLoad as SchemaNode).anyOf![2])).toEqual({ shape: 'torus', outerDiameterM: 0.01, tubeDiameterM: 0.002 });
    // A demo coil with its top load swapped for the default sphere still validates.
    const p = { ...DEMO_COILS['desk-lantern'], topLoad: defaultFor((coil.properties!.topLoad as SchemaNode).anyOf![1]) };
    expect(() => parseCoilProfile(p)).not.toThrow();
  });
});
