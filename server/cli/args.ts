import { parseArgs, type ParseArgsConfig } from 'node:util';
import { InputError } from '../../shared/errors.ts';

/**
 * node:util parseArgs with our error convention: unknown flags and missing values become an
 * InputError whose message names the flag and shows the usage line.
 */
export function parseCommandArgs<T extends NonNullable<ParseArgsConfig['options']>>(
  argv: string[],
  options: T,
  usage: string,
) {
  try {
    return parseArgs({ args: joinNegativeValues(argv, options), allowPositionals: true, options, strict: true });
  } catch (e) {
    const msg = e instanceof Error ? e.message.split('\n')[0] : String(e);
    throw new InputError('bad-arguments', `${msg}. Usage: ${usage}`);
  }
}

/**
 * node:util parseArgs reads `--gain-db -3` as a flag followed by an unknown flag `-3`; a value
 * option followed by a negative number is joined into `--gain-db=-3` first.
 */
function joinNegativeValues(argv: string[], options: NonNullable<ParseArgsConfig['options']>): string[] {
  const out: string[] = [];
  for (let i = 0; i < argv.length; i++) {
    const a = argv[i];
    const next = argv[i + 1];
    const name = a.startsWith('--') ? a.slice(2) : '';
    if (options[name]?.type === 'string' && next !== undefined && /^-(\d|\.\d|inf)/i.test(next)) {
      out.push(`${a}=${next}`);
      i++;
    } else out.push(a);
  }
  return out;
}

/** A flag that must parse as a finite number; names the flag and the value when it does not. */
export function numberFlag(
  value: string | undefined,
  flag: string,
  range: { min?: number; max?: number } = {},
): number | undefined {
  if (value === undefined) return undefined;
  const x = Number(value);
  if (value.trim() === '' || !Number.isFinite(x)) {
    throw new InputError('bad-arguments', `--${flag} must be a number, got "${value}"`);
  }
  if (range.min !== undefined && x < range.min) {
    throw new InputError('bad-arguments', `--${flag} must be at least ${range.min}, got ${x}`);
  }
  if (range.max !== undefined && x > range.max) {
    throw new InputError('bad-arguments', `--${flag} must be at most ${range.max}, got ${x}`);
  }
  return x;
}

/** One-of flag; the message lists the allowed values. */
export function choiceFlag<C extends string>(
  value: string | undefined,
  flag: string,
  choices: readonly C[],
): C | undefined {
  if (value === undefined) return undefined;
  if (!(choices as readonly string[]).includes(value)) {
    throw new InputError('bad-arguments', `--${flag} must be one of ${choices.join(', ')}, got "${value}"`);
  }
  return value as C;
}
