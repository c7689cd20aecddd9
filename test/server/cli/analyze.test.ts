import { mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { encodeWav } from '../../../server/audio/wav.ts';
import type { CliIo } from '../../../server/cli/io.ts';
import { main } from '../../../server/cli/main.ts';

const dir = mkdtempSync(join(tmpdir(), 'coilcue-analyze-'));
afterAll(() => rmSync(dir, { recursive: true, force: true }));

function capture(): CliIo & { stdout: string; stderr: string } {
  const io = { stdout: '', stderr: '', errIsTty: false, cwd: dir, out: (t: string) => void (io.stdout += t), err: (t: string) => void (io.stderr += t) };
  return io;
}

const FS = 44100;
const sine = Float32Array.from({ length: FS * 2 }, (_, i) => 0.5 * Math.sin((2 * Math.PI * 440 * i) / FS));
writeFileSync(join(dir, 'tone.wav'), encodeWav({ sampleRate: FS, channels: [sine, sine] }, { format: 's24' }));
writeFileSync(join(dir, 'mono.wav'), encodeWav({ sampleRate: FS, channels: [sine] }, { format: 's24' }));
writeFileSync(join(dir, 'junk.wav'), 'this is not audio at all, just text that happens to be long enough');

describe('coilcue analyze', () => {
  it('prints the JSON keys other tools read', async () => {
    const io = capture();
    expect(await main(['analyze', 'tone.wav', '--json'], io)).toBe(0);
    const j = JSON.parse(io.stdout);
    for (const k of ['sampleRate', 'channels', 'durationS']) expect(j).toHaveProperty(k);
    for (const k of ['samplePeakDbfs', 'truePeakDbtp', 'rmsDbfs', 'crestDb', 'dcOffset', 'clippedSamples']) expect(j.level).toHaveProperty(k);
    for (const k of ['integratedLufs', 'loudnessRangeLu', 'maxMomentaryLufs', 'maxShortTermLufs']) expect(j.loudness).toHaveProperty(k);
    expect(j.spectrum.dominantHz).toBeCloseTo(440, 0);
    // 0.5 FS sine: peak −6.02 dBFS, RMS −9.03 dBFS (plain convention, sine = peak − 3.01 dB).
    expect(j.level.samplePeakDbfs).toBeCloseTo(-6.0206, 3);
    expect(j.level.rmsDbfs).toBeCloseTo(-9.0309, 3);
    expect(io.stderr).toBe('');
  });

  it('prints a readable table by default', async () => {
    const io = capture();
    expect(await main(['analyze', 'tone.wav', '--channel', 'left', '--frame-ms', '2'], io)).toBe(0);
    expect(io.stdout).toMatch(/integrated loudness\s+-\d+\.\d LUFS/);
    expect(io.stdout).toMatch(/true peak\s+-6\.0\d dBTP/);
  });

  it('exits 2 with one line on stderr for bad input', async () => {
    for (const args of [['analyze', 'junk.wav'], ['analyze', 'missing.wav'], ['analyze'], ['analyze', 'tone.wav', '--channel', 'centre'], ['analyze', 'tone.wav', '--frame-ms', 'x'], ['analyze', 'mono.wav', '--channel', 'right']]) {
      const io = capture();
      expect(await main(args, io)).toBe(2);
      expect(io.stdout).toBe('');
      expect(io.stderr.trim().split('\n')).toHaveLength(1);
      expect(io.stderr).toMatch(/^coilcue analyze: /);
    }
  });
});
