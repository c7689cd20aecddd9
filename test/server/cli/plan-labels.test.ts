import { mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { encodeWav } from '../../../server/audio/wav.ts';
import type { CliIo } from '../../../server/cli/io.ts';
import { main } from '../../../server/cli/main.ts';
import { DEMO_COILS } from '../../../shared/demo/coils.ts';
import { DEMO_DRIVER_LINEAR, DEMO_DRIVER_PULSE } from '../../../shared/demo/drivers.ts';

// The plan's supply and clearance figures say what they are: the pulse current named as such, the
// arc reach on the mean input power with its basis, the keep-out naming what set it.
const FS = 8000;
const dir = mkdtempSync(join(tmpdir(), 'coilcue-plan-labels-'));
afterAll(() => rmSync(dir, { recursive: true, force: true }));
const write = (name: string, data: string | Uint8Array): string => {
  writeFileSync(join(dir, name), data);
  return name;
};
const clip = write('tone.wav', encodeWav({ sampleRate: FS, channels: [Float32Array.from({ length: FS }, (_, i) => 0.5 * Math.sin((2 * Math.PI * 220 * i) / FS))] }, { format: 'f32' }));
const coil = write('coil.json', JSON.stringify(DEMO_COILS['desk-lantern']));
const pulse = write('pulse.json', JSON.stringify(DEMO_DRIVER_PULSE));
const linear = write('linear.json', JSON.stringify(DEMO_DRIVER_LINEAR));

async function run(...argv: string[]) {
  const io = { stdout: '', stderr: '', errIsTty: false, cwd: dir, out(t: string) { io.stdout += t; }, err(t: string) { io.stderr += t; } } as CliIo & { stdout: string; stderr: string };
  const code = await main(['plan', ...argv], io);
  return { code, out: io.stdout, err: io.stderr };
}

describe('coilcue plan: figures named for what they are', () => {
  it('pulse driver: the current during a pulse, the mean over the clip, the arc reach on V·I·maxDuty', async () => {
    const text = await run('--clip', clip, '--coil', coil, '--driver', pulse, '--gain-db=-6');
    expect(text.code).toBe(0);
    expect(text.out).toMatch(/supply {4}current during a pulse 12\.00 A \(instantaneous; limit 20 A\), mean over the clip \d+\.\d\d A/);
    expect(text.out).not.toMatch(/1 ms mean/);
    expect(text.out).toMatch(/keep-out: at least \d+\.\d\d m from the top load, set by the (arc reach|breakdown gap) ×2/);
    expect(text.out).toMatch(/Freau's rule on the mean input power 307 W/);
    const json = JSON.parse((await run('--clip', clip, '--coil', coil, '--driver', pulse, '--gain-db=-6', '--json')).out);
    expect(json.supply.peakIs).toBe('pulse-current');
    expect(json.supply.peakWindowS).toBeNull();
    // Demo pulse driver: 320 V × 12 A × 8 % = 307.2 W mean (not the 3840 W during a pulse);
    // Freau's rule 1.7 in·√W → 0.04318·√307.2 = 0.757 m.
    expect(json.keepOut.inputPowerW).toBeCloseTo(307.2, 9);
    expect(json.keepOut.inputPowerBasis).toMatch(/maximum duty 8 %/);
    expect(Math.abs(json.keepOut.arcReachM - 0.04318 * Math.sqrt(307.2))).toBeLessThan(1e-12);
    expect(['arc-reach', 'breakdown-gap']).toContain(json.keepOut.keepOutSetBy);
    expect(json.keepOut.keepOutM).toBeCloseTo(2 * Math.max(json.keepOut.arcReachM, json.keepOut.breakdownGapM), 12);
  });

  it('rail driver: the highest 1 ms frame mean, named as such', async () => {
    const { code, out } = await run('--clip', clip, '--coil', coil, '--driver', linear);
    expect(code).toBe(0);
    expect(out).toMatch(/supply {4}peak \d+\.\d\d A \(highest 1(\.00)? ?ms mean; limit 6 A\), mean over the clip 1\.50 A/);
  });
});
