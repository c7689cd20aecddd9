import { existsSync, mkdtempSync, readFileSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import type { CliIo } from '../../../server/cli/io.ts';
import { main } from '../../../server/cli/main.ts';
import { parseCoilProfile } from '../../../shared/schemas/coil.ts';
import { parseDriverProfile } from '../../../shared/schemas/driver.ts';
import { parseSetFile } from '../../../shared/schemas/set.ts';

const dir = mkdtempSync(join(tmpdir(), 'coilcue-demo-'));
afterAll(() => rmSync(dir, { recursive: true, force: true }));

describe('coilcue demo', () => {
  it('writes a valid scenario and runs every step on it', async () => {
    const io = { stdout: '', stderr: '', errIsTty: false, cwd: dir, out: (t: string) => void (io.stdout += t), err: (t: string) => void (io.stderr += t) } satisfies CliIo & Record<string, unknown>;
    expect(await main(['demo', '--out', 'show'], io)).toBe(0);
    const show = join(dir, 'show');
    for (const f of ['harbour-lights.wav', 'night-ferry.wav', 'steady-hum.wav']) expect(existsSync(join(show, f))).toBe(true);
    // The profiles it writes pass the same validation as a person's files.
    const read = (f: string) => JSON.parse(readFileSync(join(show, f), 'utf8'));
    expect(parseCoilProfile(read('coil.json')).measured.qualityFactor).toBe(45);
    for (const f of ['driver-linear.json', 'driver-buck.json', 'driver-pulse.json', 'driver-small.json']) expect(() => parseDriverProfile(read(f))).not.toThrow();
    expect(parseDriverProfile(read('driver-small.json')).devices[0].kind).toBe('bjt');
    expect(parseCoilProfile(read('coil-small.json')).name).toBe('thimble');
    expect(parseSetFile(read('set.json')).items).toHaveLength(3);
    // Each step answered: analysis, coil, one plan per driver with its binding limit, the set.
    expect(io.stdout).toMatch(/integrated loudness/);
    expect(io.stdout).toMatch(/resonance\s+318 kHz\s+\(measured\)/);
    expect(io.stdout.match(/advised gain: -?\d+\.\d dB/g)).toHaveLength(4);
    expect(io.stdout.match(/binding limit: /g)).toHaveLength(4);
    // The small rig is bound by its own bipolar switch, which stands in free air.
    const small = io.stdout.slice(io.stdout.indexOf('on the small rig'));
    expect(small).toMatch(/binding limit: junction temperature \(bridge\)/);
    expect(small).toMatch(/bridge\s+×1 .*transitions 15\.8 % of each cycle/);
    expect(io.stdout).toMatch(/set of 3 clips/);
    expect(io.stdout).toMatch(/Caution: /);
    expect(io.stderr).toBe('');
  });
});
