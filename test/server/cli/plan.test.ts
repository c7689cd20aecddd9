import { mkdirSync, mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { encodeWav } from '../../../server/audio/wav.ts';
import type { CliIo } from '../../../server/cli/io.ts';
import { main } from '../../../server/cli/main.ts';
import type { PlanDocument } from '../../../server/services/plan.ts';
import { DEMO_COILS } from '../../../shared/demo/coils.ts';
import { DEMO_DRIVER_LINEAR, DEMO_DRIVER_PULSE } from '../../../shared/demo/drivers.ts';

// Short synthesised clips (1 s at 8 kHz, float WAV) keep each run to a fraction of a second.
const FS = 8000;
const dir = mkdtempSync(join(tmpdir(), 'coilcue-plan-'));
afterAll(() => rmSync(dir, { recursive: true, force: true }));

const write = (name: string, data: string | Uint8Array): string => {
  writeFileSync(join(dir, name), data);
  return name;
};
const wav = (name: string, amp: number, seconds = 1, hz = 220) =>
  write(name, encodeWav({ sampleRate: FS, channels: [Float32Array.from({ length: seconds * FS }, (_, i) => amp * Math.sin((2 * Math.PI * hz * i) / FS))] }, { format: 'f32' }));

const loud = wav('loud.wav', 0.5);
const quiet = wav('quiet.wav', 0.2);
const coil = write('coil.json', JSON.stringify(DEMO_COILS['desk-lantern']));
const linear = write('linear.json', JSON.stringify(DEMO_DRIVER_LINEAR));
const pulse = write('pulse.json', JSON.stringify(DEMO_DRIVER_PULSE));

function captureIo(): CliIo & { stdout: string; stderr: string } {
  const io = { stdout: '', stderr: '', errIsTty: false, cwd: dir, out(t: string) { io.stdout += t; }, err(t: string) { io.stderr += t; } };
  return io;
}
async function run(...argv: string[]) {
  const io = captureIo();
  const code = await main(['plan', ...argv], io);
  return { code, out: io.stdout, err: io.stderr };
}

describe('coilcue plan (one clip)', () => {
  it('--json carries the keys other tools read', async () => {
    const { code, out, err } = await run('--clip', loud, '--coil', coil, '--driver', linear, '--json');
    expect(err).toBe('');
    expect(code).toBe(0);
    const r = JSON.parse(out);
    expect(typeof r.advisedGainDb).toBe('number');
    // A 0.5-peak sine over-modulates above 20·log10(2) = 6.02 dB; the demo's sinks keep it cool.
    expect(r.advisedGainDb).toBeCloseTo(6.0, 9);
    expect(r.binding).toMatchObject({ limit: 'over-modulation', role: null });
    expect(r.binding).toHaveProperty('atS');
    expect(r.evaluatedGainDb).toBe(r.advisedGainDb);
    expect(r.devices.map((d: { role: string }) => d.role)).toEqual(['bridge', 'pass']);
    for (const d of r.devices) {
      for (const k of ['peakJunctionC', 'meanLossW', 'tjMaxC']) expect(typeof d[k]).toBe('number');
    }
    expect(typeof r.supply.peakCurrentA).toBe('number');
    expect(typeof r.supply.meanCurrentA).toBe('number');
    expect(typeof r.overModulationFraction).toBe('number');
    // Rail-linear, zero-mean tone: the supply carries g·V_s/2 = 1.5 A on average (demo: 3 A at 48 V).
    expect(r.supply.meanCurrentA).toBeCloseTo(1.5, 3);
  });

  it('prints the readable answer, and evaluates at --gain-db when given', async () => {
    const { code, out } = await run('--clip', loud, '--coil', coil, '--driver', pulse, '--gain-db', '-3');
    expect(code).toBe(0);
    expect(out).toMatch(/advised gain: \d+\.\d dB/);
    expect(out).toMatch(/evaluated at -3\.0 dB:/);
    expect(out).toMatch(/pulses \d+: cut to the longest on-time \d+, clamped by the duty limit \d+, dropped for the off-time \d+/);
    expect(out).toMatch(/headroom of every limit at that gain:/);
  });

  it('names each limit for what it counts, the same in text and JSON, beside the duty cycle the driver bounds', async () => {
    const text = (await run('--clip', loud, '--coil', coil, '--driver', pulse)).out;
    const r = JSON.parse((await run('--clip', loud, '--coil', coil, '--driver', pulse, '--json')).out) as PlanDocument;
    const duty = r.limits.find((l) => l.limit === 'duty')!;
    expect(duty.label).toBe('pulses clamped by the duty limit');
    expect(r.limits.find((l) => l.limit === 'on-time')!.label).toBe('pulses cut to the longest on-time');
    expect(r.limits.find((l) => l.limit === 'over-modulation')!.label).toBe('over-modulated time');
    for (const l of r.limits) expect(text).toContain(`${l.label}: `);
    expect(text).toMatch(/pulses clamped by the duty limit: \d+\.\d{3} % of pulses, allowed 0\.100 %/);
    expect(text).toMatch(/allowed share 0\.001 \(0\.100 %\) of the time or of pulses/);
    // The duty cycle over the duty limit's window (one pulse period), against the profile's maximum.
    const d = r.dutyCycle!;
    expect(d.maxDuty).toBe(DEMO_DRIVER_PULSE.pulse!.maxDuty);
    expect(d.meanDuty).toBeGreaterThan(0);
    expect(d.meanDuty).toBeLessThanOrEqual(d.worstDuty);
    expect(d.worstDuty).toBeLessThanOrEqual(d.maxDuty * (1 + 1e-9)); // the duty limit is applied per period
    expect(text).toMatch(/duty cycle over one pulse period .*: mean \d+\.\d{3} %, worst \d+\.\d{3} %.*driver maximum \d+\.\d{3} %/);
    // Cautions where the risk is: the profile, the estimated figures and how to measure them, interlock and emergency stop.
    expect(r.cautions.profile).toMatch(/only if the coil and driver profiles are right/);
    expect(r.cautions.estimated.some((e) => /heat sinks/.test(e))).toBe(true);
    expect(r.cautions.keepOut).toMatch(/interlock.*emergency stop/);
    expect(text).toContain(r.cautions.keepOut);
  });

  it('names heavy limiting as a quality note, apart from the verdict, with the gain at which it would not be', async () => {
    const r = JSON.parse((await run('--clip', loud, '--coil', coil, '--driver', linear, '--gain-db', '13', '--json')).out) as PlanDocument;
    expect(r.limiting.basis).toBe('estimated');
    expect(r.limiting.heavy).toBe(true);
    expect(r.limiting.deepShare).toBeGreaterThan(r.limiting.heavyShare);
    expect(r.limiting.gainDbWithoutHeavyLimiting!).toBeLessThan(13);
    const text = (await run('--clip', loud, '--coil', coil, '--driver', linear, '--gain-db', '13')).out;
    expect(text).toContain(`Quality: ${r.limiting.note}`);
    // At the suggested gain the note is gone.
    const at = JSON.parse((await run('--clip', loud, '--coil', coil, '--driver', linear, '--gain-db', String(r.limiting.gainDbWithoutHeavyLimiting), '--json')).out) as PlanDocument;
    expect(at.limiting.heavy).toBe(false);
  });

  it('--trace writes the per-frame CSV', async () => {
    const { code } = await run('--clip', quiet, '--coil', coil, '--driver', linear, '--trace', 'trace.csv');
    expect(code).toBe(0);
    const lines = readFileSync(join(dir, 'trace.csv'), 'utf8').trimEnd().split('\n');
    expect(lines[0]).toBe('timeS,bridgeLossW,bridgeJunctionC,passLossW,passJunctionC');
    // 1 s on 1 ms frames.
    expect(lines).toHaveLength(1 + 1000);
    expect(lines[1].split(',')[0]).toBe('0.000000');
  });

  it('writes null for the gain when a driver overheats on silence (no ±Infinity in JSON)', async () => {
    const hot = structuredClone(DEMO_DRIVER_LINEAR);
    // Pass device without sink mass on 10.6 K/W and a 60 °C Tj max: 36 W idle, and still ≥ 18 W at full
    // modulation, heats its ≈ 0.56 J/K of junction–case capacity (the demo's Foster set, Σ τᵢ/Rᵢ) by more
    // than the 10 K it may rise within the 1 s clip.
    hot.devices[1].tjMaxC = 60;
    hot.devices[1].thermal.sinkToAmbientKPerW = 10;
    hot.devices[1].thermal.sinkHeatCapacityJPerK = 0;
    const file = write('hot.json', JSON.stringify(hot));
    const { code, out } = await run('--clip', quiet, '--coil', coil, '--driver', file, '--json');
    expect(code).toBe(0);
    const r = JSON.parse(out);
    expect(r.advisedGainDb).toBeNull();
    expect(r.evaluatedGainDb).toBeNull();
    expect(r.unsafeOnSilence).toBe(true);
    expect(r.warnings[0]).toMatch(/even on silence/);
  });
});

describe('coilcue plan --set', () => {
  it('--json gives per-item figures and the first failing item; clip paths are relative to the set file', async () => {
    mkdirSync(join(dir, 'show'), { recursive: true });
    write(
      'show/set.json',
      JSON.stringify({ coil: '../coil.json', driver: '../pulse.json', items: [{ clip: '../loud.wav', gapAfterS: 5, gainDb: null }, { clip: '../quiet.wav' }] }),
    );
    const { code, out, err } = await run('--set', 'show/set.json', '--json');
    expect(err).toBe('');
    expect(code).toBe(0);
    const s = JSON.parse(out);
    expect(s).toHaveProperty('firstFailingItem', null);
    expect(s.items).toHaveLength(2);
    expect(s.items[0].clip).toBe('../loud.wav');
    for (const it of s.items) {
      expect(typeof it.advisedGainDb).toBe('number');
      expect(typeof it.peakJunctionC).toBe('number');
      expect(it).toHaveProperty('minSafeGapAfterS');
      expect(it).toHaveProperty('recoveryGapS');
    }
    expect(s.items[1].gapAfterS).toBe(0);
  });

  it('--common-gain plays every item at the lowest advice', async () => {
    write('set2.json', JSON.stringify({ coil: 'coil.json', driver: 'linear.json', items: [{ clip: loud, gapAfterS: 1 }, { clip: quiet }] }));
    const { code, out } = await run('--set', 'set2.json', '--json', '--common-gain');
    expect(code).toBe(0);
    const s = JSON.parse(out);
    expect(s.gainMode).toBe('common');
    const advised = s.items.map((i: { advisedGainDb: number }) => i.advisedGainDb);
    expect(s.items.map((i: { gainDb: number }) => i.gainDb)).toEqual([Math.min(...advised), Math.min(...advised)]);
    const text = await run('--set', 'set2.json');
    expect(text.out).toMatch(/^set of 2 clips, gain advised per clip/);
    expect(text.out).toMatch(/every clip keeps every limit/);
  });
});

describe('coilcue plan: bad input exits 2 with one line naming the problem', () => {
  const badDriver = structuredClone(DEMO_DRIVER_LINEAR);
  badDriver.devices[0].tjMaxC = 400;
  write('bad-driver.json', JSON.stringify(badDriver));
  write('bad-set.json', JSON.stringify({ coil: 'coil.json', driver: 'linear.json', items: [{ clip: loud, gapAfterS: -5 }] }));
  write('set-missing-clip.json', JSON.stringify({ coil: 'coil.json', driver: 'linear.json', items: [{ clip: 'nowhere.wav' }] }));

  it.each([
    ['no driver', ['--clip', 'loud.wav', '--coil', 'coil.json'], /missing --driver \(or give --set/],
    ['a gain that is not a number', ['--clip', 'loud.wav', '--coil', 'coil.json', '--driver', 'linear.json', '--gain-db', 'loud'], /--gain-db must be a number \(dB\), got "loud"/],
    ['a gain out of range', ['--clip', 'loud.wav', '--coil', 'coil.json', '--driver', 'linear.json', '--gain-db', '50'], /--gain-db must be at most 40/],
    ['a bad driver field', ['--clip', 'loud.wav', '--coil', 'coil.json', '--driver', 'bad-driver.json'], /devices\.0\.tjMaxC/],
    ['a missing driver file', ['--clip', 'loud.wav', '--coil', 'coil.json', '--driver', 'nope.json'], /cannot read --driver "nope\.json" \(no such file\)/],
    ['a bad set field', ['--set', 'bad-set.json'], /items\.0\.gapAfterS/],
    ['a set whose clip is missing', ['--set', 'set-missing-clip.json'], /nowhere\.wav/],
    ['--set with --clip', ['--set', 'bad-set.json', '--clip', 'loud.wav'], /--set takes its coil, driver, clips and gains from the set file/],
    ['an unknown channel', ['--clip', 'loud.wav', '--coil', 'coil.json', '--driver', 'linear.json', '--channel', 'centre'], /--channel must be one of mix, left, right/],
  ])('%s', async (_what, argv, message) => {
    const { code, out, err } = await run(...argv);
    expect(code).toBe(2);
    expect(out).toBe('');
    expect(err).toMatch(message);
    expect(err.startsWith('coilcue plan: ')).toBe(true);
    expect(err.endsWith('\n')).toBe(true);
    expect(err.trimEnd()).not.toContain('\n');
  });
});
