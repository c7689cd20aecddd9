/**
 * Shared set-up of the `render` and `preview` command tests: a temporary folder with a 2 s excerpt
 * of the demo tune as a 16-bit WAV, the demo coil and the demo drivers as JSON profiles, and an
 * in-process runner that captures stdout and stderr.
 */
import { mkdtempSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { encodeWav } from '../../../server/audio/wav.ts';
import type { CliIo } from '../../../server/cli/io.ts';
import { main } from '../../../server/cli/main.ts';
import { synthDemoClip } from '../../../shared/demo/clips.ts';
import { DEMO_COILS } from '../../../shared/demo/coils.ts';
import { DEMO_DRIVER_BUCK, DEMO_DRIVER_LINEAR, DEMO_DRIVER_PULSE } from '../../../shared/demo/drivers.ts';

export function makeWorkspace(prefix: string): { dir: string; run: (...argv: string[]) => Promise<{ code: number; out: string; err: string }> } {
  const dir = mkdtempSync(join(tmpdir(), prefix));
  const full = synthDemoClip('harbour-lights');
  const excerpt = { sampleRate: full.sampleRate, channels: full.channels.map((c) => c.slice(12 * 44100, 14 * 44100)) };
  writeFileSync(join(dir, 'tune.wav'), encodeWav(excerpt, { format: 's16' }));
  const mono = { sampleRate: full.sampleRate, channels: [excerpt.channels[0]] };
  writeFileSync(join(dir, 'mono.wav'), encodeWav(mono, { format: 's16' }));
  writeFileSync(join(dir, 'coil.json'), JSON.stringify(DEMO_COILS['desk-lantern']));
  writeFileSync(join(dir, 'linear.json'), JSON.stringify(DEMO_DRIVER_LINEAR));
  writeFileSync(join(dir, 'buck.json'), JSON.stringify(DEMO_DRIVER_BUCK));
  writeFileSync(join(dir, 'pulse.json'), JSON.stringify(DEMO_DRIVER_PULSE));
  writeFileSync(join(dir, 'weak.json'), JSON.stringify({ ...DEMO_DRIVER_LINEAR, supplyCurrentLimitA: 1.5 }));
  writeFileSync(join(dir, 'broken.json'), JSON.stringify({ ...DEMO_DRIVER_LINEAR, supplyVoltageV: -5 }));
  writeFileSync(join(dir, 'notjson.json'), '{ "name": ');
  const run = async (...argv: string[]) => {
    const io: CliIo & { stdout: string; stderr: string } = {
      stdout: '',
      stderr: '',
      errIsTty: false,
      cwd: dir,
      out(t: string) {
        io.stdout += t;
      },
      err(t: string) {
        io.stderr += t;
      },
    };
    const code = await main(argv, io);
    return { code, out: io.stdout, err: io.stderr };
  };
  return { dir, run };
}

/** How often `needle` occurs in `text`. */
export const occurrences = (text: string, needle: string): number => text.split(needle).length - 1;
