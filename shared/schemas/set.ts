/**
 * A set file: the clips of a show in order, with the gap after each, for one coil and driver.
 * `{ "coil": "path", "driver": "path", "items": [ { "clip": "path", "gapAfterS": 30, "gainDb": null } ] }`
 * Paths are relative to the set file. Validated by hand (a handful of fields) with messages that
 * name the field, the rule, the value and what to do.
 */
import { InputError } from '../errors.ts';

export interface SetFileItem {
  clip: string;
  gapAfterS: number;
  gainDb: number | null;
}

export interface SetFile {
  coil: string;
  driver: string;
  items: SetFileItem[];
}

const bad = (field: string, msg: string) => new InputError('bad-set', msg, field);
const isObj = (x: unknown): x is Record<string, unknown> => typeof x === 'object' && x !== null && !Array.isArray(x);

/** Validates a parsed set file; throws InputError('bad-set', …, field). */
export function parseSetFile(json: unknown): SetFile {
  if (!isObj(json)) throw bad('', 'the set file must be a JSON object with "coil", "driver" and "items"');
  for (const k of Object.keys(json)) {
    if (!['coil', 'driver', 'items'].includes(k)) throw bad(k, `unknown field ${k} in the set file: remove it or correct its spelling`);
  }
  for (const k of ['coil', 'driver'] as const) {
    if (typeof json[k] !== 'string' || json[k] === '') throw bad(k, `${k} must be the path of the ${k} profile (relative to the set file), got ${JSON.stringify(json[k])}`);
  }
  const items = json.items;
  if (!Array.isArray(items) || items.length === 0) throw bad('items', 'items must be a non-empty list of { "clip", "gapAfterS", "gainDb" }: add the clips of the set in playing order');
  if (items.length > 500) throw bad('items', `items holds ${items.length} clips, more than the 500 a set may hold: split the show into several sets`);
  const out = items.map((it, i): SetFileItem => {
    const at = `items.${i}`;
    if (!isObj(it)) throw bad(at, `${at} must be an object { "clip", "gapAfterS", "gainDb" }`);
    for (const k of Object.keys(it)) {
      if (!['clip', 'gapAfterS', 'gainDb'].includes(k)) throw bad(`${at}.${k}`, `unknown field ${at}.${k}: remove it or correct its spelling`);
    }
    if (typeof it.clip !== 'string' || it.clip === '') throw bad(`${at}.clip`, `${at}.clip must be the path of an audio file, got ${JSON.stringify(it.clip)}`);
    const gap = it.gapAfterS ?? 0;
    if (typeof gap !== 'number' || !Number.isFinite(gap) || gap < 0 || gap > 86400) {
      throw bad(`${at}.gapAfterS`, `${at}.gapAfterS must be a number of seconds from 0 to 86400, got ${JSON.stringify(it.gapAfterS)}`);
    }
    const gain = it.gainDb ?? null;
    if (gain !== null && (typeof gain !== 'number' || !Number.isFinite(gain) || gain < -60 || gain > 40)) {
      throw bad(`${at}.gainDb`, `${at}.gainDb must be null (advise it) or a number of dB from -60 to 40, got ${JSON.stringify(it.gainDb)}`);
    }
    return { clip: it.clip, gapAfterS: gap, gainDb: gain };
  });
  return { coil: json.coil as string, driver: json.driver as string, items: out };
}
