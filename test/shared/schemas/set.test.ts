import { describe, expect, it } from 'vitest';
import { InputError } from '../../../shared/errors.ts';
import { parseSetFile } from '../../../shared/schemas/set.ts';

const item = (over: Record<string, unknown> = {}) => ({ clip: 'a.wav', gapAfterS: 30, gainDb: null, ...over });
const set = (over: Record<string, unknown> = {}) => ({ coil: 'coil.json', driver: 'driver.json', items: [item()], ...over });

/** The InputError a bad set file throws (fails the test when none is thrown). */
function errorOf(json: unknown): InputError {
  try {
    parseSetFile(json);
  } catch (e) {
    expect(e).toBeInstanceOf(InputError);
    return e as InputError;
  }
  throw new Error('parseSetFile accepted a bad set file');
}

describe('parseSetFile', () => {
  it('accepts a set and fills the defaults: no gap, gain advised', () => {
    const s = parseSetFile(set({ items: [item(), { clip: 'b.flac' }, item({ gainDb: -6.5, gapAfterS: 0 })] }));
    expect(s.coil).toBe('coil.json');
    expect(s.items).toEqual([
      { clip: 'a.wav', gapAfterS: 30, gainDb: null },
      { clip: 'b.flac', gapAfterS: 0, gainDb: null },
      { clip: 'a.wav', gapAfterS: 0, gainDb: -6.5 },
    ]);
    // The range ends are allowed.
    expect(parseSetFile(set({ items: [item({ gapAfterS: 86400, gainDb: 40 }), item({ gainDb: -60 })] })).items).toHaveLength(2);
  });

  // Each bad input: the field the error names, and words its message must contain.
  it.each([
    ['a list instead of an object', [], '', /JSON object/],
    ['an unknown top-level field', set({ gap: 3 }), 'gap', /unknown field gap/],
    ['no coil', set({ coil: undefined }), 'coil', /coil must be the path/],
    ['an empty driver path', set({ driver: '' }), 'driver', /driver must be the path/],
    ['no items', set({ items: [] }), 'items', /non-empty list/],
    ['items not a list', set({ items: { clip: 'a.wav' } }), 'items', /non-empty list/],
    ['more than 500 items', set({ items: Array.from({ length: 501 }, () => item()) }), 'items', /501 clips, more than the 500/],
    ['an item that is not an object', set({ items: [item(), 'b.wav'] }), 'items.1', /items\.1 must be an object/],
    ['an unknown item field', set({ items: [item({ gain: 3 })] }), 'items.0.gain', /unknown field items\.0\.gain/],
    ['an item without a clip', set({ items: [item({ clip: undefined })] }), 'items.0.clip', /items\.0\.clip must be the path of an audio file/],
    ['a negative gap', set({ items: [item(), item({ gapAfterS: -1 })] }), 'items.1.gapAfterS', /items\.1\.gapAfterS must be a number of seconds from 0 to 86400, got -1/],
    ['a gap given as text', set({ items: [item({ gapAfterS: '30' })] }), 'items.0.gapAfterS', /got "30"/],
    ['a gap over a day', set({ items: [item({ gapAfterS: 86401 })] }), 'items.0.gapAfterS', /86400/],
    ['a gain above +40 dB', set({ items: [item({ gainDb: 41 })] }), 'items.0.gainDb', /items\.0\.gainDb must be null \(advise it\) or a number of dB from -60 to 40, got 41/],
    ['a gain given as text', set({ items: [item({ gainDb: '-3' })] }), 'items.0.gainDb', /got "-3"/],
  ])('rejects %s, naming the field', (_what, json, field, message) => {
    const e = errorOf(json);
    expect(e.code).toBe('bad-set');
    expect(e.field).toBe(field);
    expect(e.message).toMatch(message);
    if (field) expect(e.message).toContain(field);
    // One line, for the command line's one-line error.
    expect(e.message).not.toContain('\n');
  });
});
