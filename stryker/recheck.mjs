// Re-checks the surviving mutants of a Stryker JSON report against test files added after that run,
// without a new full Stryker run: each survivor is applied to its source file in turn, the given
// test files run (a failure = killed), and the file is restored. A mutant that survived the whole
// folder's tests and is killed by the added files is killed by the suite as it now stands.
// Usage: node stryker/recheck.mjs plan test/shared/plan/a.test.ts [more test files]
import { spawnSync } from 'node:child_process';
import { readFileSync, writeFileSync } from 'node:fs';

// Optional `--only <log>`: re-check only the mutants an earlier re-check printed as "survived".
const args = process.argv.slice(2);
let only = null;
const at = args.indexOf('--only');
if (at >= 0) {
  only = new Set(readFileSync(args[at + 1], 'utf8').split('\n').filter((l) => l.startsWith('survived')).map((l) => l.split(/\s+/).slice(1, 3).join(' ')));
  args.splice(at, 2);
}
const [name, ...tests] = args;
const report = JSON.parse(readFileSync(new URL(`./report-${name}.json`, import.meta.url), 'utf8'));
const results = [];
for (const [file, f] of Object.entries(report.files)) {
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
      const r = spawnSync('timeout', ['-k', '5', '120', 'npx', 'vitest', 'run', ...tests], { encoding: 'utf8' });
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
