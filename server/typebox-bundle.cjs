// TypeBox in one file for the command line, the server and their threads.
//
// Why: TypeBox 1.x ships as ~680 small ES modules. Under tsx's CommonJS hook (the way our
// TypeScript runs on Node 20, see bin/coilcue.cjs) each of them is resolved, read, looked up in
// tsx's cache and compiled on its own: loading the profile schemas took ~1.3–2.4 s of a `coilcue
// plan` on a busy machine (the bundle below: ~85 ms, measured with `require` timings). So the
// first run bundles TypeBox's entry points once with esbuild (tsx's own dependency, declared in
// package.json) into node_modules/.cache/coilcue/, keyed by TypeBox's version, and `require`
// of 'typebox', 'typebox/value' or 'typebox/compile' is answered from that bundle. Vitest and the
// browser build load TypeBox their own way and never run this.
//
// If anything here fails (no esbuild, a read-only folder), nothing is redirected: TypeBox loads as
// before, only slower.
'use strict';
const Module = require('node:module');
const { existsSync, mkdirSync, readFileSync, renameSync, rmSync } = require('node:fs');
const { dirname, join } = require('node:path');

/** The entry points our code imports, and the name each has in the bundle. */
const ENTRIES = { typebox: 'root', 'typebox/value': 'value', 'typebox/compile': 'compile' };

function bundlePath() {
  const root = join(__dirname, '..');
  // (TypeBox's exports map does not list its package.json, so it is read from where npm puts it.)
  const { version } = JSON.parse(readFileSync(join(root, 'node_modules', 'typebox', 'package.json'), 'utf8'));
  return { root, file: join(root, 'node_modules', '.cache', 'coilcue', `typebox-${version}.cjs`) };
}

/** Writes the bundle (to a temporary name, then renamed: a concurrent start never reads half a file). */
function build(root, file) {
  const esbuild = require(require.resolve('esbuild', { paths: [root] }));
  const entry = Object.entries(ENTRIES)
    .map(([spec, name]) => `export * as ${name} from '${spec}';`)
    .join('\n');
  const tmp = `${file}.${process.pid}.${Date.now()}.tmp`;
  mkdirSync(dirname(file), { recursive: true });
  try {
    esbuild.buildSync({
      stdin: { contents: entry, resolveDir: root, loader: 'js' },
      bundle: true,
      format: 'cjs',
      platform: 'node',
      target: 'node20',
      outfile: tmp,
      logLevel: 'silent',
    });
    renameSync(tmp, file);
  } finally {
    rmSync(tmp, { force: true });
  }
}

let installed = false;
/** The bundle's entry points by request, once loaded; null when it could not be made (TypeBox then loads as before). */
let bundled;

/** Loads (first building) the bundle and puts each entry point in require's cache; false if that failed. */
function load() {
  if (bundled !== undefined) return bundled !== null;
  let bundle;
  try {
    const { root, file } = bundlePath();
    if (!existsSync(file)) build(root, file);
    bundle = require(file);
  } catch {
    bundled = null;
    return false;
  }
  // Each entry point as an ES module namespace seen from CommonJS (`__esModule`, so that a default
  // import takes its `default` export, as it would from the module itself).
  bundled = {};
  for (const [spec, name] of Object.entries(ENTRIES)) {
    const key = `coilcue-bundled:${spec}`;
    const m = new Module(key);
    m.filename = key;
    m.loaded = true;
    m.exports = Object.assign({}, bundle[name]);
    Object.defineProperty(m.exports, '__esModule', { value: true });
    Module._cache[key] = m;
    bundled[spec] = key;
  }
  return true;
}

/**
 * Answers `require` of TypeBox's entry points from the one-file bundle, loaded (and built, the
 * first time) when TypeBox is first asked for: a command that never validates a profile (analyze)
 * loads none of it.
 */
function install() {
  if (installed) return;
  installed = true;
  const resolve = Module._resolveFilename;
  Module._resolveFilename = function (request, ...rest) {
    if (Object.prototype.hasOwnProperty.call(ENTRIES, request) && load()) return bundled[request];
    return resolve.call(this, request, ...rest);
  };
}

module.exports = { install };
