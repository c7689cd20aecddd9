// FLAC, Ogg Vorbis and MP3 through decodeAudioFile, against ffmpeg's decoders (reference.json, written by
// test/fixtures/audio/make-reference.py) and against the synthesised source signal of each fixture
// (make-fixtures.sh: L = 0.5·sin(2π·440 t), R = 0.25·sin(2π·660 t); mono = 0.5·sin(2π·1000 t)).
import { readFileSync } from 'node:fs';
import { fileURLToPath } from 'node:url';
import { describe, expect, it } from 'vitest';
import { decodeAudioBytes, decodeAudioFile } from '../../../server/audio/decode.ts';
import { rejectsWithCode } from './wav-builder.ts';

const DIR = fileURLToPath(new URL('../../fixtures/audio/', import.meta.url));
interface Ref { sampleRate: number; channels: number; frames: number; rms: number[]; positions: number[]; samples: number[][] }
const REF: Record<string, Ref> = JSON.parse(readFileSync(DIR + 'reference.json', 'utf8'));
const bytesOf = (f: string) => new Uint8Array(readFileSync(DIR + f));
/** Each fixture is decoded once (a worker start costs ~0.2–0.3 s) and shared by the tests that read it. */
const decoded = new Map<string, ReturnType<typeof decodeAudioFile>>();
const decodeOnce = (f: string) => decoded.get(f) ?? (decoded.set(f, decodeAudioFile(DIR + f)), decoded.get(f)!);

const rms = (x: Float32Array, from = 0, to = x.length) => {
  let s = 0;
  for (let i = from; i < to; i++) s += x[i] * x[i];
  return Math.sqrt(s / (to - from));
};
const db = (ratio: number) => 20 * Math.log10(ratio);
/** Frequency from sign changes over [from, to): f = crossings / (2T); resolution ±1/(2T). */
function zeroCrossingHz(x: Float32Array, fs: number, from: number, to: number): number {
  let c = 0;
  for (let i = from + 1; i < to; i++) if ((x[i - 1] < 0) !== (x[i] < 0)) c++;
  return c / (2 * ((to - from) / fs));
}

// Source tones per fixture: [Hz, peak amplitude] per channel.
const CASES: [file: string, format: string, tones: [number, number][], sampleTol: number, rmsTolDb: number][] = [
  // FLAC is lossless: ffmpeg and we must agree exactly (both give k/32768); RMS off the source only by 16-bit rounding.
  ['tone-44k1-stereo.flac', 'flac', [[440, 0.5], [660, 0.25]], 0, 0.001],
  // Lossy codecs: two float decoders of one stream differ by arithmetic order only, < 1e-5 (−100 dBFS; measured
  // ≤ 6e-7). Level off the source: Vorbis q2 measured +0.05 dB, LAME 96 kbit/s −0.45 dB on a pure tone
  // (ffmpeg's decoder reads the same), so ±0.2 dB and ±0.6 dB.
  ['tone-48k-stereo.ogg', 'ogg', [[440, 0.5], [660, 0.25]], 1e-5, 0.2],
  ['tone-44k1-stereo.mp3', 'mp3', [[440, 0.5], [660, 0.25]], 1e-5, 0.6],
  ['tone-32k-mono.mp3', 'mp3', [[1000, 0.5]], 1e-5, 0.6],
  ['tone-22k05-mono.mp3', 'mp3', [[1000, 0.5]], 1e-5, 0.6],
  ['tone-44k1-dualmono.mp3', 'mp3', [[1000, 0.5], [1000, 0.5]], 1e-5, 0.6],
];

