// WAV reading (server/audio/wav-parse.ts through decodeAudioBytes): every sample width, layout details
// of the RIFF format, and the header checks. Files are built byte by byte in wav-builder.ts, from sines
// quantised in this file, so the expected sample values are known exactly.
// Format source: Microsoft/IBM "Multimedia Programming Interface and Data Specifications 1.0" (1991);
// Microsoft "Multiple Channel Audio Data and WAVE Files" (2001) for WAVE_FORMAT_EXTENSIBLE.
import { describe, expect, it } from 'vitest';
import { decodeAudioBytes } from '../../../server/audio/decode.ts';
import { parseWavHeader } from '../../../server/audio/wav-parse.ts';
import { buildWav, floatBytes, intBytes, rejectsWithCode } from './wav-builder.ts';

const FS = 8000;
const N = 400;

/** Integer codes of A·sin(2π f n/fs) at b bits: round(x·2^(b−1)) (the sine is synthesised here). */
function sineCodes(f: number, amp: number, bits: number, n = N, fs = FS): number[] {
  const full = 2 ** (bits - 1);
  return Array.from({ length: n }, (_, i) => Math.round(amp * Math.sin((2 * Math.PI * f * i) / fs) * full));
}
const interleave = (chs: number[][]): number[] => chs[0].flatMap((_, i) => chs.map((c) => c[i]));
/** Largest |decoded − code/2^(b−1)|. */
function maxErr(x: Float32Array, codes: number[], full: number): number {
  let m = 0;
  codes.forEach((k, i) => (m = Math.max(m, Math.abs(x[i] - k / full))));
  return m;
}

