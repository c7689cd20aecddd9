// The modulation source written into shared memory while decoding (server/analysis/shared-source.ts):
// bit for bit modulationSource (shared/audio/clip.ts), whatever the blocks, and the check that lets
// analyzeClipParallel use it.
import { describe, expect, it } from 'vitest';
import { analyzeClipParallel, startAnalysisWorker, type TaskTiming } from '../../../server/analysis/analyze-parallel.ts';
import { matchesModulationSource, sharedSourceWriter, writeModulationSource } from '../../../server/analysis/shared-source.ts';
import { analyzeClip } from '../../../shared/analysis/analyze-clip.ts';
import { type ModulationChannel, modulationSource } from '../../../shared/audio/clip.ts';

/** Channels with the awkward values: −0 (0 + (−0) is +0), values whose float32 sum rounds, subnormals. */
function awkward(channels: number, n: number): Float32Array[] {
  let s = 99;
  return Array.from({ length: channels }, (_, c) =>
    Float32Array.from({ length: n }, (_, i) => {
      s = (Math.imul(s, 1664525) + 1013904223) >>> 0;
      if (i % 7 === 0) return -0;
      if (i % 11 === 0) return 1e-40 * (c + 1);
      return (s / 2 ** 31 - 1) * (1 + 1e-7 * c);
    }),
  );
}
const bitsEqual = (a: Float32Array, b: Float32Array) => a.length === b.length && a.every((v, i) => Object.is(v, b[i]));

describe('writeModulationSource and sharedSourceWriter', () => {
  for (const count of [1, 2, 3, 6]) {
    for (const which of ['mix', 'left', 'right'] as ModulationChannel[]) {
      if (which === 'right' && count < 2) continue;
      it(`${count} channel(s), ${which}: bit for bit modulationSource, in uneven blocks`, () => {
        const chs = awkward(count, 5000);
        const want = modulationSource({ sampleRate: 8000, channels: chs }, which);
        const w = sharedSourceWriter(which);
        for (const [a, b] of [[0, 1], [1, 999], [999, 4096], [4096, 5000]]) {
          expect(w.source()).toBeNull(); // not complete yet
          w.onFrames(chs, a, b);
        }
        const got = w.source()!;
        expect(got.buffer).toBeInstanceOf(SharedArrayBuffer);
        expect(bitsEqual(got, want)).toBe(true);
      });
    }
  }

  it('matchesModulationSource: the right array passes; another channel, a wrong length or ordinary memory fail', () => {
    const chs = awkward(2, 3000);
    const clip = { sampleRate: 8000, channels: chs };
    const mix = new Float32Array(new SharedArrayBuffer(4 * 3000));
    writeModulationSource(chs, 'mix', mix, 0, 3000);
    expect(matchesModulationSource(clip, 'mix', mix)).toBe(true);
    expect(matchesModulationSource(clip, 'left', mix)).toBe(false);
    expect(matchesModulationSource(clip, 'mix', mix.subarray(1))).toBe(false);
    expect(matchesModulationSource(clip, 'mix', Float32Array.from(mix))).toBe(false);
  });
});

describe('analyzeClipParallel with a source made while decoding', () => {
  const n = 44100 * 2;
  const chs = [
    Float32Array.from({ length: n }, (_, i) => 0.5 * Math.sin((2 * Math.PI * 330 * i) / 44100)),
    Float32Array.from({ length: n }, (_, i) => 0.2 * Math.sin((2 * Math.PI * 495 * i) / 44100)),
  ];
  const clip = { sampleRate: 44100, channels: chs };

  it('uses it (no mix written here) and gives analyzeClip’s result', async () => {
    const w = sharedSourceWriter('mix');
    w.onFrames(chs, 0, n);
    const worker = startAnalysisWorker();
    await worker.ready;
    const timings: TaskTiming[] = [];
    expect(await analyzeClipParallel(clip, { worker, sharedSource: w.source()!, onTask: (t) => timings.push(t) })).toEqual(analyzeClip(clip));
    expect(timings.some((t) => t.task === 'mix')).toBe(false);
  });

  it('ignores one that does not fit (another channel’s) and still gives analyzeClip’s result', async () => {
    const w = sharedSourceWriter('left');
    w.onFrames(chs, 0, n);
    const timings: TaskTiming[] = [];
    expect(await analyzeClipParallel(clip, { sharedSource: w.source()!, onTask: (t) => timings.push(t) })).toEqual(analyzeClip(clip));
    expect(timings.some((t) => t.task === 'mix')).toBe(true);
  });
});
