/**
 * One option table per command: each entry says what the option is, its unit, its default and its
 * allowed range, and the same entry parses and validates the value and writes the help line. There
 * is no second copy: `coilcue <command> --help` is generated from the table, and a value the help
 * does not allow is refused with a message that names the flag, the rule and the value.
 *
 * Light on purpose (no imports beyond the error type and Node's file system): the command line
 * parses a command's options before it starts the analysis worker or loads the command's module,
 * so a mistyped flag costs no thread and no file handle.
 *
 * Convention for shares: a share is a fraction 0…1 in every flag, in the help and in JSON; text
 * output prints it as a percentage with the word "%" (0.001 → "0.100 %").
 */
import { access, stat } from 'node:fs/promises';
import { resolve } from 'node:path';
import { InputError } from '../../shared/errors.ts';

/** A number: what it is, its unit, its range; `auto` names a word accepted instead of a number. */
export interface NumberOption {
  type: 'number';
  what: string;
  /** Unit as the help shows it ("dB", "K", "°C", "fraction 0…1", "ms"). */
  unit: string;
  /** The default: a number, or the `word` when the word is the default. */
  default?: number | string;
  /** Default shown in the help when it is not a fixed number ("the advised gain"). */
  defaultText?: string;
  min?: number;
  max?: number;
  integer?: boolean;
  /** A word accepted instead of a number (e.g. "auto"); the parsed value is then that word. */
  word?: string;
}

export interface ChoiceOption {
  type: 'choice';
  what: string;
  choices: readonly string[];
  default?: string;
}

/** A path (or other text). `ext`: required ending, e.g. ".wav". */
export interface PathOption {
  type: 'path';
  what: string;
  /** The value's placeholder in the help: "file.wav", "coil.json". */
  value: string;
  required?: boolean;
  ext?: string;
  defaultText?: string;
  /** An input file that must exist and be readable (checked by checkInputFiles before any work starts). */
  input?: boolean;
}

export interface FlagOption {
  type: 'flag';
  what: string;
}

export type OptionSpec = NumberOption | ChoiceOption | PathOption | FlagOption;
export type OptionTable = Record<string, OptionSpec>;

/** A command's table: its options, the positional arguments it takes, and its usage line(s). */
export interface CommandOptions<T extends OptionTable = OptionTable> {
  name: string;
  options: T;
  /** Positional arguments: their placeholders ("<file>"), how many at least and at most. */
  positionals?: { value: string; what: string; min: number; max: number; input?: boolean };
  /** Extra usage forms and notes printed under the option list. */
  notes?: string[];
  /**
   * Checks between options (one requires or excludes another), run at the end of parsing with the
   * parsed values; returns the message of the first problem, or null.
   */
  check?(values: Record<string, unknown>, positionals: readonly string[]): string | null;
}

type ValueOf<O> = O extends NumberOption
  ? O['word'] extends string
    ? number | NonNullable<O['word']>
    : number
  : O extends ChoiceOption
    ? O['choices'][number]
    : O extends PathOption
      ? string
      : boolean;

type HasDefault<O> = O extends FlagOption ? true : O extends { default: number | string } ? true : O extends { required: true } ? true : false;

/** The parsed values: defaults applied, numbers as numbers, flags as booleans. */
export type OptionValues<T extends OptionTable> = { [K in keyof T]: HasDefault<T[K]> extends true ? ValueOf<T[K]> : ValueOf<T[K]> | undefined };

export interface ParsedOptions<T extends OptionTable> {
  values: OptionValues<T>;
  positionals: string[];
}

/** Identity with the table's literal types kept: `const TABLE = defineCommand({...})`. */
export function defineCommand<const T extends OptionTable>(c: CommandOptions<T>): CommandOptions<T> {
  return c;
}

const bad = (msg: string, field?: string) => new InputError('bad-arguments', msg, field);

/** Levenshtein distance (insertions, deletions, substitutions), for "did you mean". */
export function editDistance(a: string, b: string): number {
  let prev = Array.from({ length: b.length + 1 }, (_, j) => j);
  for (let i = 1; i <= a.length; i++) {
    const cur = [i];
    for (let j = 1; j <= b.length; j++) cur[j] = Math.min(prev[j] + 1, cur[j - 1] + 1, prev[j - 1] + (a[i - 1] === b[j - 1] ? 0 : 1));
    prev = cur;
  }
  return prev[b.length];
}

/** The known name nearest to `name` (fewest edits; a prefix match counts as near), or null when none is close. */
export function nearest(name: string, known: readonly string[]): string | null {
  let best: string | null = null;
  let bestD = Infinity;
  for (const k of known) {
    const d = k.startsWith(name) || name.startsWith(k) ? Math.min(1, editDistance(name, k)) : editDistance(name, k);
    if (d < bestD) {
      bestD = d;
      best = k;
    }
  }
  return best !== null && bestD <= Math.max(2, Math.floor(name.length / 3)) ? best : null;
}

