// Tests shared/schemas/coil.ts (kept beside the coil model's tests: the coil profile is this
// model's input).
import { describe, expect, it } from 'vitest';
import { InputError } from '../../../../shared/errors.ts';
import { CoilProfileSchema, parseCoilProfile } from '../../../../shared/schemas/coil.ts';

const good = () => ({
  name: 'test coil',
  secondary: { formDiameterM: 0.075, windingLengthM: 0.3, turns: 1000, wireDiameterM: 0.00025 },
  topLoad: { shape: 'sphere', diameterM: 0.12 } as Record<string, unknown>,
  primary: { turns: 4, diameterM: 0.1, windingLengthM: 0.012, offsetM: 0 },
});

/** Parses and returns the InputError thrown (fails the test if none is). */
function errorOf(json: unknown): InputError {
  try {
    parseCoilProfile(json);
  } catch (e) {
    if (e instanceof InputError) return e;
    throw e;
  }
  throw new Error('expected parseCoilProfile to throw');
}

describe('parseCoilProfile', () => {
  it('accepts the documented example and fills defaults (extra capacitance 0, measured null)', () => {
    const p = parseCoilProfile(good());
    expect(p.extraCapacitanceF).toBe(0);
    expect(p.measured).toEqual({ resonanceHz: null, qualityFactor: null });
    expect(p.topLoad).toEqual({ shape: 'sphere', diameterM: 0.12 });
    const withMeasured = parseCoilProfile({ ...good(), measured: { resonanceHz: 350e3, qualityFactor: null } });
    expect(withMeasured.measured).toEqual({ resonanceHz: 350e3, qualityFactor: null });
  });

  it('every numeric field carries minimum, maximum and a description with its unit', () => {
    const walk = (s: Record<string, unknown>, path: string): void => {
      if (s.type === 'number' || s.type === 'integer') {
        expect(typeof s.minimum, path).toBe('number');
        expect(typeof s.maximum, path).toBe('number');
        expect(String(s.description), path).toMatch(/in m\b|in F\b|in Hz\b|in H\b|in V\b|number|dimensionless/);
      }
      for (const v of Object.values((s.properties as Record<string, Record<string, unknown>>) ?? {})) walk(v, path);
      for (const v of (s.anyOf as Record<string, unknown>[]) ?? []) walk(v, path);
    };
    walk(CoilProfileSchema as unknown as Record<string, unknown>, 'profile');
  });

  it.each([
    ['secondary.turns', (j: ReturnType<typeof good>) => { j.secondary.turns = 50000; }, /at most 20000, got 50000/],
    ['secondary.turns', (j: ReturnType<typeof good>) => { j.secondary.turns = 999.5; }, /whole number/],
    ['secondary.wireDiameterM', (j: ReturnType<typeof good>) => { j.secondary.wireDiameterM = 0.25; }, /at most 0\.005, got 0\.25.*unit/],
    ['secondary.formDiameterM', (j: ReturnType<typeof good>) => { (j.secondary as Record<string, unknown>).formDiameterM = '75 mm'; }, /must be a number, got "75 mm"/],
    ['primary.offsetM', (j: ReturnType<typeof good>) => { delete (j.primary as Record<string, unknown>).offsetM; }, /is missing.*axial position/],
    ['primary.turnz', (j: ReturnType<typeof good>) => { (j.primary as Record<string, unknown>).turnz = 3; }, /not a known field.*spelling/],
    ['topLoad.shape', (j: ReturnType<typeof good>) => { j.topLoad = { shape: 'cube' }; }, /"none", "sphere" or "torus", got "cube"/],
    ['topLoad.outerDiameterM', (j: ReturnType<typeof good>) => { j.topLoad = { shape: 'torus', tubeDiameterM: 0.05 }; }, /topLoad.outerDiameterM is missing/],
    ['topLoad.diameterM', (j: ReturnType<typeof good>) => { j.topLoad = { shape: 'sphere', diameterM: -1 }; }, /at least 0\.005, got -1/],
    ['measured.resonanceHz', (j: ReturnType<typeof good>) => { (j as Record<string, unknown>).measured = { resonanceHz: 10 }; }, /at least 1000, got 10/],
  ])('names %s in a message that says what to do', (field, mutate, pattern) => {
    const j = good();
    mutate(j);
    const e = errorOf(j);
    expect(e.code).toBe('bad-profile');
    expect(e.field).toBe(field);
    expect(e.message).toContain(field);
    expect(e.message).toMatch(pattern);
  });

  it('rejects a secondary that does not fit in one layer (turns × wire > length)', () => {
    const j = good();
    j.secondary.windingLengthM = 0.2; // 1000 × 0.25 mm = 250 mm > 200 mm
    const e = errorOf(j);
    expect(e.field).toBe('secondary.turns');
    expect(e.message).toMatch(/one layer/);
    j.secondary.windingLengthM = 0.25; // exactly one full layer is fine
    expect(() => parseCoilProfile(j)).not.toThrow();
  });

  it('rejects a torus without a hole and a primary inside the secondary it overlaps', () => {
    const t = good();
    t.topLoad = { shape: 'torus', outerDiameterM: 0.2, tubeDiameterM: 0.1 };
    expect(errorOf(t).field).toBe('topLoad.tubeDiameterM');
    const p = good();
    p.primary.diameterM = 0.07; // secondary outer diameter 75.5 mm
    expect(errorOf(p).field).toBe('primary.diameterM');
    p.primary.offsetM = -0.1; // entirely below the secondary: allowed
    expect(() => parseCoilProfile(p)).not.toThrow();
  });

  it('rejects non-objects and non-finite numbers', () => {
    expect(errorOf(null).message).toMatch(/must be a JSON object/);
    expect(errorOf([]).code).toBe('bad-profile');
    const j = good();
    j.secondary.windingLengthM = Number.POSITIVE_INFINITY;
    expect(errorOf(j).field).toBe('secondary.windingLengthM');
  });
});
