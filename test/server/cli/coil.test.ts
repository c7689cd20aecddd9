import { mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { formatEng } from '../../../server/cli/commands/coil.ts';
import type { CliIo } from '../../../server/cli/io.ts';
import { main } from '../../../server/cli/main.ts';
import { DEMO_COILS } from '../../../shared/demo/coils.ts';

const dir = mkdtempSync(join(tmpdir(), 'coilcue-coil-'));
afterAll(() => rmSync(dir, { recursive: true, force: true }));

function captureIo(): CliIo & { stdout: string; stderr: string } {
  const io = { stdout: '', stderr: '', errIsTty: false, cwd: dir, out(t: string) { io.stdout += t; }, err(t: string) { io.stderr += t; } };
  return io;
}

async function run(...argv: string[]) {
  const io = captureIo();
  const code = await main(['coil', ...argv], io);
  return { code, out: io.stdout, err: io.stderr };
}

const write = (name: string, text: string): string => {
  writeFileSync(join(dir, name), text);
  return name;
};

describe('formatEng', () => {
  it.each([
    [0.0287, 'H', '28.7 mH'],
    [6.1e-12, 'F', '6.10 pF'],
    [380.4e3, 'Hz', '380 kHz'],
    [999.96, 'Hz', '1.00 kHz'],
    [1.5, 'm', '1.50 m'],
    [120e-6, 's', '120 µs'],
    [0, 'F', '0 F'],
  ])('%d %s → %s', (v, unit, want) => {
    expect(formatEng(v, unit)).toBe(want);
  });
  it('shows a missing figure as a dash', () => {
    expect(formatEng(null, 'V')).toBe('—');
  });
});

describe('coilcue coil', () => {
  it('prints a readable table for a profile file, with units and the cautions', async () => {
    const file = write('desk.json', JSON.stringify(DEMO_COILS['desk-lantern']));
    const { code, out, err } = await run(file);
    expect(code).toBe(0);
    expect(err).toBe('');
    expect(out).toMatch(/inductance \(current sheet, Nagaoka\)\s+16\.8 mH/);
    expect(out).toMatch(/self-capacitance \(Medhurst's table\)\s+5\.41 pF/);
    expect(out).toMatch(/resonance\s+328 kHz/);
    expect(out).toMatch(/coupling k\s+0\.163/);
    expect(out).toMatch(/injure or kill/);
  });

  it('--json prints the report with the keys other tools read', async () => {
    const { code, out } = await run('--demo', 'desk-lantern', '--json', '--supply-v', '170', '--rail-current-a', '30', '--on-time-ms', '0.1');
    expect(code).toBe(0);
    const r = JSON.parse(out);
    for (const k of ['inductanceH', 'selfCapacitanceF', 'wireLengthM', 'dcResistanceOhm']) expect(typeof r.secondary[k]).toBe('number');
    for (const k of ['resonanceHz', 'qualityFactor', 'modulationCornerHz', 'mutualInductanceH', 'couplingK', 'keepOutM']) expect(typeof r[k]).toBe('number');
    expect(typeof r.topLoad.capacitanceF).toBe('number');
    expect(typeof r.primary.inductanceH).toBe('number');
    expect(r.voltage.energyJ).toBeCloseTo(170 * 30 * 1e-4, 12); // --on-time-ms 0.1 is 100 µs
  });

  it('a bad profile exits 2 with one line naming the field', async () => {
    const p = structuredClone(DEMO_COILS['desk-lantern']) as unknown as Record<string, Record<string, unknown>>;
    p.secondary.turns = 5000;
    const { code, out, err } = await run(write('bad.json', JSON.stringify(p)));
    expect(code).toBe(2);
    expect(out).toBe('');
    expect(err.trim().split('\n')).toHaveLength(1);
    expect(err).toMatch(/^coilcue coil: .*secondary\.turns/);
  });

  it('a missing file or a file that is not JSON exits 2 with a clear message', async () => {
    const missing = await run('no-such-coil.json');
    expect(missing.code).toBe(2);
    expect(missing.err).toMatch(/cannot read <coil\.json> "no-such-coil\.json" \(no such file\); check the path/);
    const notJson = await run(write('broken.json', '{ "name": '));
    expect(notJson.code).toBe(2);
    expect(notJson.err).toMatch(/is not valid JSON/);
  });

  it('argument mistakes exit 2: no file, two sources, unknown demo, unknown flag, bad number', async () => {
    expect((await run()).code).toBe(2);
    expect((await run('a.json', '--demo', 'desk-lantern')).err).toMatch(/not both/);
    expect((await run('--demo', 'nope')).err).toMatch(/--demo must be one of desk-lantern/);
    expect((await run('--demo', 'desk-lantern', '--volts', '3')).code).toBe(2);
    expect((await run('--demo', 'desk-lantern', '--supply-v', 'lots')).err).toMatch(/--supply-v must be a number/);
  });
});
