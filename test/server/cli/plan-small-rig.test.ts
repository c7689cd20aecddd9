// `coilcue plan` on a single-bipolar rig: the switching speed per device in text and JSON, and a
// switch too slow for its coil named as the binding limit.
import { mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { encodeWav } from '../../../server/audio/wav.ts';
import type { CliIo } from '../../../server/cli/io.ts';
import { main } from '../../../server/cli/main.ts';
import { DEMO_SMALL_COIL, DEMO_SMALL_DRIVER } from '../../../shared/demo/small-rig.ts';

const FS = 8000;
const dir = mkdtempSync(join(tmpdir(), 'coilcue-small-'));
afterAll(() => rmSync(dir, { recursive: true, force: true }));
const write = (name: string, data: string | Uint8Array): string => {
  writeFileSync(join(dir, name), data);
  return name;
};
const clip = write('tone.wav', encodeWav({ sampleRate: FS, channels: [Float32Array.from({ length: FS }, (_, i) => 0.3 * Math.sin((2 * Math.PI * 220 * i) / FS))] }, { format: 'f32' }));
const coil = write('coil.json', JSON.stringify(DEMO_SMALL_COIL));
const driver = write('driver.json', JSON.stringify(DEMO_SMALL_DRIVER));
// A 25 mm × 70 mm, 480-turn secondary with no top load (≈ 3.1 MHz) and a slow bipolar switch (1.5 µs).
const tinyCoil = write('tiny.json', JSON.stringify({ ...DEMO_SMALL_COIL, name: 'tiny', secondary: { formDiameterM: 0.025, windingLengthM: 0.07, turns: 480, wireDiameterM: 0.00014 }, topLoad: { shape: 'none' }, primary: { turns: 3, diameterM: 0.04, windingLengthM: 0.01, offsetM: 0 }, measured: { resonanceHz: 3.1e6, qualityFactor: 60 } }));
const slow = write('slow.json', JSON.stringify({ ...DEMO_SMALL_DRIVER, devices: [{ ...DEMO_SMALL_DRIVER.devices[0], riseTimeS: 100e-9, fallTimeS: 200e-9, storageTimeS: 1.2e-6 }, DEMO_SMALL_DRIVER.devices[1]] }));

async function run(...argv: string[]) {
  const io = { stdout: '', stderr: '', errIsTty: false, cwd: dir, out: (t: string) => void (io.stdout += t), err: (t: string) => void (io.stderr += t) } satisfies CliIo & Record<string, unknown>;
  const code = await main(['plan', ...argv], io);
  return { code, out: io.stdout, err: io.stderr };
}

describe('coilcue plan on a single-bipolar rig', () => {
  it('shows the transition share and the steady idle of each device, in text and JSON', async () => {
    const t = await run('--clip', clip, '--coil', coil, '--driver', driver);
    expect(t.code).toBe(0);
    // (40 + 70 + 220) ns · 480 kHz = 0.1584 (hand value).
    expect(t.out).toMatch(/bridge\s+×1 .*transitions 15\.8 % of each cycle/);
    expect(t.out).toMatch(/ok\s+switching speed \(bridge\) at 480 kHz: transitions 15\.8 % of each cycle \(at most 20 %\)/);
    expect(t.out).toMatch(/idle\s+pass: settles at 103\.3 °C/);
    const j = JSON.parse((await run('--clip', clip, '--coil', coil, '--driver', driver, '--json')).out);
    expect(j.devices[0].transitionShare).toBeCloseTo(0.1584, 10);
    expect(j.devices[1].transitionShare).toBeNull();
    expect(j.idle.map((d: { role: string }) => d.role)).toEqual(['bridge', 'pass']);
  });

  it('names a switch too slow for the coil as the limit that fails every gain', async () => {
    const t = await run('--clip', clip, '--coil', tinyCoil, '--driver', slow);
    expect(t.code).toBe(0);
    expect(t.out).toMatch(/advised gain: none is safe; failing: bridge switch: too slow for 3\.1 MHz: transitions 465\.0 % of each cycle \(at most 20 %\)/);
    expect(t.out).toMatch(/WARNING: bridge switch: too slow for 3\.1 MHz: .*What helps/);
    const j = JSON.parse((await run('--clip', clip, '--coil', tinyCoil, '--driver', slow, '--json')).out);
    expect(j.binding).toMatchObject({ limit: 'switching-speed', role: 'bridge', frequencyHz: 3.1e6 });
    expect(j.devices[0].tooSlow).toBe(true);
  });
});
