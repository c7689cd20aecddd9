// decodeAudioFile / decodeAudioBytes: file-system errors, size and time limits, progress reports.
import { mkdtempSync, rmSync, truncateSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { decodeAudioBytes, decodeAudioFile } from '../../../server/audio/decode.ts';
import { buildWav, rejectsWithCode } from './wav-builder.ts';

const dir = mkdtempSync(join(tmpdir(), 'coilcue-decode-'));
afterAll(() => rmSync(dir, { recursive: true, force: true }));

/** Mono 16-bit WAV of `frames` samples of a 440 Hz sine at 8 kHz. */
function sineWav(frames: number, fs = 8000): Uint8Array {
  const codes = Int16Array.from({ length: frames }, (_, i) => Math.round(16384 * Math.sin((2 * Math.PI * 440 * i) / fs)));
  return buildWav({ channels: 1, sampleRate: fs, containerBytes: 2, data: new Uint8Array(codes.buffer) }); // little-endian host
}

describe('file-system errors', () => {
  it('not-found names the path', async () => {
    const e = await rejectsWithCode(decodeAudioFile(join(dir, 'nope.wav')), 'not-found');
    expect(e.message).toContain('nope.wav');
  });
  it('a directory is unreadable', async () => {
    await rejectsWithCode(decodeAudioFile(dir), 'unreadable');
  });
  it('a 0-byte file is empty; so are 0 bytes in memory', async () => {
    const p = join(dir, 'empty.mp3');
    writeFileSync(p, new Uint8Array(0));
    await rejectsWithCode(decodeAudioFile(p), 'empty');
    await rejectsWithCode(decodeAudioBytes(new Uint8Array(0)), 'empty');
  });
});

describe('limits', () => {
  it('too-large is decided by stat() before reading: a 300 MB sparse file fails at once', async () => {
    const p = join(dir, 'huge.wav');
    writeFileSync(p, sineWav(100));
    truncateSync(p, 300e6); // sparse: no data is written, and reading it would allocate 300 MB
    const e = await rejectsWithCode(decodeAudioFile(p), 'too-large');
    expect(e.message).toMatch(/300\.0 MB, over the 200\.0 MB limit/);
  });
  it('maxBytes applies to bytes in memory too', async () => {
    await rejectsWithCode(decodeAudioBytes(sineWav(1000), { maxBytes: 1000 }), 'too-large');
  });
  it('a clip just over maxDurationS is too-long; just under passes', async () => {
    const bytes = sineWav(8001); // 1.000125 s at 8 kHz
    await rejectsWithCode(decodeAudioBytes(bytes, { maxDurationS: 1 }), 'too-long');
    const ok = await decodeAudioBytes(bytes, { maxDurationS: 1.001 });
    expect(ok.durationS).toBeCloseTo(1.000125, 9);
  });
  it('too-large also covers the decoded size, from the header: 32 channels promising 1 GB of floats', async () => {
    // 32 ch × 16-bit × 8 kHz, header promising 1000 s: 1000·8000·32·4 B = 1.024 GB decoded; only the header is present.
    const bytes = buildWav({ channels: 32, sampleRate: 8000, containerBytes: 2, data: new Uint8Array(0), dataSizeField: 1000 * 8000 * 64 });
    const e = await rejectsWithCode(decodeAudioBytes(bytes, { maxDecodedBytes: 1e9 }), 'too-large');
    expect(e.message).toMatch(/1024\.0 MB of memory \(32 channels\)/);
  });
  it('decode-timeout: a WAV needing more than one chunk stops when the budget is spent', async () => {
    const p = join(dir, 'long.wav');
    writeFileSync(p, sineWav(1_200_000)); // > 2^20 frames, so the reader checks the clock between chunks
    const e = await rejectsWithCode(decodeAudioFile(p, { timeoutS: 1e-6 }), 'decode-timeout');
    expect(e.message).toMatch(/stopped/);
  });
  it('bad options are programming errors (RangeError), not InputError', async () => {
    await expect(decodeAudioBytes(sineWav(10), { maxDurationS: -1 })).rejects.toThrow(RangeError);
    await expect(decodeAudioBytes(sineWav(10), { timeoutS: Number.NaN })).rejects.toThrow(/timeoutS/);
  });
});

describe('progress', () => {
  it('reports non-decreasing fractions from 0 to 1, ending at 1 once', async () => {
    const p = join(dir, 'progress.wav');
    writeFileSync(p, sineWav(2_500_000)); // three WAV chunks
    const seen: number[] = [];
    const clip = await decodeAudioFile(p, { onProgress: (f) => seen.push(f) });
    expect(clip.channels[0]).toHaveLength(2_500_000);
    expect(seen[0]).toBe(0);
    expect(seen.at(-1)).toBe(1);
    expect(seen.filter((f) => f === 1)).toHaveLength(1);
    for (let i = 1; i < seen.length; i++) expect(seen[i]).toBeGreaterThanOrEqual(seen[i - 1]);
    expect(seen.length).toBeGreaterThanOrEqual(5); // read + 3 chunks + start
  });
});

describe('in-memory input is left alone', () => {
  it('decodeAudioBytes does not modify or detach the caller’s bytes', async () => {
    const bytes = sineWav(100);
    const copy = bytes.slice();
    await decodeAudioBytes(bytes);
    expect(bytes.byteLength).toBe(copy.byteLength);
    expect(Buffer.compare(bytes, copy)).toBe(0);
  });
});
