import { resolve } from 'node:path';
import { InputError } from '../../shared/errors.ts';

/** The options every file-writing command checks the same way: required paths, a .wav output that is not the input. */
export function requireFiles(values: Record<string, unknown>, usage: string): { clip: string; coil: string; driver: string; out: string } {
  const missing = ['clip', 'coil', 'driver', 'out'].filter((k) => typeof values[k] !== 'string' || (values[k] as string).trim() === '');
  if (missing.length) throw new InputError('bad-arguments', `missing ${missing.map((m) => `--${m}`).join(', ')}. Usage: ${usage}`);
  const [clip, coil, driver, out] = (['clip', 'coil', 'driver', 'out'] as const).map((k) => values[k] as string);
  if (!/\.wav$/i.test(out)) throw new InputError('bad-arguments', `--out must name a .wav file (the output is a WAV file), got "${out}"`);
  return { clip, coil, driver, out };
}

/** Refuses to write over the input clip. */
export function refuseOverwriteOfInput(cwd: string, clip: string, out: string): void {
  if (resolve(cwd, clip) === resolve(cwd, out)) {
    throw new InputError('bad-arguments', `--out is the input clip itself (${clip}); choose another output file so the original is kept`);
  }
}

