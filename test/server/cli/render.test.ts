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
import { DEMO_DRIVER_LINEAR } from '../../../shared/demo/drivers.ts';
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
    // desk-lantern: f0/(2Q) ≈ 1196 Hz with Q from skin and proximity effect (coil model; see the coil suite).
    expect(s.preEmphasis!.cornerHz).toBeGreaterThan(1100);
    expect(s.preEmphasis!.cornerHz).toBeLessThan(1300);
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

  it('a render forced above the advised gain exits 3 with one line naming the broken limit, and leaves no file', async () => {
    // The demo linear driver with a 2.2 A supply: the supply current binds at the advised gain (its idle draw is 1.5 A).
    writeFileSync(join(dir, 'tight.json'), JSON.stringify({ ...DEMO_DRIVER_LINEAR, supplyCurrentLimitA: 2.2 }));
    const advised = JSON.parse((await run(...base, '--driver', 'tight.json', '--out', 'ok.wav', '--json')).out) as RenderSummary;
    expect(advised.safe).toBe(true);
    expect(advised.advice!.binding!.label).toBe('supply current');
    const forced = (advised.gainDb + 3).toFixed(1);
    const { code, out, err } = await run(...base, '--driver', 'tight.json', '--out', 'hot.wav', '--gain-db', forced);
    expect(code).toBe(3);
    expect(err.trim().split('\n')).toHaveLength(1);
    expect(err.trim()).toMatch(/^coilcue render: unsafe: supply current breaks on the render: \d+\.\d\d A against 2\.20 A allowed.*nothing was written to hot\.wav$/);
    expect(out).toMatch(/\(given\)/);
    expect(out).toMatch(/supply current\s+\d+\.\d\d A\s+\d+\.\d\d A\s+2\.20 A\s+DOES NOT HOLD/);
    expect(out).toContain('NOT SAFE AS RENDERED: nothing was written to hot.wav');
    expect(out).toContain('Lower --gain-db');
    expect(existsSync(join(dir, 'hot.wav'))).toBe(false);
    expect(readdirSync(dir).filter((f) => f.endsWith('.tmp'))).toEqual([]);
  });

  it('--keep-unsafe keeps the unsafe file, and still exits 3', async () => {
    writeFileSync(join(dir, 'tight.json'), JSON.stringify({ ...DEMO_DRIVER_LINEAR, supplyCurrentLimitA: 2.2 }));
    const { code, out, err } = await run(...base, '--driver', 'tight.json', '--out', 'kept.wav', '--gain-db', '8', '--keep-unsafe', '--json');
    expect(code).toBe(3);
    expect(err).toMatch(/kept\.wav was kept \(--keep-unsafe\): do not play it on the coil/);
    const s = JSON.parse(out) as RenderSummary & { fileWritten: boolean };
    expect(s.safe).toBe(false);
    expect(s.fileWritten).toBe(true);
    expect(s.unsafeReason).toMatch(/^supply current breaks on the render/);
    expect(existsSync(join(dir, 'kept.wav'))).toBe(true);
  });

  it('names heavy limiting as a quality note apart from the safety verdict, with a gain that avoids it; cautions beside the advice', async () => {
    const { code, out } = await run(...base, '--driver', 'linear.json', '--out', 'squashed.wav', '--gain-db', '13', '--ceiling-dbfs', '0', '--keep-unsafe', '--json');
    expect([0, 3]).toContain(code);
    const s = JSON.parse(out) as RenderSummary;
    expect(s.limiting!.basis).toBe('measured');
    expect(s.limiting!.deepShare).toBeCloseTo(s.limiter!.deepFraction, 12);
    expect(s.limiting!.heavy).toBe(true);
    expect(s.limiting!.gainDbWithoutHeavyLimiting!).toBeLessThan(13);
    expect(s.limiting!.note).toMatch(/sound squashed\. This is about sound, not safety\. At about -?\d+\.\d dB it would not be/);
    const text = (await run(...base, '--driver', 'linear.json', '--out', 'squashed2.wav', '--gain-db', '13', '--keep-unsafe')).out;
    expect(text).toContain(`Quality: ${s.limiting!.note}`);
    // Cautions where the risk is: the profile, what is estimated and how to measure it, interlock and emergency stop by the keep-out.
    expect(s.cautions.profile).toMatch(/only if the coil and driver profiles are right/);
    expect(s.cautions.estimated.some((e) => /coil resonance: computed from the geometry/.test(e))).toBe(true);
    expect(s.cautions.keepOut).toMatch(/keep-out distance \(\d+\.\d\d m from the top load\).*interlock.*emergency stop/);
    expect(text).toContain(s.cautions.keepOut);
    // A pulse render describes 0 dBFS as the longest on-time.
    const pulse = await run(...base, '--driver', 'pulse.json', '--out', 'pl.wav');
    expect(pulse.out).toMatch(/0 dBFS = the longest on-time/);
    expect(pulse.out).toMatch(/pulses clamped by the duty limit\s+\d+\.\d{3} % of pulses/);
    const pj = JSON.parse((await run(...base, '--driver', 'pulse.json', '--out', 'pl.wav', '--json')).out) as RenderSummary;
    const labels = pj.closedLoop.limits.map((l) => l.label);
    expect(labels.slice(0, 5)).toEqual([
      'junction temperature (bridge)',
      'over-modulated time',
      'supply current',
      'pulses cut to the longest on-time',
      'pulses clamped by the duty limit',
    ]);
    // The bridge's switching speed at the coil's resonance, which it is fast enough for.
    expect(labels[5]).toMatch(/^switching speed \(bridge\)/);
  });

  it("applies the plan's advised pre-emphasis by default and says so; a number overrides it, 0 turns it off", async () => {
    const auto = JSON.parse((await run(...base, '--driver', 'linear.json', '--out', 'auto.wav', '--json')).out) as RenderSummary;
    const planned = JSON.parse((await run('plan', '--clip', 'tune.wav', '--coil', 'coil.json', '--driver', 'linear.json', '--json')).out) as { preEmphasis: { advised: boolean; shelfGainDb: number } };
    if (planned.preEmphasis.advised) {
      expect(auto.preEmphasisFrom).toBe('advised');
      expect(auto.preEmphasis!.shelfGainDb).toBeCloseTo(planned.preEmphasis.shelfGainDb, 6);
      expect(auto.preEmphasisNote).toMatch(/^pre-emphasis as the plan advises .*: a first-order high shelf of \+\d+\.\d dB from \d+ Hz$/);
    } else {
      expect(auto.preEmphasisFrom).toBe('off');
      expect(auto.preEmphasisNote).toMatch(/^no pre-emphasis: none advised/);
    }
    const off = JSON.parse((await run(...base, '--driver', 'linear.json', '--out', 'off.wav', '--pre-emphasis-db', '0', '--json')).out) as RenderSummary;
    expect(off.preEmphasis).toBeNull();
    expect(off.preEmphasisFrom).toBe('off');
    const given = await run(...base, '--driver', 'linear.json', '--out', 'given.wav', '--pre-emphasis-db', '3');
    expect(given.out).toMatch(/pre-emphasis\s+pre-emphasis as given: a first-order high shelf of \+3\.0 dB/);
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
    [['--driver', 'linear.json', '--out', 'x.wav', '--pre-emphasis-db', '0', '--pre-emphasis-hz', '300'], /--pre-emphasis-db 0 turns off/],
    [['--driver', 'linear.json', '--out', 'x.wav', '--pre-emphasis-db', '6', '--pre-emphasis-hz', '30000'], /not below half the sample rate/],
    [['--driver', 'linear.json', '--out', 'x.wav', '--ceiling-dbfs', '1'], /--ceiling-dbfs must be at most 0/],
    [['--driver', 'nothere.json', '--out', 'x.wav'], /cannot read --driver "nothere.json" \(no such file\)/],
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
