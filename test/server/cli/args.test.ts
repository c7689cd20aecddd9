import { describe, expect, it } from 'vitest';
import { choiceFlag, numberFlag, parseCommandArgs } from '../../../server/cli/args.ts';
import { InputError } from '../../../shared/errors.ts';

const OPTIONS = { 'gain-db': { type: 'string' }, json: { type: 'boolean' } } as const;

describe('parseCommandArgs', () => {
  it('takes a negative number as the value of a flag', () => {
    const { values, positionals } = parseCommandArgs(['--gain-db', '-3.5', 'clip.wav'], OPTIONS, 'usage');
    expect(values['gain-db']).toBe('-3.5');
    expect(positionals).toEqual(['clip.wav']);
    expect(parseCommandArgs(['--gain-db', '-.5'], OPTIONS, 'usage').values['gain-db']).toBe('-.5');
  });

  it('turns unknown flags into an InputError that shows the usage', () => {
    expect(() => parseCommandArgs(['--loud'], OPTIONS, 'coilcue x [--json]')).toThrow(InputError);
    expect(() => parseCommandArgs(['--loud'], OPTIONS, 'coilcue x [--json]')).toThrow(/Usage: coilcue x/);
  });

  it('checks numbers and choices, naming the flag and the value', () => {
    expect(numberFlag('-3', 'gain-db', { min: -60 })).toBe(-3);
    expect(() => numberFlag('loud', 'gain-db')).toThrow(/--gain-db must be a number, got "loud"/);
    expect(() => numberFlag('-70', 'gain-db', { min: -60 })).toThrow(/at least -60/);
    expect(() => choiceFlag('centre', 'channel', ['mix', 'left'])).toThrow(/one of mix, left/);
  });
});
