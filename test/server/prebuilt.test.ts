// The command line from prebuilt bundles (server/prebuilt.cjs): built once for the sources as they
// are, found again without building, the worker entries answered from them, and the command's
// output the same as from the sources through tsx (COILCUE_PREBUILT=off), byte for byte.
import { spawnSync } from 'node:child_process';
import { existsSync, mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { createRequire } from 'node:module';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { encodeWav } from '../../server/audio/wav.ts';
import { synthLongDemo } from '../../shared/demo/clips.ts';

const root = join(import.meta.dirname, '..', '..');
const { prebuilt, prebuiltWorker } = createRequire(import.meta.url)('../../server/prebuilt.cjs') as {
  prebuilt(): Promise<string | null>;
  prebuiltWorker(name: string): Record<string, unknown> | null;
};
const bin = join(root, 'bin', 'coilcue.cjs');

describe('prebuilt bundles', () => {
  const dir = mkdtempSync(join(tmpdir(), 'coilcue-prebuilt-'));
  afterAll(() => rmSync(dir, { recursive: true, force: true }));

  it('are built into a folder named by the sources, and found there again', async () => {
    const first = await prebuilt();
    expect(first).not.toBeNull();
    for (const f of ['cli.cjs', 'analysis-worker.cjs', 'reduction-worker.cjs', 'complete']) expect(existsSync(join(first!, f)), f).toBe(true);
    expect(await prebuilt()).toBe(first);
  });

  it('answer the worker entries only when the main thread says where they are', async () => {
    const folder = (await prebuilt())!;
    expect(prebuiltWorker('analysis-worker.cjs')).toBeNull(); // this process runs the sources
    const r = spawnSync(process.execPath, ['-e', `const w = require('./server/prebuilt.cjs').prebuiltWorker('analysis-worker.cjs'); console.log(typeof w?.serveAnalysisJobs)`], {
      cwd: root,
      encoding: 'utf8',
      env: { ...process.env, COILCUE_PREBUILT: folder },
    });
    expect(r.stdout.trim()).toBe('function');
  });

  it('run the analyze command with the output of the sources through tsx, byte for byte', () => {
    const wav = join(dir, 'demo.wav');
    writeFileSync(wav, encodeWav(synthLongDemo(8, 22050), { format: 's16', seed: 2 }));
    const run = (env: Record<string, string>) => spawnSync(process.execPath, [bin, 'analyze', wav, '--json'], { encoding: 'utf8', env: { ...process.env, ...env }, timeout: 120_000 });
    const fromBundles = run({});
    const fromSources = run({ COILCUE_PREBUILT: 'off' });
    expect(fromBundles.status, fromBundles.stderr).toBe(0);
    expect(fromSources.status, fromSources.stderr).toBe(0);
    expect(fromBundles.stdout).toBe(fromSources.stdout);
    expect(JSON.parse(fromBundles.stdout).durationS).toBeCloseTo(8, 6);
  });
});