describe('WAV sample widths decode to code/2^(b−1)', () => {
  // Tolerance 0: k/2^(b−1) is exactly representable in float32 for b ≤ 24, so a correct reader is bit-exact.
  it('16-bit stereo: channels de-interleaved, bit-exact', async () => {
    const l = sineCodes(440, 0.5, 16), r = sineCodes(660, 0.25, 16);
    const clip = await decodeAudioBytes(buildWav({ channels: 2, sampleRate: FS, containerBytes: 2, data: intBytes(interleave([l, r]), 2) }));
    expect(clip.format).toBe('wav');
    expect(clip.sampleRate).toBe(FS);
    expect(clip.channels).toHaveLength(2);
    expect(clip.channels[0]).toHaveLength(N);
    expect(clip.durationS).toBeCloseTo(N / FS, 12);
    expect(maxErr(clip.channels[0], l, 32768)).toBe(0);
    expect(maxErr(clip.channels[1], r, 32768)).toBe(0);
  });

  it('16-bit extremes: −32768 → −1 and +32767 → 1 − 2^-15 (one linear scale, no kink at zero)', async () => {
    const codes = [-32768, 32767, 16384, -16384, 1, -1];
    const clip = await decodeAudioBytes(buildWav({ channels: 1, sampleRate: FS, containerBytes: 2, data: intBytes(codes, 2) }));
    expect(Array.from(clip.channels[0])).toEqual([-1, 1 - 2 ** -15, 0.5, -0.5, 2 ** -15, -(2 ** -15)]);
  });

  it('8-bit unsigned: (u − 128)/128', async () => {
    const s = sineCodes(1000, 0.9, 8);
    const clip = await decodeAudioBytes(buildWav({ channels: 1, sampleRate: FS, containerBytes: 1, data: Uint8Array.from(s, (k) => k + 128) }));
    expect(maxErr(clip.channels[0], s, 128)).toBe(0);
    const ends = await decodeAudioBytes(buildWav({ channels: 1, sampleRate: FS, containerBytes: 1, data: Uint8Array.of(0, 128, 255) }));
    expect(Array.from(ends.channels[0])).toEqual([-1, 0, 127 / 128]);
  });

  it('24-bit mono with an odd data size (pad byte) and a chunk after the data', async () => {
    const s = sineCodes(440, 0.7, 24, 401);
    const bytes = buildWav({ channels: 1, sampleRate: FS, containerBytes: 3, data: intBytes(s, 3) });
    // 401·3 = 1203 bytes: odd, so the builder appended a pad byte; add a trailing chunk after it.
    const tail = Uint8Array.from([...'id3 '].map((c) => c.charCodeAt(0)).concat([4, 0, 0, 0, 1, 2, 3, 4]));
    const withTail = new Uint8Array(bytes.length + tail.length);
    withTail.set(bytes);
    withTail.set(tail, bytes.length);
    const clip = await decodeAudioBytes(withTail);
    expect(clip.channels[0]).toHaveLength(401);
    expect(maxErr(clip.channels[0], s, 2 ** 23)).toBe(0);
  });

  it('32-bit integer: within float32 rounding of code/2^31', async () => {
    const s = sineCodes(440, 0.5, 32);
    const clip = await decodeAudioBytes(buildWav({ channels: 1, sampleRate: FS, containerBytes: 4, data: intBytes(s, 4) }));
    // float32 keeps 24 significant bits: relative error ≤ 2^-24, so absolute ≤ 0.5·2^-24 here.
    expect(maxErr(clip.channels[0], s, 2 ** 31)).toBeLessThanOrEqual(0.5 * 2 ** -24);
  });

  it('32-bit float copied; 64-bit float rounded to float32; values over ±1 kept', async () => {
    const v = Array.from({ length: N }, (_, i) => 1.25 * Math.sin((2 * Math.PI * 440 * i) / FS));
    const f32 = await decodeAudioBytes(buildWav({ tag: 3, channels: 1, sampleRate: FS, containerBytes: 4, data: floatBytes(v, 4) }));
    expect(maxErr(f32.channels[0], v.map((x) => Math.fround(x)), 1)).toBe(0);
    const f64 = await decodeAudioBytes(buildWav({ tag: 3, channels: 2, sampleRate: FS, containerBytes: 8, data: floatBytes(interleave([v, v.map((x) => -x)]), 8) }));
    expect(maxErr(f64.channels[1], v.map((x) => Math.fround(-x)), 1)).toBe(0);
    expect(Math.max(...f64.channels[0])).toBeGreaterThan(1.2);
  });

  it('WAVE_FORMAT_EXTENSIBLE: 24 valid bits left-justified in 32-bit words, and float SubFormat', async () => {
    const s = sineCodes(440, 0.5, 24);
    const data = intBytes(s.map((k) => k * 256), 4); // left-justified: the low byte is zero
    const clip = await decodeAudioBytes(buildWav({ tag: 0xfffe, subTag: 1, channels: 1, sampleRate: FS, containerBytes: 4, bits: 32, validBits: 24, data }));
    expect(maxErr(clip.channels[0], s, 2 ** 23)).toBe(0);
    const v = [0.5, -0.25, 0.125];
    const fl = await decodeAudioBytes(buildWav({ tag: 0xfffe, subTag: 3, channels: 1, sampleRate: FS, containerBytes: 4, data: floatBytes(v, 4) }));
    expect(Array.from(fl.channels[0])).toEqual(v);
  });
});

describe('RIFF layout', () => {
  const s16 = intBytes(sineCodes(440, 0.5, 16), 2);

  it('skips an odd-sized chunk and its pad byte (the package reader fails here)', async () => {
    const clip = await decodeAudioBytes(buildWav({ channels: 1, sampleRate: FS, containerBytes: 2, data: s16, extraChunks: [['LIST', Uint8Array.of(1, 2, 3)]] }));
    expect(clip.channels[0]).toHaveLength(N);
  });

  it('reads a streamed file (sizes 0xFFFFFFFF) to its end', async () => {
    const clip = await decodeAudioBytes(buildWav({ channels: 1, sampleRate: FS, containerBytes: 2, data: s16, dataSizeField: 0xffffffff, riffSizeField: 0xffffffff }));
    expect(clip.channels[0]).toHaveLength(N);
  });

  it('header reports duration without reading samples', () => {
    // The header promises one hour of 48 kHz stereo 16-bit audio; only the header is present.
    const h = parseWavHeader(buildWav({ channels: 2, sampleRate: 48000, containerBytes: 2, data: new Uint8Array(0), dataSizeField: 3600 * 48000 * 4 }));
    expect(h.durationS).toBeCloseTo(3600, 9);
    expect(h.truncated).toBe(true);
    expect(h.framesPresent).toBe(0);
  });
});

