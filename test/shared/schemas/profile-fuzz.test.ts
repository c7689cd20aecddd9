// Every numeric field of the coil and driver profiles, and of a set file, fed what a damaged or
// hand-edited file can hold: NaN, ±Infinity (JSON's 1e999 parses to Infinity), negatives, zero,
// huge values, strings, null and a missing key. Each case ends either in an InputError that names
// the field, or in a profile whose model answers with finite figures: no NaN, no negative
// resistance, no junction below ambient. The fields are found by walking the demo profiles, so a
// field added to a schema is covered without touching this file.
import { describe, expect, it } from 'vitest';
import { DEMO_COILS } from '../../../shared/demo/coils.ts';
import { DEMO_DRIVERS } from '../../../shared/demo/drivers.ts';
import { isInputError } from '../../../shared/errors.ts';
import { analyzeCoil } from '../../../shared/physics/coil/analyze.ts';
import { evaluateAtGain, planSettings } from '../../../shared/plan/evaluate.ts';
import { parseCoilProfile } from '../../../shared/schemas/coil.ts';
import { parseDriverProfile } from '../../../shared/schemas/driver.ts';
import { parseSetFile } from '../../../shared/schemas/set.ts';
import { everyNumberFinite } from '../../server/audio/finite.ts';
import { COIL, planClip, tone } from '../plan/fixtures.ts';

const MISSING = Symbol('missing');
const BAD_VALUES: unknown[] = [Number.NaN, Number.POSITIVE_INFINITY, Number.NEGATIVE_INFINITY, -1, 0, 1e300, '12', null, MISSING];

/** Dotted paths of every number in a JSON-like value (array indices as path segments). */
function numericPaths(x: unknown, prefix = ''): string[] {
  if (typeof x === 'number') return [prefix];
  if (x === null || typeof x !== 'object') return [];
  return Object.entries(x).flatMap(([k, v]) => numericPaths(v, prefix ? `${prefix}.${k}` : k));
}

/** A deep copy of `x` with the value at `path` replaced (or removed, for MISSING). */
function withValue(x: unknown, path: string, value: unknown): unknown {
  const copy = structuredClone(x) as Record<string, unknown>;
  const keys = path.split('.');
  let at: Record<string, unknown> = copy;
  for (const k of keys.slice(0, -1)) at = at[k] as Record<string, unknown>;
  const last = keys[keys.length - 1];
  if (value === MISSING) delete at[last];
  else at[last] = value;
  return copy;
}

/** Numbers whose name says they are resistances must not be negative. */
function firstNegativeResistance(doc: unknown, path = '$'): string | null {
  if (doc === null || typeof doc !== 'object' || ArrayBuffer.isView(doc)) return null;
  for (const [k, v] of Object.entries(doc)) {
    if (typeof v === 'number' && /(Ohm|KPerW)$/.test(k) && v < 0) return `${path}.${k} = ${v}`;
    const bad = firstNegativeResistance(v, `${path}.${k}`);
    if (bad) return bad;
  }
  return null;
}

/** The refusal names the field (or the rule that ties it to another field, by name). */
function expectNamesField(e: unknown, path: string): void {
  if (!isInputError(e)) throw e;
  const last = path.split('.').filter((k) => !/^\d+$/.test(k)).pop() ?? path;
  const named = e.field === path || (e.field !== undefined && path.startsWith(`${e.field}.`)) || e.message.includes(last);
  expect(named, `${path}: refused as "${e.field}": ${e.message}`).toBe(true);
  expect(e.message).not.toMatch(/\n/);
}

describe('coil profiles: each numeric field, each bad value', () => {
  for (const [name, coil] of Object.entries(DEMO_COILS)) {
    it(`${name}: refused with the field named, or modelled with finite figures`, () => {
      let refused = 0;
      let modelled = 0;
      for (const path of numericPaths(coil)) {
        for (const value of BAD_VALUES) {
          let profile;
          try {
            profile = parseCoilProfile(withValue(coil, path, value));
          } catch (e) {
            expectNamesField(e, path);
            refused++;
            continue;
          }
          const report = analyzeCoil(profile);
          expect(everyNumberFinite(report), `${path} = ${String(value)}`).toBeNull();
          expect(firstNegativeResistance(report), `${path} = ${String(value)}`).toBeNull();
          modelled++;
        }
      }
      // Both kinds occur (a 0 offset or extra capacitance is valid, NaN never is): the walk reached the fields.
      expect(refused).toBeGreaterThan(10);
      expect(modelled).toBeGreaterThan(0);
    });
  }
});

describe('driver profiles: each numeric field, each bad value', () => {
  // A short tone planned at full gain: enough to drive every device through the models.
  const clip = planClip('tone', tone(220, 0.8, 0.5), { pulses: true });
  for (const driver of DEMO_DRIVERS) {
    it(`${driver.name}: refused with the field named, or simulated with finite figures above ambient`, () => {
      let refused = 0;
      let simulated = 0;
      for (const path of numericPaths(driver)) {
        for (const value of BAD_VALUES) {
          let profile;
          try {
            profile = parseDriverProfile(withValue(driver, path, value));
          } catch (e) {
            expectNamesField(e, path);
            refused++;
            continue;
          }
          const settings = planSettings(profile);
          const ev = evaluateAtGain(clip, COIL, profile, 0, settings);
          const at = `${path} = ${String(value)}`;
          expect(everyNumberFinite(ev.limits), at).toBeNull();
          for (const d of ev.sim.devices) {
            expect(Number.isFinite(d.peakJunctionC), at).toBe(true);
            expect(d.peakJunctionC, at).toBeGreaterThanOrEqual(settings.ambientC - 1e-9);
            expect(d.meanLossW, at).toBeGreaterThanOrEqual(0);
          }
          simulated++;
        }
      }
      expect(refused).toBeGreaterThan(20);
      expect(simulated).toBeGreaterThan(0);
    });
  }
});

describe('set files: gaps and gains', () => {
  const good = { coil: 'c.json', driver: 'd.json', items: [{ clip: 'a.wav', gapAfterS: 10, gainDb: null }] };
  for (const path of ['items.0.gapAfterS', 'items.0.gainDb']) {
    for (const value of BAD_VALUES) {
      it(`${path} = ${String(value)}`, () => {
        let parsed;
        try {
          parsed = parseSetFile(withValue(good, path, value));
        } catch (e) {
          expectNamesField(e, path);
          return;
        }
        const it0 = parsed.items[0];
        expect(it0.gapAfterS).toBeGreaterThanOrEqual(0);
        expect(Number.isFinite(it0.gapAfterS)).toBe(true);
        expect(it0.gainDb === null || Number.isFinite(it0.gainDb)).toBe(true);
      });
    }
  }
});
