// Prints a Stryker JSON report (stryker/report-<folder>.json) as a per-file score table and the list
// of surviving and no-coverage mutants with their place and replacement: the material for the
// "equivalent survivors" list in stryker/README.md. Usage: node stryker/summarize.mjs plan
import { readFileSync } from 'node:fs';
import { isDetected, isValid, scoreText } from './score.mjs';

const name = process.argv[2] ?? 'plan';
const report = JSON.parse(readFileSync(new URL(`./report-${name}.json`, import.meta.url), 'utf8'));
let killed = 0;
let total = 0;
for (const [file, f] of Object.entries(report.files)) {
  const counts = {};
  for (const m of f.mutants) counts[m.status] = (counts[m.status] ?? 0) + 1;
  const detected = f.mutants.filter(isDetected).length;
  const valid = f.mutants.filter(isValid).length;
  killed += detected;
  total += valid;
  console.log(`${file}: ${scoreText(detected, valid)}  ${JSON.stringify(counts)}`);
  const lines = f.source.split('\n');
  for (const m of f.mutants.filter((x) => x.status === 'Survived' || x.status === 'NoCoverage')) {
    const l = m.location.start.line;
    console.log(`  ${m.status} ${file}:${l}:${m.location.start.column} ${m.mutatorName}: ${JSON.stringify(m.replacement ?? '')}  | ${lines[l - 1].trim().slice(0, 110)}`);
  }
}
console.log(`total: ${scoreText(killed, total)}`);
