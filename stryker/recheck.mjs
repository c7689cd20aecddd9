// Re-checks the surviving mutants of a Stryker JSON report against test files added after that run,
// without a new full Stryker run: each survivor is applied to its source file in turn, the given
// test files run (a failure = killed), and the file is restored. A mutant that survived the whole
// folder's tests and is killed by the added files is killed by the suite as it now stands.
// Usage: node stryker/recheck.mjs plan test/shared/plan/a.test.ts [more test files]
// Options: `--only <log>` re-checks only the mutants an earlier re-check printed as "survived";
// `--file <source>` (repeatable) only the survivors in those source files. The script edits source
// files while it runs: run it in a copy of the checkout (see README.md) if other work goes on.
import { spawnSync } from 'node:child_process';
import { readFileSync, writeFileSync } from 'node:fs';

const args = process.argv.slice(2);
let only = null;
const at = args.indexOf('--only');
if (at >= 0) {
  only = new Set(readFileSync(args[at + 1], 'utf8').split('\n').filter((l) => l.startsWith('survived')).map((l) => l.split(/\s+/).slice(1, 3).join(' ')));
  args.splice(at, 2);
}
const files = new Set();
for (let i = args.indexOf('--file'); i >= 0; i = args.indexOf('--file')) {
  files.add(args[i + 1]);
  args.splice(i, 2);
}
const [name, ...tests] = args;
if (!name || tests.length === 0) {
  console.error('usage: node stryker/recheck.mjs <folder> [--file <source>]… [--only <log>] <test files…>');
  process.exit(2);
}
const runTests = () => spawnSync('timeout', ['-k', '5', '120', 'npx', 'vitest', 'run', ...tests], { encoding: 'utf8' });
// The given tests must pass on the unmutated code, or every mutant would count as killed.
const baseline = runTests();
if (baseline.status !== 0) {
  console.error(`the given tests fail on the unmutated code; fix them first:\n${baseline.stdout.slice(-3000)}`);
  process.exit(1);
}
const report = JSON.parse(readFileSync(new URL(`./report-${name}.json`, import.meta.url), 'utf8'));
const results = [];
for (const [file, f] of Object.entries(report.files)) {
  if (files.size > 0 && !files.has(file)) continue;
  const original = readFileSync(file, 'utf8');
  const lines = original.split('\n');
  const offset = (loc) => lines.slice(0, loc.line - 1).reduce((n, l) => n + l.length + 1, 0) + loc.column - 1;
  for (const m of f.mutants.filter((x) => x.status === 'Survived' || x.status === 'NoCoverage')) {
    const key = `${file}:${m.location.start.line}:${m.location.start.column} ${m.mutatorName}`;
    if (only && !only.has(key)) continue;
    const a = offset(m.location.start);
    const b = offset(m.location.end);
    writeFileSync(file, original.slice(0, a) + m.replacement + original.slice(b));
    try {
      // GNU timeout signals its whole process group, so vitest's worker processes go too (a mutant
      // that loops forever would otherwise leave them spinning after npx is killed).
      const r = runTests();
      const killed = r.status !== 0;
      results.push({ file, line: m.location.start.line, mutator: m.mutatorName, replacement: m.replacement, killed });
      console.log(`${killed ? 'killed  ' : 'survived'} ${file}:${m.location.start.line}:${m.location.start.column} ${m.mutatorName} ${JSON.stringify(m.replacement)}`);
    } finally {
      writeFileSync(file, original);
    }
  }
}
const k = results.filter((r) => r.killed).length;
console.log(`re-checked ${results.length}: ${k} killed by ${tests.join(', ')}, ${results.length - k} still survive`);