describe('WAV input errors', () => {
  const s16 = intBytes(sineCodes(440, 0.5, 16), 2);
  const mono16 = { channels: 1, sampleRate: FS, containerBytes: 2 } as const;

  it('truncated: the data chunk promises more bytes than the file holds', async () => {
    const e = await rejectsWithCode(decodeAudioBytes(buildWav({ ...mono16, data: s16, dataSizeField: s16.length + 100 })), 'truncated');
    expect(e.message).toMatch(/cut short/);
  });

  it('too-long is decided from the header, before the missing data is noticed', async () => {
    const bytes = buildWav({ ...mono16, data: s16, dataSizeField: 20 * 60 * FS * 2 }); // promises 20 min
    const e = await rejectsWithCode(decodeAudioBytes(bytes, { maxDurationS: 60 }), 'too-long');
    expect(e.message).toMatch(/20 min 0 s/);
    expect(e.message).toMatch(/1 min 0 s/);
  });

  it('unsupported-codec: µ-law, ADPCM, an MP3 SubFormat, big-endian RIFX', async () => {
    await rejectsWithCode(decodeAudioBytes(buildWav({ ...mono16, tag: 7, containerBytes: 1, data: new Uint8Array(8) })), 'unsupported-codec');
    const adpcm = await rejectsWithCode(decodeAudioBytes(buildWav({ ...mono16, tag: 0x11, containerBytes: 1, bits: 4, data: new Uint8Array(8) })), 'unsupported-codec');
    expect(adpcm.message).toMatch(/IMA ADPCM/);
    await rejectsWithCode(decodeAudioBytes(buildWav({ ...mono16, tag: 0xfffe, subTag: 0x55, data: s16 })), 'unsupported-codec');
    const rifx = buildWav({ ...mono16, data: s16 });
    rifx.set([0x52, 0x49, 0x46, 0x58]);
    await rejectsWithCode(decodeAudioBytes(rifx), 'unsupported-codec');
  });

  it('no-channels, corrupt fields, empty data, non-finite floats', async () => {
    await rejectsWithCode(decodeAudioBytes(buildWav({ ...mono16, channels: 0, data: s16 })), 'no-channels');
    await rejectsWithCode(decodeAudioBytes(buildWav({ ...mono16, sampleRate: 0, data: s16 })), 'corrupt');
    await rejectsWithCode(decodeAudioBytes(buildWav({ ...mono16, bits: 4, data: s16 })), 'corrupt');
    await rejectsWithCode(decodeAudioBytes(buildWav({ ...mono16, data: new Uint8Array(0) })), 'empty');
    const nan = await rejectsWithCode(decodeAudioBytes(buildWav({ tag: 3, channels: 1, sampleRate: FS, containerBytes: 4, data: floatBytes([0, 0.5, NaN], 4) })), 'corrupt');
    expect(nan.message).toMatch(/not a number/);
  });

  it('truncated inside the header; a RIFF that is not WAVE is not-audio', async () => {
    const whole = buildWav({ ...mono16, data: s16 });
    await rejectsWithCode(decodeAudioBytes(whole.subarray(0, 30)), 'truncated');
    await rejectsWithCode(decodeAudioBytes(whole.subarray(0, 40)), 'truncated');
    const other = whole.slice();
    other.set([0x57, 0x41, 0x56, 0x58], 8); // 'WAVX'
    await rejectsWithCode(decodeAudioBytes(other), 'not-audio');
  });
});
