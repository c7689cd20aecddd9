// The score of a folder after re-checks: a Stryker JSON report (stryker/report-<folder>.json) with
// the mutants that re-check logs (recheck.mjs output) print as killed counted as detected, and the
// mutants on code removed or rewritten since the run left out of the count (listed below with the
// reason). A later Stryker run over some of the folder's files (report-<folder>-<name>.json, named
// in NEWER below) replaces the folder report's entries for those files. Usage: node
// stryker/tally.mjs plan stryker/recheck-plan.txt [more logs]; LEFT=1 also lists every mutant still
// surviving.
import { readFileSync } from 'node:fs';
import { isDetected, isValid, scoreText } from './score.mjs';

/** Code changed since the run, per folder: [file, line, first column, last column, why]. */
const CHANGED = {
  plan: [
    ['shared/plan/idle.ts', 52, 42, 80, "dead code removed: role === 'bridge' ? 'bridge' : role"],
    ['shared/plan/limit-labels.ts', 59, 50, 200, 'dead code removed: a replace on a text that never carries a base'],
    ['shared/plan/idle.ts', 65, 100, 115, 'simulateSteady lost its pulseOn option (every caller set it false)'],
    ['shared/plan/steady.ts', 29, 1, 200, 'simulateSteady lost its pulseOn option (every caller set it false)'],
  ],
};

/** Later Stryker runs over single files, per folder (pulse-train.ts again after its bug fix). */
const NEWER = { plan: ['report-plan-pulse-train.json'] };

const [name, ...logs] = process.argv.slice(2);
if (!name) {
  console.error('usage: node stryker/tally.mjs <folder> <recheck logs…>');
  process.exit(2);
}
const read = (f) => JSON.parse(readFileSync(new URL(`./${f}`, import.meta.url), 'utf8'));
const report = read(`report-${name}.json`);
for (const f of NEWER[name] ?? []) Object.assign(report.files, read(f).files);
const norm = (s) => s.replace(/\s+/g, ' ');
const killed = new Set();
for (const log of logs) {
  for (const line of readFileSync(log, 'utf8').split('\n')) {
    if (line.startsWith('killed')) killed.add(norm(line.slice('killed'.length).trim()));
  }
}
const changed = CHANGED[name] ?? [];
let detected = 0;
let valid = 0;
let gone = 0;
for (const [file, f] of Object.entries(report.files)) {
  let d = 0;
  let v = 0;
  const left = [];
  for (const m of f.mutants) {
    if (!isValid(m)) continue;
    const { line, column } = m.location.start;
    if (changed.some(([cf, cl, c0, c1]) => cf === file && cl === line && column >= c0 && column <= c1)) {
      gone++;
      continue;
    }
    v++;
    const key = norm(`${file}:${line}:${column} ${m.mutatorName} ${JSON.stringify(m.replacement)}`);
    if (isDetected(m) || killed.has(key)) d++;
    else left.push(key);
  }
  detected += d;
  valid += v;
  console.log(`${file}: ${scoreText(d, v)}, ${left.length} left`);
  if (process.env.LEFT) for (const k of left) console.log(`  left ${k}`);
}
console.log(`total: ${scoreText(detected, valid)} (${gone} mutants on changed code left out)`);
