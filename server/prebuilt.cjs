// The command line and its worker threads from prebuilt files: one esbuild bundle each, made from
// the TypeScript sources on the first run after any of them changed, and kept in
// node_modules/.cache/coilcue/prebuilt-<key>/, the key a digest of every source file's path, size
// and modification time (and package.json's text).
//
// Why: under tsx (bin/coilcue.cjs falls back to it) every run resolves, reads and compiles ~200
// modules and keeps their source maps, in the main thread and again in each worker. That costs
// ~0.2 s of wall time and ~0.4 s of CPU time on every command (measured with `coilcue analyze` on
// the 5-minute benchmark clip: 1.05 s → 0.84 s, CPU 1.75 s → 1.35 s), which the analysis must not
// spend if it is to stay well ahead of ffmpeg's loudness pass (`npm run bench`).
//
// What is built (each a CommonJS bundle of everything it imports, packages included, but for
// native addons):
//   cli.cjs              server/cli/main.ts            (exports main)
//   analysis-worker.cjs  server/analysis/worker-tasks.ts (exports serveAnalysisJobs)
//   reduction-worker.cjs server/services/reduction-serve.ts (exports serveReductions)
// Each module keeps its own import.meta.url (rewritten to its source file's URL), so paths
// computed from it (the project root, the decoding worker) stay what they are under tsx. The
// worker entries (server/analysis/worker-entry.cjs, server/services/reduction-thread.cjs) load the
// prebuilt worker when the main thread says where it is (COILCUE_PREBUILT in the environment,
// which worker threads inherit), and fall back to tsx otherwise (Vitest, the server).
//
// Building takes ~1 s, once. If it fails (no esbuild, a read-only folder), null is returned and
// the caller runs the sources through tsx as before. COILCUE_PREBUILT=off skips it.
'use strict';
// (node:crypto and node:url are required where used: a worker thread that only asks for its
// bundle, prebuiltWorker, should not spend start-up time compiling them.)
const { existsSync, mkdirSync, readdirSync, readFileSync, renameSync, rmSync, statSync, writeFileSync } = require('node:fs');
const { join } = require('node:path');

const ROOT = join(__dirname, '..');
/** Folders whose sources go into the bundles. */
const SOURCE_DIRS = ['server', 'shared'];
/** Bundle name → [source entry, name of the export the caller uses]. */
const ENTRIES = {
  'cli.cjs': 'server/cli/main.ts',
  'analysis-worker.cjs': 'server/analysis/worker-tasks.ts',
  'reduction-worker.cjs': 'server/services/reduction-serve.ts',
};
/** Native addons cannot be bundled; they are required from node_modules as usual. */
const EXTERNAL = ['better-sqlite3'];
const MARK = 'complete';

/** sha-256 (16 hex digits) over every source file's path, size and mtime, and package.json. */
function sourceKey() {
  const h = require('node:crypto').createHash('sha256');
  h.update(readFileSync(join(ROOT, 'package.json')));
  for (const dir of SOURCE_DIRS) {
    const entries = readdirSync(join(ROOT, dir), { recursive: true, withFileTypes: true })
      .filter((e) => e.isFile() && /\.(ts|cjs|mjs|js|json)$/.test(e.name))
      .map((e) => join(e.parentPath, e.name))
      .sort();
    for (const f of entries) {
      const st = statSync(f);
      h.update(`${f.slice(ROOT.length)}\0${st.size}\0${st.mtimeMs}\n`);
    }
  }
  return h.digest('hex').slice(0, 16);
}

/** esbuild plugin: each TypeScript module's import.meta.url becomes its own source file's URL. */
const ownUrl = {
  name: 'own-import-meta-url',
  setup(build) {
    const { pathToFileURL } = require('node:url');
    build.onLoad({ filter: /\.ts$/ }, (args) => {
      const text = readFileSync(args.path, 'utf8');
      return { contents: text.split('import.meta.url').join(JSON.stringify(pathToFileURL(args.path).href)), loader: 'ts' };
    });
  },
};

/** Builds every bundle into `dir` (a fresh folder), marking it complete last. */
async function build(dir) {
  const esbuild = require(require.resolve('esbuild', { paths: [ROOT] }));
  await Promise.all(
    Object.entries(ENTRIES).map(([name, entry]) =>
      esbuild.build({
        entryPoints: [join(ROOT, entry)],
        outfile: join(dir, name),
        bundle: true,
        format: 'cjs',
        platform: 'node',
        target: 'node20',
        external: EXTERNAL,
        plugins: [ownUrl],
        logLevel: 'silent',
      }),
    ),
  );
  writeFileSync(join(dir, MARK), '');
}

/** A prebuilt folder of other sources built this long ago is removed when a new one is built. */
const STALE_MS = 3600 * 1000;

/**
 * Removes prebuilt folders of other sources built over an hour ago (a checkout sharing
 * node_modules, or a run still under way, may be using a recent one; a worker that finds its folder
 * gone loads the sources instead; a failure here is harmless).
 */
function prune(cache, keep) {
  const now = Date.now();
  for (const e of readdirSync(cache)) {
    if (e === keep || !e.startsWith('prebuilt-')) continue;
    const dir = join(cache, e);
    try {
      if (now - statSync(dir).mtimeMs > STALE_MS) rmSync(dir, { recursive: true, force: true });
    } catch {
      // gone already
    }
  }
}

/**
 * The folder of up-to-date bundles (built now if need be), or null when they cannot be had.
 * @returns {Promise<string | null>}
 */
async function prebuilt() {
  if (process.env.COILCUE_PREBUILT === 'off') return null;
  try {
    const cache = join(ROOT, 'node_modules', '.cache', 'coilcue');
    const name = `prebuilt-${sourceKey()}`;
    const dir = join(cache, name);
    if (existsSync(join(dir, MARK))) return dir;
    // Built under a name of its own and renamed whole, so a run started meanwhile never sees half of it.
    const tmp = `${dir}.${process.pid}.${Date.now()}.tmp`;
    mkdirSync(tmp, { recursive: true });
    try {
      await build(tmp);
      try {
        renameSync(tmp, dir);
      } catch {
        // another run finished first: its folder is as good
      }
    } finally {
      rmSync(tmp, { recursive: true, force: true });
    }
    if (!existsSync(join(dir, MARK))) return null;
    prune(cache, name);
    return dir;
  } catch {
    return null;
  }
}

/**
 * The prebuilt worker `name` when the main thread runs from prebuilt bundles (COILCUE_PREBUILT
 * holds their folder), else null: the caller then loads the sources through tsx.
 */
function prebuiltWorker(name) {
  const dir = process.env.COILCUE_PREBUILT;
  if (!dir || dir === 'off') return null;
  try {
    return require(join(dir, name));
  } catch {
    return null;
  }
}

module.exports = { prebuilt, prebuiltWorker };
