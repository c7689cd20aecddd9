// Damaged audio and profile files through the executable as a person runs it: each ends within a
// bounded time, with exit 0 and a finite analysis, or exit 2 and one line on stderr that says what to
// fix; never a stack trace, never a hang. The decoders' own property tests (test/server/audio/
// decode-fuzz.test.ts) cover many more cases in process; these check the whole path to the exit code.
import { spawn } from 'node:child_process';
import { mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { damagedCopies } from '../audio/damage.ts';
import { afterAll, describe, expect, it } from 'vitest';
import { DEMO_COILS } from '../../../shared/demo/coils.ts';

const bin = fileURLToPath(new URL('../../../bin/coilcue.cjs', import.meta.url));
const fixtures = fileURLToPath(new URL('../../fixtures/audio/', import.meta.url));
const dir = mkdtempSync(join(tmpdir(), 'coilcue-damaged-'));
afterAll(() => rmSync(dir, { recursive: true, force: true }));

/** Runs the executable; a run still going after `limitMs` is killed and reported as a hang. */
function run(args: string[], limitMs = 30_000): Promise<{ code: number | null; stdout: string; stderr: string; hung: boolean }> {
  return new Promise((resolvePromise) => {
    const child = spawn(process.execPath, [bin, ...args], { cwd: dir, stdio: ['ignore', 'pipe', 'pipe'] });
    let stdout = '';
    let stderr = '';
    child.stdout.on('data', (d) => (stdout += d));
    child.stderr.on('data', (d) => (stderr += d));
    let hung = false;
    const timer = setTimeout(() => {
      hung = true;
      child.kill('SIGKILL');
    }, limitMs);
    child.on('close', (code) => {
      clearTimeout(timer);
      resolvePromise({ code, stdout, stderr, hung });
    });
  });
}

function expectCleanEnd(r: Awaited<ReturnType<typeof run>>, what: string): void {
  expect(r.hung, `${what}: no exit within the limit`).toBe(false);
  expect([0, 2], `${what}: exit ${r.code}, stderr ${r.stderr}`).toContain(r.code);
  expect(r.stderr, what).not.toMatch(/\n\s+at |internal error/);
  if (r.code === 2) expect(r.stderr.trim().split('\n'), what).toHaveLength(1);
  if (r.code === 0) {
    const doc = JSON.parse(r.stdout) as Record<string, unknown>;
    expect(JSON.stringify(doc), what).not.toMatch(/NaN|Infinity/);
  }
}

describe('coilcue analyze on damaged files', () => {
  for (const name of ['wav-s16-stereo.wav', 'tone-44k1-stereo.flac', 'tone-48k-stereo.ogg', 'tone-44k1-stereo.mp3']) {
    // Three executable runs each; a generous limit, since only a hang can miss it on a busy machine.
    it(`${name}: three seeded damaged copies`, { timeout: 180_000 }, async () => {
      const original = new Uint8Array(readFileSync(join(fixtures, name)));
      const copies = damagedCopies(original, 11, 3);
      for (const [i, bytes] of copies.entries()) {
        const file = `damaged-${i}-${name}`;
        writeFileSync(join(dir, file), bytes);
        expectCleanEnd(await run(['analyze', file, '--json']), file);
      }
    });
  }
});

describe('coilcue coil on damaged profiles', () => {
  const coil = DEMO_COILS[Object.keys(DEMO_COILS)[0]];
  const cases: [string, string][] = [
    ['not JSON', '{ "name": "x", '],
    ['Infinity turns (1e999)', JSON.stringify(coil).replace(/"turns":\s*\d+/, '"turns": 1e999')],
    ['a string for a length', JSON.stringify(coil).replace(/"windingLengthM":\s*[\d.e-]+/, '"windingLengthM": "long"')],
    ['a negative diameter', JSON.stringify(coil).replace(/"formDiameterM":\s*[\d.e-]+/, '"formDiameterM": -0.1')],
    ['an array', '[1, 2, 3]'],
    ['empty', ''],
  ];
  for (const [what, text] of cases) {
    it(what, async () => {
      writeFileSync(join(dir, 'coil.json'), text);
      const r = await run(['coil', 'coil.json', '--json']);
      expectCleanEnd(r, what);
      expect(r.code).toBe(2);
    });
  }
});
