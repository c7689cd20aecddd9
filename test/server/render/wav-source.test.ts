/**
 * The modulation source read again from a WAV file block by block (server/render/wav-source.ts,
 * shared/preview/sample-blocks.ts) against the whole-buffer source (decodeAudioFile, then
 * modulationSource): equal bit for bit for the mix, each channel and a mono file, in 16-bit, 24-bit
 * and float files, whatever the block length; a file changed under the reader is refused.
 */
import { appendFileSync, mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { decodeAudioFile } from '../../../server/audio/decode.ts';
import { type WavSampleFormat, encodeWav } from '../../../server/audio/wav.ts';
import { openWavSource } from '../../../server/render/wav-source.ts';
import { type ModulationChannel, modulationSource } from '../../../shared/audio/clip.ts';
import { type SampleBlocks, arraySamples, modulationBlock } from '../../../shared/preview/sample-blocks.ts';
import { uniformNoise } from '../../shared/dsp/uniform-noise.ts';

const FS = 44100;
const dir = mkdtempSync(join(tmpdir(), 'coilcue-wav-source-'));
afterAll(() => rmSync(dir, { recursive: true, force: true }));

/** Every sample of a block source read in blocks of `block` (≤ maxBlock), in one array. */
function readAll(src: SampleBlocks, block = src.maxBlock): Float32Array {
  const out = new Float32Array(src.length);
  for (let a = 0; a < src.length; a += block) out.set(src.read(a, Math.min(block, src.length - a)), a);
  return out;
}

/** Index of the first sample where a and b differ as float32 bit patterns (Object.is), or −1. */
function firstDifference(a: Float32Array, b: Float32Array): number {
  expect(a.length).toBe(b.length);
  for (let i = 0; i < a.length; i++) if (!Object.is(a[i], b[i])) return i;
  return -1;
}

// 3 s of three channels out of step with noise: partial sums of the mix round differently from (l + r)/2.
const n = 3 * FS + 17;
const chs = [0, 1, 2].map((c) => uniformNoise(n, 0.3, 20 + c).map((v, i) => v + 0.6 * Math.sin((2 * Math.PI * (110 + 50 * c) * i) / FS + c)));

describe('openWavSource', () => {
  for (const format of ['s16', 's24', 'f32'] as const satisfies readonly WavSampleFormat[]) {
    it(`${format}: equals modulationSource of the decoded file bit for bit (mix, left, right, mono; blocks of 1, 97, 4099, 65536)`, async () => {
      const files = { stereo: chs.slice(0, 2), three: chs, mono: chs.slice(0, 1) };
      for (const [name, channels] of Object.entries(files)) {
        const path = join(dir, `${name}-${format}.wav`);
        writeFileSync(path, encodeWav({ sampleRate: FS, channels }, { format, seed: 3 }));
        const clip = await decodeAudioFile(path);
        const which: ModulationChannel[] = channels.length === 1 ? ['mix', 'left'] : ['mix', 'left', 'right'];
        for (const ch of which) {
          const want = modulationSource(clip, ch);
          for (const maxBlock of [1, 97, 4099, 65536]) {
            if (maxBlock === 1 && name !== 'stereo') continue; // one-sample reads are slow; once is enough
            const src = openWavSource(path, ch, maxBlock)!;
            expect(src.length).toBe(n);
            expect(firstDifference(readAll(src), want)).toBe(-1);
            // out of order and shorter than a block: the same samples
            const k = Math.min(5, maxBlock);
            expect(firstDifference(src.read(n - k, k).slice(), want.subarray(n - k))).toBe(-1);
            src.close();
          }
        }
      }
    });
  }

  it('modulationBlock is modulationSource’s arithmetic, and arraySamples reads views of the array', () => {
    const out = new Float32Array(n);
    const want = modulationSource({ sampleRate: FS, channels: chs }, 'mix');
    expect(firstDifference(modulationBlock(chs, 'mix', out, n), want)).toBe(-1);
    expect(modulationBlock(chs.slice(0, 1), 'right', out, 10)).toEqual(chs[0].subarray(0, 10));
    const a = arraySamples(want);
    expect(firstDifference(readAll(a, 1000), want)).toBe(-1);
    expect(() => a.read(n - 1, 2)).toThrow(RangeError);
  });

  it('is null for a file that is not a WAV file it reads (the decoder reports those)', () => {
    const notWav = join(dir, 'not.wav');
    writeFileSync(notWav, 'ID3 not a wave file at all');
    expect(openWavSource(notWav, 'mix', 1024)).toBeNull();
    expect(openWavSource(join(dir, 'missing.wav'), 'mix', 1024)).toBeNull();
  });

  it('refuses to read on once the file has changed', () => {
    const path = join(dir, 'changing.wav');
    writeFileSync(path, encodeWav({ sampleRate: FS, channels: chs.slice(0, 2) }, { format: 's16' }));
    const src = openWavSource(path, 'mix', 4096)!;
    src.read(0, 4096);
    appendFileSync(path, new Uint8Array(2));
    // each pass starts at sample 0 and checks the file first
    expect(() => src.read(0, 4096)).toThrow(expect.objectContaining({ code: 'changed' }));
    src.close();
    expect(() => src.read(0, 1)).toThrow(RangeError);
  });
});
