/**
 * The engine version an analysis is stamped with: the package version and a digest of the source
 * of everything that turns a file into an analysis (decoders, DSP, analysis pipeline). A stored
 * analysis made by other code is stale and is made again, never served: any change to those files,
 * even one that should not change a figure, re-analyses, which errs on the safe side.
 */
import { createHash } from 'node:crypto';
import { readFileSync, readdirSync } from 'node:fs';
import { join, resolve } from 'node:path';

const ROOT = resolve(new URL('../..', import.meta.url).pathname);
/** Folders whose code decides an analysis's figures. */
const ENGINE_DIRS = ['shared/dsp', 'shared/analysis', 'shared/audio', 'shared/plan/pulse-train.ts', 'server/audio', 'server/analysis', 'server/storage/reductions.ts'];

let cached: string | null = null;

function files(rel: string): string[] {
  const full = join(ROOT, rel);
  if (rel.endsWith('.ts')) return [full];
  return readdirSync(full, { recursive: true, withFileTypes: true })
    .filter((e) => e.isFile() && /\.(ts|cjs|mjs)$/.test(e.name))
    .map((e) => join(e.parentPath, e.name))
    .sort();
}

/** `<package version>+<12 hex digits of the engine sources' SHA-256>`, computed once. */
export function engineVersion(): string {
  if (cached) return cached;
  const pkg = JSON.parse(readFileSync(join(ROOT, 'package.json'), 'utf8')) as { version: string };
  const h = createHash('sha256');
  for (const dir of ENGINE_DIRS) {
    for (const f of files(dir)) {
      h.update(f.slice(ROOT.length));
      h.update(readFileSync(f));
    }
  }
  cached = `${pkg.version}+${h.digest('hex').slice(0, 12)}`;
  return cached;
}

/** The package version. */
export function packageVersion(): string {
  return (JSON.parse(readFileSync(join(ROOT, 'package.json'), 'utf8')) as { version: string }).version;
}
