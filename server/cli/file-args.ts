import { resolve } from 'node:path';
import { InputError } from '../../shared/errors.ts';

/** Refuses to write over the input clip. */
export function refuseOverwriteOfInput(cwd: string, clip: string, out: string): void {
  if (resolve(cwd, clip) === resolve(cwd, out)) {
    throw new InputError('bad-arguments', `--out is the input clip itself (${clip}); choose another output file so the original is kept`);
  }
}

