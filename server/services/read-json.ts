import { readFile } from 'node:fs/promises';
import { resolve } from 'node:path';
import { InputError } from '../../shared/errors.ts';

/**
 * Reads and parses a JSON file a person named (a path on the command line, or a set file's entry). `what` names it in messages
 * ("coil profile", "set file"); `hint` says where to start when it is not valid JSON.
 * Errors: InputError 'file-not-found' (cannot read, with the reason) or 'bad-json'.
 */
export async function readJsonFile(path: string, cwd: string, what: string, hint: string): Promise<unknown> {
  const full = resolve(cwd, path);
  let text: string;
  try {
    text = await readFile(full, 'utf8');
  } catch (e) {
    const code = (e as NodeJS.ErrnoException).code;
    const why = code === 'ENOENT' ? 'no such file' : code === 'EISDIR' ? 'it is a directory' : code === 'EACCES' ? 'permission denied' : (code ?? 'unreadable');
    throw new InputError('file-not-found', `cannot read ${what} "${path}" (${why}); check the path.`);
  }
  try {
    return JSON.parse(text);
  } catch (e) {
    const msg = e instanceof Error ? e.message : String(e);
    throw new InputError('bad-json', `${what} "${path}" is not valid JSON (${msg}); ${hint}.`);
  }
}
