/**
 * The option tables (server/cli/options.ts, server/cli/commands/tables.ts): one table per command
 * parses, validates and writes the help; every option has a description, a unit for numbers, and
 * the defaults the planner holds.
 */
import { describe, expect, it } from 'vitest';
import { commands } from '../../../server/cli/commands/index.ts';
import { PLAN_OPTIONS, PREVIEW_OPTIONS, RENDER_OPTIONS } from '../../../server/cli/commands/tables.ts';
import { editDistance, helpText, nearest, optionLines, parseOptions } from '../../../server/cli/options.ts';
import { DEFAULT_ALLOWED_SHARE, DEFAULT_MARGIN_K } from '../../../shared/plan/evaluate.ts';
import { DEFAULT_MAX_COLUMNS } from '../../../shared/preview/modulation.ts';
import { InputError } from '../../../shared/errors.ts';

describe('option tables', () => {
  it('every option of every command has a description of a few words, and every number a unit', () => {
    for (const [name, entry] of Object.entries(commands)) {
      for (const [flag, o] of Object.entries(entry.options.options)) {
        expect(o.what.trim().split(/\s+/).length, `${name} --${flag}`).toBeGreaterThanOrEqual(3);
        if (o.type === 'number') expect(o.unit.trim(), `${name} --${flag}`).not.toBe('');
      }
    }
  });

  it('the help lists every option with its description, unit, default and range, from the table', () => {
    for (const [name, entry] of Object.entries(commands)) {
      const help = helpText(entry.options, entry.summary);
      for (const [flag, o] of Object.entries(entry.options.options)) {
        const line = help.split('\n').find((l) => l.trimStart().startsWith(`--${flag}`));
        expect(line, `${name} --${flag}`).toBeDefined();
        expect(line).toContain(o.what);
        if (o.type === 'number') {
          expect(line).toContain(`unit: ${o.unit}`);
          if (o.min !== undefined && o.max !== undefined) expect(line).toContain(`range: ${o.min} to ${o.max}`);
          if (o.default !== undefined) expect(line).toContain(`default: ${o.default}`);
        }
        if (o.type === 'choice') for (const c of o.choices) expect(line).toContain(c);
      }
    }
    expect(optionLines(PLAN_OPTIONS).join('\n')).toMatch(/--allowed-share <fraction>.*unit: fraction 0…1; default: 0\.001; range: 0 to 0\.5/);
  });

  it("the tables' defaults are the planner's and the preview's", () => {
    const o = PLAN_OPTIONS.options;
    expect(o['margin-k'].default).toBe(DEFAULT_MARGIN_K);
    expect(o['allowed-share'].default).toBe(DEFAULT_ALLOWED_SHARE);
    expect(PREVIEW_OPTIONS.options.columns.default).toBe(DEFAULT_MAX_COLUMNS);
  });
});

describe('parseOptions', () => {
  const parse = (...argv: string[]) => parseOptions(argv, RENDER_OPTIONS);
  const base = ['--clip', 'a.wav', '--coil', 'c.json', '--driver', 'd.json', '--out', 'o.wav'];

  it('parses numbers (negative ones too, after their flag or with =), choices and switches, and applies defaults', () => {
    const { values } = parse(...base, '--gain-db', '-3.5', '--ceiling-dbfs=-1', '--format', 's24', '--keep-unsafe');
    expect(values['gain-db']).toBe(-3.5);
    expect(values['ceiling-dbfs']).toBe(-1);
    expect(values.format).toBe('s24');
    expect(values['keep-unsafe']).toBe(true);
    expect(values.json).toBe(false);
    expect(values.channel).toBe('mix');
    expect(values['pre-emphasis-db']).toBe('auto');
    expect(parse(...base, '--pre-emphasis-db', '0').values['pre-emphasis-db']).toBe(0);
    expect(parse(...base, '--pre-emphasis-db', 'AUTO').values['pre-emphasis-db']).toBe('auto');
  });

  it.each([
    ['a bad number', ['--gain-db', 'abc'], /--gain-db must be a number \(dB\), got "abc"/],
    ['a number out of range', ['--gain-db', '90'], /--gain-db must be at most 40 \(dB\), got 90/],
    ['a missing value', ['--gain-db'], /--gain-db needs a value/],
    ['a value that is a flag', ['--gain-db', '--json'], /--gain-db needs a value/],
    ['a bad choice', ['--format', 'mp4'], /--format must be one of s16, s24, f32, got "mp4"/],
    ['an unknown flag, with the nearest', ['--gian-db', '3'], /unknown option --gian-db; did you mean --gain-db\?/],
    ['a single dash', ['-json'], /options take two dashes: write --json/],
    ['a flag twice', ['--json', '--json'], /--json is given twice/],
    ['a value for a switch', ['--json=yes'], /--json is a switch and takes no value/],
    ['a positional', ['extra'], /unexpected argument "extra"/],
  ])('%s', (_, extra, message) => {
    expect(() => parse(...base, ...extra)).toThrow(InputError);
    expect(() => parse(...base, ...extra)).toThrow(message);
  });

  it('names every missing required option, and checks the path endings', () => {
    expect(() => parse('--clip', 'a.wav')).toThrow(/missing --coil, --driver, --out/);
    expect(() => parse('--clip', 'a.wav', '--coil', 'c.json', '--driver', 'd.json', '--out', 'o.mp3')).toThrow(/--out must name a \.wav file/);
  });

  it("runs the command's own checks between options", () => {
    expect(() => parseOptions(['--clip', 'a.wav', '--coil', 'c.json'], PLAN_OPTIONS)).toThrow(/missing --driver \(or give --set/);
    expect(() => parseOptions(['--set', 's.json', '--clip', 'a.wav'], PLAN_OPTIONS)).toThrow(/drop --clip/);
    expect(parseOptions(['--set', 's.json', '--common-gain'], PLAN_OPTIONS).values['common-gain']).toBe(true);
  });
});

describe('nearest', () => {
  it('finds the known name with the fewest edits, and none when nothing is close', () => {
    expect(editDistance('kitten', 'sitting')).toBe(3); // the textbook example of Levenshtein distance [recalled]
    expect(nearest('gian-db', ['gain-db', 'json'])).toBe('gain-db');
    expect(nearest('pln', ['analyze', 'plan', 'render'])).toBe('plan');
    expect(nearest('trac', ['trace', 'clip'])).toBe('trace');
    expect(nearest('zzzzzz', ['plan', 'render'])).toBeNull();
  });
});

describe('README', () => {
  it("lists every option of every command's table, and every exit code", async () => {
    const { readFileSync } = await import('node:fs');
    const readme = readFileSync(new URL('../../../README.md', import.meta.url), 'utf8');
    const section = readme.slice(readme.indexOf('## Commands'), readme.indexOf('## Inputs'));
    for (const [name, entry] of Object.entries(commands)) {
      const row = section.split('\n').find((l) => l.startsWith(`| \`coilcue ${name}`));
      expect(row, name).toBeDefined();
      const rows = section.split('\n').filter((l) => l.startsWith(`| \`coilcue ${name}`)).join('\n');
      for (const flag of Object.keys(entry.options.options)) expect(rows, `${name} --${flag}`).toContain(`--${flag}`);
    }
    for (const code of ['**0**', '**1**', '**2**', '**3**', '**130**']) expect(section).toContain(code);
  });
});
