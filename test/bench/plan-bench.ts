import { execFileSync } from 'node:child_process';
import { join } from 'node:path';
import { fileURLToPath } from 'node:url';

/** Times the gain advice on the benchmark clip (target from the planning issue: well under a second). */
export async function runPlanBench(wav: string): Promise<void> {
  const here = fileURLToPath(new URL('.', import.meta.url));
  const out = execFileSync(process.execPath, [join(here, 'child.mjs'), join(here, 'plan-once.ts'), wav], { encoding: 'utf8' });
  const rows = JSON.parse(out) as { driver: string; scheme: string; adviseMs: number; evaluations: number; perEvaluationMs: number; reportMs: number; advisedGainDb: number | null; binding: string | null }[];
  console.log('advice on the same 5-minute clip, demo coil (target: well under 1 s):');
  for (const r of rows) {
    console.log(
      `  ${r.scheme.padEnd(13)} gain search ${(r.adviseMs / 1000).toFixed(3)} s (${r.evaluations} evaluations, ${r.perEvaluationMs.toFixed(1)} ms each), ` +
        `full report ${(r.reportMs / 1000).toFixed(3)} s; advised ${r.advisedGainDb ?? 'none'} dB, binding ${r.binding ?? 'none'}`,
    );
  }
}