function rangeText(o: NumberOption): string {
  const parts: string[] = [];
  if (o.min !== undefined && o.max !== undefined) parts.push(`${o.min} to ${o.max}`);
  else if (o.min !== undefined) parts.push(`at least ${o.min}`);
  else if (o.max !== undefined) parts.push(`at most ${o.max}`);
  if (o.integer) parts.push('whole number');
  if (o.word) parts.push(`or "${o.word}"`);
  return parts.join(', ');
}

function parseNumber(flag: string, o: NumberOption, raw: string): number | string {
  if (o.word !== undefined && raw.trim().toLowerCase() === o.word) return o.word;
  const x = Number(raw);
  if (raw.trim() === '' || !Number.isFinite(x)) {
    throw bad(`--${flag} must be a number${o.word ? ` or "${o.word}"` : ''} (${o.unit}), got "${raw}"`, flag);
  }
  if (o.min !== undefined && x < o.min) throw bad(`--${flag} must be at least ${o.min} (${o.unit}), got ${x}`, flag);
  if (o.max !== undefined && x > o.max) throw bad(`--${flag} must be at most ${o.max} (${o.unit}), got ${x}`, flag);
  if (o.integer && !Number.isInteger(x)) throw bad(`--${flag} must be a whole number, got ${x}`, flag);
  return x;
}

/** Looks like a number (so `--gain-db -3` takes -3 as the value, not as a flag). */
const NUMERIC = /^-(\d|\.\d|inf)/i;

/**
 * Parses `argv` against the table: `--name value` or `--name=value`; `--` ends the options. Every
 * value is validated here (numbers and their ranges, choices, required paths and their endings),
 * defaults are applied, and positionals are counted. Throws InputError('bad-arguments') naming the
 * flag, the rule and the value; an unknown flag names the nearest known one.
 */
export function parseOptions<T extends OptionTable>(argv: readonly string[], c: CommandOptions<T>): ParsedOptions<T> {
  const usage = usageLine(c);
  const raw: Record<string, string | true> = {};
  const positionals: string[] = [];
  const names = Object.keys(c.options);
  for (let i = 0; i < argv.length; i++) {
    const a = argv[i];
    if (a === '--') {
      positionals.push(...argv.slice(i + 1));
      break;
    }
    if (!a.startsWith('-') || a === '-' || NUMERIC.test(a)) {
      positionals.push(a);
      continue;
    }
    const eq = a.indexOf('=');
    const name = (eq >= 0 ? a.slice(0, eq) : a).replace(/^--?/, '');
    const spec = Object.hasOwn(c.options, name) ? c.options[name] : undefined;
    if (!spec) {
      const near = nearest(name, names);
      throw bad(`unknown option ${eq >= 0 ? a.slice(0, eq) : a}${near ? `; did you mean --${near}?` : '.'} Usage: ${usage}`);
    }
    if (!a.startsWith('--')) throw bad(`options take two dashes: write --${name}. Usage: ${usage}`, name);
    if (Object.hasOwn(raw, name)) throw bad(`--${name} is given twice; give it once`, name);
    if (spec.type === 'flag') {
      if (eq >= 0) throw bad(`--${name} is a switch and takes no value, got "${a.slice(eq + 1)}"`, name);
      raw[name] = true;
      continue;
    }
    let value: string | undefined;
    if (eq >= 0) value = a.slice(eq + 1);
    else {
      const next = argv[i + 1];
      if (next !== undefined && (!next.startsWith('-') || next === '-' || NUMERIC.test(next))) {
        value = next;
        i++;
      }
    }
    if (value === undefined) throw bad(`--${name} needs a value (${placeholder(spec)}). Usage: ${usage}`, name);
    raw[name] = value;
  }

  const values: Record<string, unknown> = {};
  for (const [name, spec] of Object.entries(c.options)) {
    const r = raw[name];
    switch (spec.type) {
      case 'flag':
        values[name] = r === true;
        break;
      case 'number':
        values[name] = r === undefined ? spec.default : parseNumber(name, spec, r as string);
        break;
      case 'choice':
        if (r !== undefined && !spec.choices.includes(r as string)) {
          const near = nearest(r as string, spec.choices);
          throw bad(`--${name} must be one of ${spec.choices.join(', ')}, got "${r}"${near ? `; did you mean ${near}?` : ''}`, name);
        }
        values[name] = r ?? spec.default;
        break;
      case 'path': {
        const v = typeof r === 'string' ? r : undefined;
        if (v !== undefined && v.trim() === '') throw bad(`--${name} is empty; give ${placeholder(spec)}`, name);
        if (v !== undefined && spec.ext && !v.toLowerCase().endsWith(spec.ext)) {
          throw bad(`--${name} must name a ${spec.ext} file, got "${v}"`, name);
        }
        values[name] = v;
        break;
      }
    }
  }
  const missing = Object.entries(c.options).filter(([n, s]) => s.type === 'path' && s.required && values[n] === undefined).map(([n]) => `--${n}`);
  if (missing.length) throw bad(`missing ${missing.join(', ')}. Usage: ${usage}`);
  const p = c.positionals ?? { value: '', what: '', min: 0, max: 0 };
  if (positionals.length > p.max) {
    throw bad(p.max === 0 ? `unexpected argument "${positionals[0]}"; every input is an option. Usage: ${usage}` : `give at most ${p.max} ${p.value}, got ${positionals.length}. Usage: ${usage}`);
  }
  if (positionals.length < p.min) throw bad(`give ${p.value} (${p.what}). Usage: ${usage}`);
  const problem = c.check?.(values, positionals) ?? null;
  if (problem !== null) throw bad(`${problem}. Usage: ${usage}`);
  return { values: values as OptionValues<T>, positionals };
}

