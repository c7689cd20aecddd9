// WAV writer (server/audio/wav.ts): round trips through our reader, byte equality with Python's `wave`
// module, TPDF dither statistics, atomic replacement.
import { mkdirSync, mkdtempSync, openSync, readFileSync, readdirSync, readSync, rmSync, writeFileSync, closeSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { createRng } from '../../../shared/demo/prng.ts';
import { decodeAudioBytes, decodeAudioFile } from '../../../server/audio/decode.ts';
import { parseWavHeader } from '../../../server/audio/wav-parse.ts';
import { encodeWav, tpdfDither, writeWavAtomic } from '../../../server/audio/wav.ts';
import { rejectsWithCode } from './wav-builder.ts';

const dir = mkdtempSync(join(tmpdir(), 'coilcue-wav-'));
afterAll(() => rmSync(dir, { recursive: true, force: true }));

/** Random integer codes at b bits, both extremes included, as k/2^(b−1) floats. */
function gridClip(bits: number, channels: number, n: number, seed: number): Float32Array[] {
  const rnd = createRng(seed);
  const full = 2 ** (bits - 1);
  return Array.from({ length: channels }, (_, c) => {
    const x = Float32Array.from({ length: n }, () => (Math.floor(rnd() * 2 * full) - full) / full);
    x[0] = -1;
    x[1] = (full - 1) / full;
    x[2] = c / full;
    return x;
  });
}
const same = (a: Float32Array[], b: Float32Array[]) => a.every((x, c) => x.every((v, i) => v === b[c][i]));

describe('round trips through the reader', () => {
  // Exact equality is the requirement here: k/2^(b−1) is exact in float32 for b ≤ 24, and f32 is copied.
  it('s16 without dither is bit-exact (stereo, plain PCM header)', async () => {
    const channels = gridClip(16, 2, 5001, 1);
    const bytes = encodeWav({ sampleRate: 44100, channels }, { format: 's16', dither: false });
    expect(parseWavHeader(bytes)).toMatchObject({ encoding: 'int', extensible: false, containerBytes: 2 });
    const back = await decodeAudioBytes(bytes);
    expect(back.sampleRate).toBe(44100);
    expect(same(back.channels, channels)).toBe(true);
  });
  it('s24 is bit-exact (mono with an odd byte count, and 3 channels; EXTENSIBLE header)', async () => {
    for (const nc of [1, 3]) {
      const channels = gridClip(24, nc, 1001, 2 + nc);
      const bytes = encodeWav({ sampleRate: 48000, channels }, { format: 's24' });
      expect(parseWavHeader(bytes)).toMatchObject({ extensible: true, containerBytes: 3, channelCount: nc });
      expect(same((await decodeAudioBytes(bytes)).channels, channels)).toBe(true);
    }
  });
  it('f32 keeps float samples exactly, overs included (tag 3 + fact chunk)', async () => {
    const x = Float32Array.from({ length: 999 }, (_, i) => 1.3 * Math.sin(i / 7));
    const bytes = encodeWav({ sampleRate: 96000, channels: [x, x.map((v) => -v)] }, { format: 'f32' });
    expect(parseWavHeader(bytes)).toMatchObject({ encoding: 'float', extensible: false });
    expect(Buffer.from(bytes).indexOf('fact')).toBeGreaterThan(0);
    const back = await decodeAudioBytes(bytes);
    expect(same(back.channels, [x, x.map((v) => -v)])).toBe(true);
  });
  it('a file written by writeWavAtomic reads back through decodeAudioFile', async () => {
    const channels = gridClip(16, 1, 300, 9);
    const p = join(dir, 'trip.wav');
    await writeWavAtomic(p, encodeWav({ sampleRate: 22050, channels }, { format: 's16', dither: false }));
    expect(same((await decodeAudioFile(p)).channels, channels)).toBe(true);
  });
});

describe('integer encoding', () => {
  it('matches byte for byte the file Python’s wave module wrote from the same 16-bit codes', () => {
    const fixture = new URL('../../fixtures/audio/', import.meta.url);
    const ref = JSON.parse(readFileSync(new URL('reference.json', fixture), 'utf8'))['wave-module-s16-stereo.wav'] as { sampleRate: number; codes: number[][] };
    const channels = ref.codes.map((c) => Float32Array.from(c, (k) => k / 32768));
    const ours = encodeWav({ sampleRate: ref.sampleRate, channels }, { format: 's16', dither: false });
    expect(Buffer.compare(Buffer.from(ours), readFileSync(new URL('wave-module-s16-stereo.wav', fixture)))).toBe(0);
  });
  it('rounds to nearest and clips to the integer range', async () => {
    const x = Float32Array.of(0.3 / 32768, 0.6 / 32768, -0.6 / 32768, 1, 1.5, -1.5);
    const back = (await decodeAudioBytes(encodeWav({ sampleRate: 8000, channels: [x] }, { format: 's16', dither: false }))).channels[0];
    expect(Array.from(back, (v) => v * 32768)).toEqual([0, 1, -1, 32767, 32767, -32768]);
    const b24 = (await decodeAudioBytes(encodeWav({ sampleRate: 8000, channels: [x] }, { format: 's24' }))).channels[0];
    expect(b24[4] * 8388608).toBe(8388607);
    expect(b24[5]).toBe(-1);
  });
  it('dither is on by default for s16, seeded and reproducible; off by default for s24', () => {
    const clip = { sampleRate: 8000, channels: [new Float32Array(1000).fill(0.25)] };
    const a = encodeWav(clip, { format: 's16' });
    expect(Buffer.compare(Buffer.from(a), Buffer.from(encodeWav(clip, { format: 's16', seed: 1 })))).toBe(0);
    expect(Buffer.compare(Buffer.from(a), Buffer.from(encodeWav(clip, { format: 's16', seed: 2 })))).not.toBe(0);
    expect(Buffer.compare(Buffer.from(a), Buffer.from(encodeWav(clip, { format: 's16', dither: false })))).not.toBe(0);
    const s24 = encodeWav(clip, { format: 's24' });
    expect(Buffer.compare(Buffer.from(s24), Buffer.from(encodeWav(clip, { format: 's24', dither: false })))).toBe(0);
  });
  it('programming errors throw RangeError naming the problem', () => {
    expect(() => encodeWav({ sampleRate: 44100.5, channels: [new Float32Array(2)] }, { format: 's16' })).toThrow(/integer/);
    expect(() => encodeWav({ sampleRate: 8000, channels: [new Float32Array(2), new Float32Array(3)] }, { format: 's16' })).toThrow(/channel 1/);
    expect(() => encodeWav({ sampleRate: 8000, channels: [Float32Array.of(0, NaN)] }, { format: 'f32' })).toThrow(/sample 1/);
    expect(() => encodeWav({ sampleRate: 8000, channels: [] }, { format: 's16' })).toThrow(RangeError);
  });
});

describe('TPDF dither (Lipshitz, Wannamaker & Vanderkooy, JAES 40(5), 1992)', () => {
  const N = 200_000;
  it('values lie in [−1, 1) LSB with mean 0, variance 1/6 LSB² and a triangular density', () => {
    const rng = createRng(2024);
    const d = Float64Array.from({ length: N }, () => tpdfDither(rng));
    let mean = 0, m2 = 0, lo = Infinity, hi = -Infinity;
    for (const v of d) {
      mean += v / N;
      lo = Math.min(lo, v);
      hi = Math.max(hi, v);
    }
    for (const v of d) m2 += (v - mean) ** 2 / N;
    expect(lo).toBeGreaterThanOrEqual(-1);
    expect(hi).toBeLessThan(1);
    // Tolerances are 4 standard errors at N = 2e5: mean σ/√N = 0.41/447 → 0.004; variance √((E x⁴ − σ⁴)/N) with E x⁴ = 1/15 → 0.0018.
    expect(Math.abs(mean)).toBeLessThan(0.004);
    expect(Math.abs(m2 - 1 / 6)).toBeLessThan(0.0018);
    // Shape: 10 equal bins on [−1, 1); expected mass ∫(1 − |x|)dx per bin. χ² with 9 degrees of freedom < 27.9 (p = 0.001).
    const counts = new Array(10).fill(0);
    for (const v of d) counts[Math.min(9, Math.floor((v + 1) * 5))]++;
    const cdf = (x: number) => (x < 0 ? (1 + x) ** 2 / 2 : 1 - (1 - x) ** 2 / 2);
    let chi2 = 0;
    for (let b = 0; b < 10; b++) {
      const e = N * (cdf(-1 + (b + 1) / 5) - cdf(-1 + b / 5));
      chi2 += (counts[b] - e) ** 2 / e;
    }
    expect(chi2).toBeLessThan(27.9);
  });

  it('total error of dithered 16-bit quantisation has mean 0 and variance 1/4 LSB² whatever the input (§5)', async () => {
    // Without dither the error is deterministic and depends on where the input sits between two codes;
    // with TPDF its first two moments do not: variance 1/12 (rounding) + 1/6 (dither) = 1/4 LSB².
    for (const frac of [0, 0.25, 0.5, 0.77]) {
      const target = 1000 + frac;
      const clip = { sampleRate: 8000, channels: [new Float32Array(100_000).fill(target / 32768)] };
      const codes = (await decodeAudioBytes(encodeWav(clip, { format: 's16', seed: 7 }))).channels[0];
      let mean = 0, v = 0;
      for (const c of codes) mean += (c * 32768 - target) / codes.length;
      for (const c of codes) v += (c * 32768 - target - mean) ** 2 / codes.length;
      // 4 standard errors at N = 1e5: mean √(1/4)/316 → 0.0064; variance ≈ 0.006 (E e⁴ ≤ 0.2).
      expect(Math.abs(mean)).toBeLessThan(0.0064);
      expect(Math.abs(v - 0.25)).toBeLessThan(0.006);
    }
  });
});

describe('writeWavAtomic', () => {
  const tmpLeft = (d: string) => readdirSync(d).filter((f) => f.endsWith('.tmp'));

  it('replaces an existing file by rename: an open handle still sees the old contents', async () => {
    const p = join(dir, 'replace.wav');
    writeFileSync(p, 'old contents');
    const fd = openSync(p, 'r');
    await writeWavAtomic(p, Uint8Array.from([1, 2, 3]));
    const buf = Buffer.alloc(12);
    readSync(fd, buf, 0, 12, 0);
    closeSync(fd);
    expect(buf.toString()).toBe('old contents'); // the old inode was not truncated in place
    expect(Array.from(readFileSync(p))).toEqual([1, 2, 3]);
    expect(tmpLeft(dir)).toEqual([]);
  });

  it('on failure leaves no temporary file and does not clobber what is there', async () => {
    const target = join(dir, 'taken');
    mkdirSync(target);
    writeFileSync(join(target, 'keep.txt'), 'keep');
    const e = await rejectsWithCode(writeWavAtomic(target, Uint8Array.from([9])), 'unwritable');
    expect(e.message).toMatch(/folder of that name exists/);
    expect(readFileSync(join(target, 'keep.txt'), 'utf8')).toBe('keep');
    expect(tmpLeft(dir)).toEqual([]);
  });

  it('a missing folder is unwritable and creates nothing', async () => {
    await rejectsWithCode(writeWavAtomic(join(dir, 'no-such-dir', 'x.wav'), Uint8Array.from([1])), 'unwritable');
    expect(readdirSync(dir)).not.toContain('no-such-dir');
  });
});
