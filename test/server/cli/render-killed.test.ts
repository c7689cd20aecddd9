// A render killed at any instant (SIGKILL: no handler runs) leaves nothing under the output name, or
// the whole file: never a half-written WAV where the person expects the coil-ready clip.
import { spawn } from 'node:child_process';
import { existsSync, mkdtempSync, readFileSync, readdirSync, rmSync, watch, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { afterAll, describe, expect, it } from 'vitest';
import { decodeAudioBytes } from '../../../server/audio/decode.ts';
import { encodeWav } from '../../../server/audio/wav.ts';
import { synthDemoClip } from '../../../shared/demo/clips.ts';
import { DEMO_COILS } from '../../../shared/demo/coils.ts';
import { DEMO_DRIVER_LINEAR } from '../../../shared/demo/drivers.ts';

const bin = fileURLToPath(new URL('../../../bin/coilcue.cjs', import.meta.url));
const dir = mkdtempSync(join(tmpdir(), 'coilcue-killed-'));
afterAll(() => rmSync(dir, { recursive: true, force: true }));

const clip = synthDemoClip('harbour-lights');
const seconds = clip.channels[0].length / clip.sampleRate;
writeFileSync(join(dir, 'tune.wav'), encodeWav(clip, { format: 's16' }));
writeFileSync(join(dir, 'coil.json'), JSON.stringify(DEMO_COILS['desk-lantern']));
writeFileSync(join(dir, 'driver.json'), JSON.stringify(DEMO_DRIVER_LINEAR));

/**
 * Starts a render and kills it with SIGKILL after `afterMs`, or (afterMs null) the moment a temporary
 * file for the output appears in the folder, that is while the WAV is being written; resolves when
 * the process is gone.
 */
function renderKilledAfter(out: string, afterMs: number | null): Promise<number | null> {
  return new Promise((done) => {
    const child = spawn(process.execPath, [bin, 'render', '--clip', 'tune.wav', '--coil', 'coil.json', '--driver', 'driver.json', '--out', out, '--gain-db', '-20'], {
      cwd: dir,
      stdio: 'ignore',
    });
    const timer = afterMs === null ? undefined : setTimeout(() => child.kill('SIGKILL'), afterMs);
    const watcher =
      afterMs === null
        ? watch(dir, (_event, name) => {
            if (name && name.startsWith(`.${out}`) && name.endsWith('.tmp')) child.kill('SIGKILL');
          })
        : undefined;
    child.on('close', (code) => {
      clearTimeout(timer);
      watcher?.close();
      done(code);
    });
  });
}

describe('a render killed mid-way', () => {
  // Kill times spread from start-up through analysis, rendering and writing (a full render of this
  // clip takes a few seconds here); whichever phase each lands in, the rule must hold.
  for (const afterMs of [300, 900, 1500, 2200, 3000, 4000, 5500]) {
    it(`killed after ${afterMs} ms: no file, or the whole file`, async () => {
      const out = `killed-${afterMs}.wav`;
      const code = await renderKilledAfter(out, afterMs);
      const path = join(dir, out);
      if (!existsSync(path)) return; // killed before the rename: nothing under the output name
      // The render finished before the kill (or the kill came after the rename): the whole file.
      const decoded = await decodeAudioBytes(new Uint8Array(readFileSync(path)));
      expect(decoded.durationS, `exit ${code}`).toBeCloseTo(seconds, 3);
    });
  }

  it('killed the moment its temporary file appears, while the WAV is written: nothing under the output name', async () => {
    const out = 'killed-writing.wav';
    const code = await renderKilledAfter(out, null);
    expect(code).toBeNull(); // killed by the signal, not finished
    expect(existsSync(join(dir, out))).toBe(false);
    expect(readdirSync(dir).some((n) => n.startsWith(`.${out}`))).toBe(true); // the kill did land mid-write
  });
});
