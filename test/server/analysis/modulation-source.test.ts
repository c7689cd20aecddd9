// The modulation source written block by block as a file is decoded (server/analysis/modulation-source.ts):
// bit for bit modulationSource (shared/audio/clip.ts), whatever the blocks.
import { describe, expect, it } from 'vitest';
import { writeModulationSource } from '../../../server/analysis/modulation-source.ts';
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

describe('writeModulationSource', () => {
  for (const count of [1, 2, 3, 6]) {
    for (const which of ['mix', 'left', 'right'] as ModulationChannel[]) {
      if (which === 'right' && count < 2) continue;
      it(`${count} channel(s), ${which}: bit for bit modulationSource, in uneven blocks, into place or into a block of its own`, () => {
        const chs = awkward(count, 5000);
        const want = modulationSource({ sampleRate: 8000, channels: chs }, which);
        const whole = new Float32Array(5000);
        const blocks: Float32Array[] = [];
        for (const [a, b] of [[0, 1], [1, 999], [999, 4096], [4096, 5000]]) {
          writeModulationSource(chs, which, whole, a, b);
          // as analyze-stream.ts does it: each block's channels as arrays of their own, the source at 0
          const part = new Float32Array(b - a);
          writeModulationSource(chs.map((c) => c.slice(a, b)), which, part, 0, b - a);
          blocks.push(part);
        }
        expect(bitsEqual(whole, want)).toBe(true);
        const joined = new Float32Array(5000);
        let at = 0;
        for (const p of blocks) joined.set(p, (at += p.length) - p.length);
        expect(bitsEqual(joined, want)).toBe(true);
      });
    }
  }
});