function placeholder(o: OptionSpec): string {
  switch (o.type) {
    case 'number':
      return `<${o.unit.startsWith('fraction') ? 'fraction' : o.unit}>`;
    case 'choice':
      return o.choices.join('|');
    case 'path':
      return `<${o.value}>`;
    case 'flag':
      return '';
  }
}

/** `coilcue render --clip <audio> … [--gain-db <dB>] …`: required options first, then the optional ones. */
export function usageLine(c: CommandOptions): string {
  const parts = [`coilcue ${c.name}`];
  if (c.positionals) parts.push(c.positionals.min > 0 ? c.positionals.value : `[${c.positionals.value}]`);
  for (const [n, o] of Object.entries(c.options)) {
    const v = placeholder(o);
    const text = v ? `--${n} ${v}` : `--${n}`;
    parts.push(o.type === 'path' && o.required ? text : `[${text}]`);
  }
  return parts.join(' ');
}

/** One line per option: what it is, its unit, its default and its range (the same table that validates). */
export function optionLines(c: CommandOptions): string[] {
  const rows: [string, string][] = [];
  if (c.positionals) rows.push([c.positionals.value, c.positionals.what]);
  for (const [n, o] of Object.entries(c.options)) {
    const v = placeholder(o);
    const left = v ? `--${n} ${v}` : `--${n}`;
    const bits: string[] = [o.what];
    if (o.type === 'number') {
      bits.push(`unit: ${o.unit}`);
      const d = o.default !== undefined ? String(o.default) : o.defaultText;
      if (d !== undefined) bits.push(`default: ${d}`);
      const r = rangeText(o);
      if (r) bits.push(`range: ${r}`);
    } else if (o.type === 'choice') {
      if (o.default !== undefined) bits.push(`default: ${o.default}`);
    } else if (o.type === 'path') {
      if (o.required) bits.push('required');
      else if (o.defaultText) bits.push(`default: ${o.defaultText}`);
    }
    rows.push([left, bits.join('; ')]);
  }
  const w = Math.max(...rows.map(([l]) => l.length));
  return rows.map(([l, r]) => `  ${l.padEnd(w)}  ${r}`);
}

/** The whole `--help` text of a command. */
export function helpText(c: CommandOptions, summary: string): string {
  return [summary, `Usage: ${usageLine(c)}`, ...(c.notes ?? []).map((n) => `       ${n}`), '', 'Options:', ...optionLines(c), ''].join('\n');
}

/**
 * Checks that every input file the options name exists and can be read (fs.access, no handle kept
 * open), so a mistyped path fails at once with exit code 2, before any thread starts or module
 * loads. Positionals count as inputs when the table says `positionals.input`.
 */
export async function checkInputFiles(c: CommandOptions, parsed: ParsedOptions<OptionTable>, cwd: string): Promise<void> {
  const named: [string, string][] = [];
  for (const [n, o] of Object.entries(c.options)) {
    const v = (parsed.values as Record<string, unknown>)[n];
    if (o.type === 'path' && o.input && typeof v === 'string') named.push([`--${n}`, v]);
  }
  if (c.positionals?.input) for (const p of parsed.positionals) named.push([c.positionals.value, p]);
  for (const [flag, path] of named) {
    const full = resolve(cwd, path);
    try {
      await access(full);
      if ((await stat(full)).isDirectory()) throw Object.assign(new Error('dir'), { code: 'EISDIR' });
    } catch (e) {
      const code = (e as { code?: string }).code;
      const why = code === 'ENOENT' ? 'no such file' : code === 'EISDIR' ? 'it is a folder' : code === 'EACCES' ? 'permission denied' : (code ?? 'unreadable');
      throw bad(`cannot read ${flag} "${path}" (${why}); check the path`, flag.replace(/^--/, ''));
    }
  }
}
