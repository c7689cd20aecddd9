/**
 * `coilcue preview` end to end, in process: the arc-sound WAV (never louder than the source), the
 * JSON summary of the modulation preview (column count and ranges), the caution, bad input.
 */
import { existsSync, readFileSync, rmSync } from 'node:fs';
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { decodeAudioBytes } from '../../../server/audio/decode.ts';
import type { PreviewSummary } from '../../../server/cli/commands/preview.ts';
import { modulationSource } from '../../../shared/audio/clip.ts';
import { levelTriple } from '../../../shared/preview/arc-sound.ts';
import { makeWorkspace, occurrences } from '../render/cli-workspace.ts';

const { dir, run } = makeWorkspace('coilcue-preview-');
afterAll(() => rmSync(dir, { recursive: true, force: true }));

const CAUTION = 'Hearing: keep preview volume moderate';
const base = ['preview', '--clip', 'tune.wav', '--coil', 'coil.json'];

describe('coilcue preview', () => {
  it('rail scheme: writes the arc sound, never louder than the source, and describes the rail', async () => {
    const { code, out, err } = await run(...base, '--driver', 'linear.json', '--out', 'arc.wav');
    expect(err).toBe('');
    expect(code).toBe(0);
    expect(out).toMatch(/rail swing\s+\d+\.\d … \d+\.\d V of 48 V/);
    expect(out).toMatch(/envelope corner 1\d\d\d Hz \(first-order low-pass\)/);
    expect(occurrences(out, CAUTION)).toBe(1);
    const arc = await decodeAudioBytes(new Uint8Array(readFileSync(join(dir, 'arc.wav'))));
    const src = await decodeAudioBytes(new Uint8Array(readFileSync(join(dir, 'tune.wav'))));
    expect(arc.channels).toHaveLength(1);
    expect(arc.channels[0].length).toBe(src.channels[0].length);
    // On the 16-bit file (after dither): peak, true peak and RMS at or below the source's modulation signal.
    const a = levelTriple(arc.channels[0]);
    const s = levelTriple(modulationSource(src, 'mix'));
    expect(a.samplePeak).toBeLessThanOrEqual(s.samplePeak);
    expect(a.truePeak).toBeLessThanOrEqual(s.truePeak);
    expect(a.rms).toBeLessThanOrEqual(s.rms * (1 + 1e-4)); // dither noise adds ≈ 1e-5 of RMS at −20 dBFS
    expect(a.rms).toBeGreaterThan(s.rms * 0.05); // and it is audible, not near-silence
  });

  it('--json, pulse scheme: column count, ranges and arc-sound levels', async () => {
    const { code, out } = await run(...base, '--driver', 'pulse.json', '--out', 'pulse-arc.wav', '--json', '--gain-db', '-3');
    expect(code).toBe(0);
    const s = JSON.parse(out) as PreviewSummary;
    expect(s.scheme).toBe('pulse');
    expect(s.gainFrom).toBe('given');
    expect(s.gainDb).toBe(-3);
    // 2 s at 1 ms frames = 2000 frames: one column each (≤ 4000).
    expect(s.modulation.columns).toBe(2000);
    expect(s.modulation.framesPerColumn).toBe(1);
    expect(s.modulation.range.railMinV).toBeNull();
    expect(s.modulation.range.pulseCount!).toBeGreaterThan(50);
    expect(s.modulation.range.maxOnS!).toBeLessThanOrEqual(150e-6); // the demo driver's longest on-time
    expect(s.modulation.range.maxPowerW).toBe(320 * 12);
    expect(s.modulation.range.meanPowerW).toBeGreaterThan(0);
    expect(s.modulation.range.meanPowerW).toBeLessThanOrEqual(0.08 * 3840); // max duty 8 %
    expect(s.arcSound.cornerHz).toBeNull();
    expect(s.arcSound.pulseCount).toBe(s.modulation.range.pulseCount);
    expect(s.arcSound.output.samplePeakDbfs!).toBeLessThanOrEqual(s.arcSound.source.samplePeakDbfs!);
    expect(s.arcSound.output.rmsDbfs!).toBeLessThanOrEqual(s.arcSound.source.rmsDbfs!);
    expect(s.caution).toContain(CAUTION);
  });

  it('--columns bounds the display grid; the extremes survive decimation', async () => {
    const few = JSON.parse((await run(...base, '--driver', 'buck.json', '--out', 'b1.wav', '--json', '--columns', '64')).out) as PreviewSummary;
    const many = JSON.parse((await run(...base, '--driver', 'buck.json', '--out', 'b2.wav', '--json')).out) as PreviewSummary;
    expect(few.modulation.columns).toBeLessThanOrEqual(64);
    expect(few.modulation.framesPerColumn).toBe(Math.ceil(2000 / 64));
    // Min of mins and max of maxes: the same rail range at any column count.
    expect(few.modulation.range.railMinV).toBe(many.modulation.range.railMinV);
    expect(few.modulation.range.railMaxV).toBe(many.modulation.range.railMaxV);
    expect(few.modulation.range.meanPowerW).toBeCloseTo(many.modulation.range.meanPowerW, 3);
  });

  it('--json carries the display grid itself, --trace writes the same grid as CSV, and the text draws it', async () => {
    const r = await run(...base, '--driver', 'pulse.json', '--out', 'grid.wav', '--columns', '50', '--trace', 'grid.csv', '--json');
    expect(r.code).toBe(0);
    const g = (JSON.parse(r.out) as PreviewSummary).modulation.grid;
    expect(g.columns).toBe(50);
    for (const k of ['timeS', 'pulseCount', 'maxOnTimeS', 'powerMeanW', 'powerMaxW'] as const) expect(g[k]).toHaveLength(50);
    expect(g.railMinV).toBeNull();
    expect(g.pulseCount!.reduce((a, b) => a + b, 0)).toBe((JSON.parse(r.out) as PreviewSummary).modulation.range.pulseCount);
    const csv = readFileSync(join(dir, 'grid.csv'), 'utf8').trimEnd().split('\n');
    expect(csv[0]).toBe('timeS,pulseCount,maxOnTimeS,powerMeanW,powerMaxW');
    expect(csv).toHaveLength(51);
    expect(csv[7].split(',').map(Number)).toEqual([g.timeS[6], g.pulseCount![6], g.maxOnTimeS![6], g.powerMeanW[6], g.powerMaxW[6]]);
    const text = (await run(...base, '--driver', 'linear.json', '--out', 'grid2.wav', '--chart-width', '30')).out;
    expect(text).toMatch(/rail highest \(0…48 V\)\s+│[ ▁▂▃▄▅▆▇█]{30}│/);
    expect(text).toMatch(/power mean \(0…144 W\)\s+│[ ▁▂▃▄▅▆▇█]{30}│/);
  });

  it('bad input: exit 2, one line, no file', async () => {
    for (const [args, re] of [
      [['--driver', 'linear.json', '--out', 'x.wav', '--columns', '0'], /--columns must be at least 1/],
      [['--driver', 'linear.json', '--out', 'x.wav', '--columns', '2.5'], /--columns must be a whole number/],
      [['--driver', 'linear.json'], /missing --out/],
      [['--driver', 'linear.json', '--out', 'x.wav', '--channel', 'centre'], /--channel must be one of mix, left, right/],
    ] as const) {
      const { code, err } = await run(...base, ...args);
      expect(code).toBe(2);
      expect(err).toMatch(re);
      expect(err.trim().split('\n')).toHaveLength(1);
    }
    expect(existsSync(join(dir, 'x.wav'))).toBe(false);
  });
});
