/**
 * `coilcue render` end to end, in process: the coil-ready WAV, its closed-loop report, the caution,
 * and the handling of bad input (exit 2, one line on stderr, never a half-written file under the
 * output name). Limits and figures come from the planner; here we check the command keeps them.
 */
import { existsSync, readFileSync, readdirSync, rmSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { decodeAudioBytes } from '../../../server/audio/decode.ts';
import type { RenderSummary } from '../../../server/cli/commands/render.ts';
import { measureTruePeak, samplePeakLinear } from '../../../shared/dsp/true-peak.ts';
import { makeWorkspace, occurrences } from '../render/cli-workspace.ts';

const { dir, run } = makeWorkspace('coilcue-render-');
afterAll(() => rmSync(dir, { recursive: true, force: true }));

const CAUTION = 'high voltage and RF that can burn, injure or kill';
const base = ['render', '--clip', 'tune.wav', '--coil', 'coil.json'];

describe('coilcue render', () => {
  it('writes a mono WAV at the advised gain and reports that every promised limit holds', async () => {
    const { code, out, err } = await run(...base, '--driver', 'linear.json', '--out', 'coil-ready.wav');
    expect(err).toBe('');
    expect(code).toBe(0);
    expect(out).toMatch(/gain\s+[+-]\d+\.\d dB \(advised/);
    expect(out).toMatch(/planned again at 0 dB: its gain is already inside the file/);
    expect(out).toMatch(/junction temperature \(pass\)\s+\d+\.\d °C\s+\d+\.\d °C\s+150\.0 °C\s+holds/);
    expect(out).toContain('Every limit the advice promised holds on the render.');
    expect(occurrences(out, CAUTION)).toBe(1);
    const clip = await decodeAudioBytes(new Uint8Array(readFileSync(join(dir, 'coil-ready.wav'))));
    expect(clip.channels).toHaveLength(1);
    expect(clip.sampleRate).toBe(44100);
    expect(clip.durationS).toBeCloseTo(2, 6);
    // 0 dBFS is the rail's ends: the file never goes past them, between samples either (BS.1770-4 Annex 2).
    expect(samplePeakLinear(clip.channels[0])).toBeLessThanOrEqual(1);
    expect(measureTruePeak(clip.channels, 44100).truePeakLinear).toBeLessThanOrEqual(1);
  });

  it('--json: pulse driver, 24-bit, pre-emphasis at the coil\'s modulation corner, closed loop ok', async () => {
    const { code, out } = await run(...base, '--driver', 'pulse.json', '--out', 'p.wav', '--format', 's24', '--pre-emphasis-db', '4', '--json');
    expect(code).toBe(0);
    const s = JSON.parse(out) as RenderSummary;
    expect(s.scheme).toBe('pulse');
    expect(s.format).toBe('s24');
    expect(s.gainFrom).toBe('advised');
    expect(s.advice!.advisedGainDb).toBe(s.gainDb);
    // desk-lantern: f0/(2Q) ≈ 435 Hz (coil model; see the coil suite).
    expect(s.preEmphasis!.cornerHz).toBeGreaterThan(400);
    expect(s.preEmphasis!.cornerHz).toBeLessThan(470);
    expect(s.preEmphasis!.shelfGainDb).toBe(4);
    expect(s.limiter!.truePeak).toBe(true);
    expect(s.levels.render.truePeakDbtp!).toBeLessThanOrEqual(0);
    expect(s.closedLoop.ok).toBe(true);
    expect(s.closedLoop.gainDbApplied).toBe(0);
    expect(s.closedLoop.limits.map((l) => l.limit)).toEqual(['junction-temperature', 'over-modulation', 'supply-current', 'on-time', 'duty', 'switching-speed']);
    expect(s.caution).toContain(CAUTION);
    const bytes = new Uint8Array(readFileSync(join(dir, 'p.wav')));
    expect(new DataView(bytes.buffer).getUint16(34, true)).toBe(24); // bits per sample in the fmt chunk
  });

  it('a given gain too high for the supply: the file is written and the report says plainly which limit fails', async () => {
    const { code, out } = await run(...base, '--driver', 'weak.json', '--out', 'hot.wav', '--gain-db', '6');
    expect(code).toBe(0);
    expect(out).toMatch(/\(given\)/);
    expect(out).toMatch(/supply current\s+\d+\.\d\d A\s+\d+\.\d\d A\s+1\.50 A\s+DOES NOT HOLD/);
    expect(out).toContain('NOT SAFE AS RENDERED');
    expect(out).toMatch(/! supply current does NOT hold on the render/);
    expect(out).toContain('Lower --gain-db');
    expect(existsSync(join(dir, 'hot.wav'))).toBe(true);
  });

  it('takes negative numbers after their flags (--gain-db -4 --ceiling-dbfs -1) and holds the lower ceiling', async () => {
    const { code, out } = await run(...base, '--driver', 'linear.json', '--out', 'low.wav', '--gain-db', '-4', '--ceiling-dbfs', '-1', '--json');
    expect(code).toBe(0);
    const s = JSON.parse(out) as RenderSummary;
    expect(s.gainDb).toBe(-4);
    expect(s.limiter!.ceilingDbfs).toBe(-1);
    const clip = await decodeAudioBytes(new Uint8Array(readFileSync(join(dir, 'low.wav'))));
    expect(measureTruePeak(clip.channels, 44100).truePeakDbtp).toBeLessThanOrEqual(-1);
  });

  it('keeps the chosen channel: --channel right of a stereo file, left of a mono one', async () => {
    const r = await run(...base, '--driver', 'buck.json', '--out', 'right.wav', '--channel', 'right', '--json');
    expect(r.code).toBe(0);
    expect((JSON.parse(r.out) as RenderSummary).channel).toBe('right');
    const m = await run('render', '--clip', 'mono.wav', '--coil', 'coil.json', '--driver', 'buck.json', '--out', 'm.wav', '--channel', 'right');
    expect(m.code).toBe(2);
    expect(m.err).toMatch(/channel "right" asked of a mono file/);
  });
});

describe('bad input: exit 2, one line on stderr, no file under the output name', () => {
  it.each([
    [['--driver', 'linear.json'], /missing --out/],
    [['--driver', 'linear.json', '--out', 'x.mp3'], /--out must name a \.wav file/],
    [['--driver', 'linear.json', '--out', 'x.wav', '--format', 'mp3'], /--format must be one of s16, s24, f32/],
    [['--driver', 'linear.json', '--out', 'x.wav', '--gain-db', 'loud'], /--gain-db must be a number/],
    [['--driver', 'linear.json', '--out', 'x.wav', '--gain-db', '90'], /--gain-db must be at most 40/],
    [['--driver', 'linear.json', '--out', 'x.wav', '--pre-emphasis-hz', '300'], /--pre-emphasis-hz needs --pre-emphasis-db/],
    [['--driver', 'linear.json', '--out', 'x.wav', '--pre-emphasis-db', '6', '--pre-emphasis-hz', '30000'], /not below half the sample rate/],
    [['--driver', 'linear.json', '--out', 'x.wav', '--ceiling-dbfs', '1'], /--ceiling-dbfs must be at most 0/],
    [['--driver', 'nothere.json', '--out', 'x.wav'], /cannot read driver profile "nothere.json" \(no such file\)/],
    [['--driver', 'notjson.json', '--out', 'x.wav'], /driver profile "notjson.json" is not valid JSON/],
    [['--driver', 'broken.json', '--out', 'x.wav'], /supplyVoltageV/],
    [['--driver', 'linear.json', '--out', 'no/such/dir/x.wav'], /cannot write .*its folder does not exist/],
    [['--driver', 'linear.json', '--out', 'x.wav', 'extra'], /unexpected argument "extra"/],
  ])('%j', async (args, message) => {
    const { code, out, err } = await run(...base, ...args);
    expect(code).toBe(2);
    expect(out).toBe('');
    expect(err).toMatch(message);
    expect(err.trim().split('\n')).toHaveLength(1);
    expect(existsSync(join(dir, 'x.wav'))).toBe(false);
  });

  it('refuses to write over the input clip', async () => {
    const before = readFileSync(join(dir, 'tune.wav'));
    const { code, err } = await run(...base, '--driver', 'linear.json', '--out', 'tune.wav');
    expect(code).toBe(2);
    expect(err).toMatch(/--out is the input clip itself/);
    expect(readFileSync(join(dir, 'tune.wav')).equals(before)).toBe(true);
  });

  it('a failed run leaves an existing output untouched and no temporary file behind', async () => {
    writeFileSync(join(dir, 'keep.wav'), 'previous render');
    const { code } = await run(...base, '--driver', 'broken.json', '--out', 'keep.wav');
    expect(code).toBe(2);
    expect(readFileSync(join(dir, 'keep.wav'), 'utf8')).toBe('previous render');
    expect(readdirSync(dir).filter((f) => f.endsWith('.tmp'))).toEqual([]);
  });
});
