// `coilcue coil` on a profile whose primary is a tank: the tuning figures in text and JSON.
import { mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import type { CliIo } from '../../../server/cli/io.ts';
import { main } from '../../../server/cli/main.ts';

const dir = mkdtempSync(join(tmpdir(), 'coilcue-tank-'));
afterAll(() => rmSync(dir, { recursive: true, force: true }));

async function run(...argv: string[]) {
  const io = { stdout: '', stderr: '', errIsTty: false, cwd: dir, out: (t: string) => void (io.stdout += t), err: (t: string) => void (io.stderr += t) } satisfies CliIo & Record<string, unknown>;
  const code = await main(['coil', ...argv], io);
  return { code, out: io.stdout, err: io.stderr };
}

const profile = {
  name: 'gap coil (invented)',
  secondary: { formDiameterM: 0.11, windingLengthM: 0.45, turns: 1100, wireDiameterM: 0.0004 },
  topLoad: { shape: 'torus', outerDiameterM: 0.3, tubeDiameterM: 0.075 },
  primary: { turns: 8, diameterM: 0.2, windingLengthM: 0.06, offsetM: 0, leadInductanceH: 1e-6, tank: { capacitanceF: 20e-9, switching: 'spark-gap', supplyPeakV: 12700 } },
};

describe('coilcue coil with a tank primary', () => {
  it('prints the tuning capacitance, the primary resonance and the spark-gap estimate, and puts them in JSON', async () => {
    writeFileSync(join(dir, 'gap.json'), JSON.stringify(profile));
    const text = await run('gap.json');
    expect(text.code).toBe(0);
    expect(text.out).toMatch(/Primary tank \(spark-gap\)/);
    expect(text.out).toMatch(/tuning capacitance 1\/\(\(2π f0\)² L\)\s+\d/);
    expect(text.out).toMatch(/primary resonance with it\s+\d.*×1\.\d+ the secondary's/);
    expect(text.out).toMatch(/spark gap at the supply peak \(estimate\)\s+4\.23 mm/);
    expect(text.out).toMatch(/! A spark-gap tank is charged from a mains/);
    const json = JSON.parse((await run('gap.json', '--json')).out);
    expect(json.tank.tankTuningCapacitanceF).toBeGreaterThan(1e-9);
    expect(json.tank.primaryToSecondaryRatio).toBeGreaterThan(1);
  });

  it('exits 2 naming the dotted field for a bad tank capacitance', async () => {
    writeFileSync(join(dir, 'bad.json'), JSON.stringify({ ...profile, primary: { ...profile.primary, tank: { capacitanceF: 0, switching: 'spark-gap' } } }));
    const r = await run('bad.json');
    expect(r.code).toBe(2);
    expect(r.err).toMatch(/primary\.tank\.capacitanceF must be at least 1e-12, got 0/);
  });
});