describe.each(CASES)('%s', (file, format, tones, sampleTol, rmsTolDb) => {
  const ref = REF[file];
  it('matches ffmpeg: own sample rate (no resampling), channels, length, samples', async () => {
    const clip = await decodeOnce(file);
    expect(clip.format).toBe(format);
    expect(clip.sourceBytes).toBe(readFileSync(DIR + file).length);
    expect(clip.sampleRate).toBe(ref.sampleRate);
    expect(clip.channels).toHaveLength(ref.channels); // the dual-mono MP3 stays two channels
    expect(clip.channels[0].length).toBe(ref.frames);
    expect(clip.durationS).toBeCloseTo(ref.frames / ref.sampleRate, 12);
    for (let c = 0; c < ref.channels; c++) {
      ref.positions.forEach((p, k) => expect(Math.abs(clip.channels[c][p] - ref.samples[c][k])).toBeLessThanOrEqual(sampleTol));
    }
  });

  it('carries the source tone: frequency within zero-crossing resolution, level within the codec tolerance', async () => {
    const clip = await decodeOnce(file);
    const fs = clip.sampleRate;
    // Window of T = min(1 s, length − 0.5 s) from 0.25 s: away from codec start-up and the end.
    const windowS = Math.min(1, clip.durationS - 0.5);
    const from = Math.round(0.25 * fs), to = from + Math.round(windowS * fs);
    tones.forEach(([hz, peak], c) => {
      // Zero-crossing count resolves ±1/(2T): 0.5 Hz for T = 1 s.
      expect(Math.abs(zeroCrossingHz(clip.channels[c], fs, from, to) - hz)).toBeLessThanOrEqual(1 / (2 * windowS));
      // A sine's RMS is peak/√2 (crest factor √2).
      expect(Math.abs(db(rms(clip.channels[c], from, to) / (peak / Math.SQRT2)))).toBeLessThanOrEqual(rmsTolDb);
    });
  });

  it('a copy cut at 60 % or at its last byte is truncated', async () => {
    const b = bytesOf(file);
    await rejectsWithCode(decodeAudioBytes(b.subarray(0, Math.floor(0.6 * b.length))), 'truncated');
    await rejectsWithCode(decodeAudioBytes(b.subarray(0, b.length - 1)), 'truncated');
  });

  it('too-long comes from the header, before any decoding (a 1 ns time budget is never reached)', async () => {
    const e = await rejectsWithCode(decodeAudioBytes(bytesOf(file), { maxDurationS: 0.5, timeoutS: 1e-9 }), 'too-long');
    expect(e.message).toMatch(/limit is 0\.5 s/);
  });
});

describe('damaged compressed data', () => {
  // Overwrite 200 bytes in the middle with a pattern: FLAC frames fail their CRC, Ogg pages their checksum.
  const damage = (b: Uint8Array) => {
    const d = b.slice();
    const mid = Math.floor(d.length / 2);
    for (let i = mid; i < mid + 200; i++) d[i] = (i * 7) & 255;
    return d;
  };
  it('FLAC: fewer samples than STREAMINFO declares → truncated ("damaged or cut short")', async () => {
    const e = await rejectsWithCode(decodeAudioBytes(damage(bytesOf('tone-44k1-stereo.flac'))), 'truncated');
    expect(e.message).toMatch(/damaged or cut short/);
  });
  it('Ogg Vorbis: pages dropped by the decoder fall short of the last granule → truncated', async () => {
    await rejectsWithCode(decodeAudioBytes(damage(bytesOf('tone-48k-stereo.ogg'))), 'truncated');
  });
  it('any format cut inside its first header → truncated', async () => {
    for (const f of ['tone-44k1-stereo.flac', 'tone-48k-stereo.ogg']) await rejectsWithCode(decodeAudioBytes(bytesOf(f).subarray(0, 30)), 'truncated');
  });
});

describe('containers we do not decode', () => {
  const ascii = (s: string) => Uint8Array.from(s, (c) => c.charCodeAt(0));
  it('Ogg Opus and MP4 → unsupported-codec naming the format', async () => {
    const opus = new Uint8Array(64);
    opus.set(ascii('OggS'));
    opus[26] = 1; // one segment
    opus[27] = 19;
    opus.set(ascii('OpusHead'), 28);
    const e = await rejectsWithCode(decodeAudioBytes(opus), 'unsupported-codec');
    expect(e.message).toMatch(/Opus/);
    const mp4 = new Uint8Array(64);
    mp4.set(ascii('ftypM4A '), 4);
    expect((await rejectsWithCode(decodeAudioBytes(mp4), 'unsupported-codec')).message).toMatch(/MP4/);
  });
  it('text, MIDI and random bytes → not-audio', async () => {
    await rejectsWithCode(decodeAudioBytes(ascii('title,artist\nHarbour Lights,us\n')), 'not-audio');
    await rejectsWithCode(decodeAudioBytes(ascii('MThd\0\0\0\x06\0\x01\0\x02\0\x60')), 'not-audio');
    let x = 12345;
    const noise = Uint8Array.from({ length: 4096 }, () => ((x = (x * 1103515245 + 12345) >>> 0) >>> 24) & 0xfe); // never 0xFF: no MPEG sync
    await rejectsWithCode(decodeAudioBytes(noise), 'not-audio');
  });
});
