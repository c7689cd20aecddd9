// decodeAudioFile reading a WAV from disk in blocks (server/audio/decode.ts, decodeWavFile): the same
// samples, header checks and error codes as decoding the whole file held in memory
// (decodeAudioBytes), for headers longer than the first read, data spread over many blocks, and files
// cut short. Files are built byte by byte (wav-builder.ts) from codes synthesised here, so the
// expected samples are known exactly. Format: Microsoft/IBM RIFF/WAVE specification (1991).
import { mkdtempSync, rmSync, truncateSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { decodeAudioBytes, decodeAudioFile } from '../../../server/audio/decode.ts';
import { parseWavHeader, parseWavHeaderPrefix } from '../../../server/audio/wav-parse.ts';
import { buildWav, floatBytes, intBytes, rejectsWithCode } from './wav-builder.ts';

const dir = mkdtempSync(join(tmpdir(), 'coilcue-stream-'));
afterAll(() => rmSync(dir, { recursive: true, force: true }));
let count = 0;
const fileOf = (bytes: Uint8Array): string => {
  const p = join(dir, `f${count++}.wav`);
  writeFileSync(p, bytes);
  return p;
};

/** Codes of a two-tone signal at b bits: round(x·2^(b−1)), x = 0.5 sin + 0.3 sin. */
const codes = (n: number, bits: number, phase = 0) =>
  Array.from({ length: n }, (_, i) => Math.round((0.5 * Math.sin(0.01 * i + phase) + 0.3 * Math.sin(0.37 * i)) * 2 ** (bits - 1)));
const interleave = (chs: number[][]) => chs[0].flatMap((_, i) => chs.map((c) => c[i]));

/** The WAV `bytes` with a chunk of `size` bytes inserted at byte 12 (before fmt). */
function withLeadingChunk(bytes: Uint8Array, id: string, size: number): Uint8Array {
  const c = new Uint8Array(8 + size + (size & 1));
  c.set([...id].map((ch) => ch.charCodeAt(0)));
  new DataView(c.buffer).setUint32(4, size, true);
  const out = new Uint8Array(bytes.length + c.length);
  out.set(bytes.subarray(0, 12));
  out.set(c, 12);
  out.set(bytes.subarray(12), 12 + c.length);
  return out;
}

async function sameAsInMemory(bytes: Uint8Array): Promise<void> {
  const fromFile = await decodeAudioFile(fileOf(bytes));
  const inMemory = await decodeAudioBytes(bytes);
  expect(fromFile.channels).toHaveLength(inMemory.channels.length);
  // exact: both paths convert the same bytes with the same scaling
  fromFile.channels.forEach((c, i) => expect(Buffer.compare(Buffer.from(c.buffer), Buffer.from(inMemory.channels[i].buffer))).toBe(0));
  expect(fromFile).toMatchObject({ format: 'wav', sampleRate: inMemory.sampleRate, sourceBytes: bytes.length, durationS: inMemory.durationS });
}

describe('reading a WAV file block by block gives the samples of the whole file', () => {
  it('16-bit stereo over several 1 MiB blocks (600 000 frames = 2.4 MB)', async () => {
    const n = 600_000;
    const l = codes(n, 16);
    const r = codes(n, 16, 1);
    const bytes = buildWav({ channels: 2, sampleRate: 44100, containerBytes: 2, data: intBytes(interleave([l, r]), 2) });
    await sameAsInMemory(bytes);
    const clip = await decodeAudioFile(fileOf(bytes));
    // spot checks against the codes: k/32768 exactly (float32 holds 16-bit codes exactly)
    for (const i of [0, 262143, 262144, 524288, n - 1]) {
      expect(clip.channels[0][i]).toBe(l[i] / 32768);
      expect(clip.channels[1][i]).toBe(r[i] / 32768);
    }
  });

  it('every sample format: 8-bit, 24-bit with an odd size, 32-bit int, float32, float64, EXTENSIBLE', async () => {
    const n = 300_001; // odd: 24-bit mono data needs a pad byte
    await sameAsInMemory(buildWav({ channels: 1, sampleRate: 8000, containerBytes: 1, data: Uint8Array.from(codes(n, 8), (k) => k + 128) }));
    await sameAsInMemory(buildWav({ channels: 1, sampleRate: 48000, containerBytes: 3, data: intBytes(codes(n, 24), 3) }));
    await sameAsInMemory(buildWav({ channels: 3, sampleRate: 48000, containerBytes: 4, data: intBytes(codes(3 * 100_000, 32), 4) }));
    const v = codes(n, 16).map((k) => k / 30000);
    await sameAsInMemory(buildWav({ tag: 3, channels: 1, sampleRate: 48000, containerBytes: 4, data: floatBytes(v, 4) }));
    await sameAsInMemory(buildWav({ tag: 3, channels: 2, sampleRate: 48000, containerBytes: 8, data: floatBytes(v.slice(0, 200_000), 8) }));
    const s24in32 = codes(100_000, 24).map((k) => k * 256);
    await sameAsInMemory(buildWav({ tag: 0xfffe, subTag: 1, channels: 1, sampleRate: 48000, containerBytes: 4, bits: 32, validBits: 24, data: intBytes(s24in32, 4) }));
  });

  it('a header longer than the first 64 KiB read: chunks before fmt and before data (200 KiB each)', async () => {
    const data = intBytes(codes(50_000, 16), 2);
    const bytes = withLeadingChunk(buildWav({ channels: 1, sampleRate: 22050, containerBytes: 2, data, extraChunks: [['LIST', new Uint8Array(200_001)]] }), 'JUNK', 200_000);
    expect(parseWavHeaderPrefix(bytes.subarray(0, 65536), bytes.length)).toBeNull(); // needs more
    expect(parseWavHeaderPrefix(bytes.subarray(0, 500_000), bytes.length)).toEqual(parseWavHeader(bytes));
    await sameAsInMemory(bytes);
  });

  it('a small file read whole in the first read; a streamed data size (0xFFFFFFFF) read to the end', async () => {
    await sameAsInMemory(buildWav({ channels: 2, sampleRate: 8000, containerBytes: 2, data: intBytes(codes(20, 16), 2) }));
    const data = intBytes(codes(400_000, 16), 2);
    await sameAsInMemory(buildWav({ channels: 1, sampleRate: 8000, containerBytes: 2, data, dataSizeField: 0xffffffff, riffSizeField: 0xffffffff }));
  });

  it('onFrames sees every frame once, in order, each block after its samples are final', async () => {
    const n = 700_000; // mono 16-bit: 1 MiB blocks of 524 288 frames, so two calls
    const c = codes(n, 16);
    const seen: [number, number][] = [];
    let ok = true;
    const clip = await decodeAudioFile(fileOf(buildWav({ channels: 1, sampleRate: 8000, containerBytes: 2, data: intBytes(c, 2) })), {
      onFrames: (chs, from, to) => {
        seen.push([from, to]);
        ok &&= chs[0][from] === c[from] / 32768 && chs[0][to - 1] === c[to - 1] / 32768;
      },
    });
    expect(seen).toEqual([[0, 524288], [524288, n]]);
    expect(ok).toBe(true);
    expect(clip.channels[0]).toHaveLength(n);
    // from memory: in chunks of 2^20 frames; an error thrown in it ends the decoding
    const calls: number[][] = [];
    await decodeAudioBytes(buildWav({ channels: 2, sampleRate: 8000, containerBytes: 2, data: intBytes(codes(200, 16), 2) }), { onFrames: (_c, a, b) => calls.push([a, b]) });
    expect(calls).toEqual([[0, 100]]);
    await expect(decodeAudioFile(fileOf(buildWav({ channels: 1, sampleRate: 8000, containerBytes: 2, data: intBytes(c, 2) })), { onFrames: () => { throw new RangeError('stop'); } })).rejects.toThrow('stop');
  });
});

describe('checks and errors of a WAV file read in blocks', () => {
  const mono16 = { channels: 1, sampleRate: 8000, containerBytes: 2 } as const;

  it('truncated: a file cut inside its data, with the message of the in-memory reader', async () => {
    const whole = buildWav({ ...mono16, data: intBytes(codes(700_000, 16), 2) });
    const cut = whole.subarray(0, whole.length - 1001);
    const a = await rejectsWithCode(decodeAudioFile(fileOf(cut)), 'truncated');
    const b = await rejectsWithCode(decodeAudioBytes(cut), 'truncated');
    expect(a.message).toBe(b.message);
    expect(a.message).toMatch(/promises 1400000 bytes/);
  });

  it('too-long and too-large come from the header, before any sample is read (a sparse 150 MB file)', async () => {
    // Header promising 20 min of 48 kHz stereo 16-bit (230 MB); the file is extended sparsely to 150 MB,
    // so reading its samples would take seconds and 150 MB: the limits must refuse it first.
    const p = fileOf(buildWav({ channels: 2, sampleRate: 48000, containerBytes: 2, data: new Uint8Array(4), dataSizeField: 1200 * 48000 * 4 }));
    truncateSync(p, 150e6);
    const e = await rejectsWithCode(decodeAudioFile(p, { maxDurationS: 600 }), 'too-long');
    expect(e.message).toMatch(/20 min 0 s/);
    await rejectsWithCode(decodeAudioFile(p, { maxDecodedBytes: 100e6 }), 'too-large');
    await rejectsWithCode(decodeAudioFile(p), 'truncated'); // within the limits: 150 MB of 230 MB present
  });

  it('corrupt: a NaN in a later block is found, with its time', async () => {
    const v = codes(600_000, 16).map((k) => k / 40000);
    v[500_000] = Number.NaN;
    const e = await rejectsWithCode(decodeAudioFile(fileOf(buildWav({ tag: 3, ...mono16, containerBytes: 4, data: floatBytes(v, 4) }))), 'corrupt');
    expect(e.message).toMatch(/at 62\.500 s/); // frame 500 000 at 8 kHz
  });

  it('empty data chunk, and a file shorter than a RIFF header', async () => {
    await rejectsWithCode(decodeAudioFile(fileOf(buildWav({ ...mono16, data: new Uint8Array(0) }))), 'empty');
    await rejectsWithCode(decodeAudioFile(fileOf(Uint8Array.from([0x52, 0x49, 0x46, 0x46, 0, 0]))), 'not-audio');
  });

  it('parseWavHeaderPrefix checks its arguments', () => {
    const bytes = buildWav({ ...mono16, data: new Uint8Array(8) });
    expect(() => parseWavHeaderPrefix(bytes, bytes.length - 1)).toThrow(RangeError);
    expect(parseWavHeaderPrefix(bytes.subarray(0, 8), bytes.length)).toBeNull();
  });
});
