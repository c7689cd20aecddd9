// Header probes: MPEG audio frame walker (probe-mp3.ts), FLAC STREAMINFO, Ogg page walk, format sniffing.
import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { parseMp3Header, probeMp3 } from '../../../server/audio/probe-mp3.ts';
import { probeFlac } from '../../../server/audio/probe-flac.ts';
import { probeOgg } from '../../../server/audio/probe-ogg.ts';
import { skipId3v2, sniffFormat } from '../../../server/audio/sniff.ts';

const FIX = new URL('../../fixtures/audio/', import.meta.url);
const bytesOf = (f: string) => new Uint8Array(readFileSync(new URL(f, FIX)));
const REF = JSON.parse(readFileSync(new URL('reference.json', FIX), 'utf8')) as Record<string, { frames: number; sampleRate: number; channels: number }>;

describe('parseMp3Header', () => {
  // Frame length formulas and tables: ISO/IEC 11172-3 §2.4.2.3, ISO/IEC 13818-3 [recalled]; the cases
  // below are those formulas evaluated by hand, e.g. ⌊144·128000/44100⌋ = 417.
  it.each([
    // [header bytes, rate Hz, channels, frame bytes, samples per frame]
    [[0xff, 0xfb, 0x90, 0x64], 44100, 2, 417, 1152], // MPEG-1 L3 128 kbit/s, joint stereo
    [[0xff, 0xfb, 0x92, 0x64], 44100, 2, 418, 1152], // same with the padding bit
    [[0xff, 0xfb, 0x94, 0xc4], 48000, 1, 384, 1152], // MPEG-1 L3 128 kbit/s 48 kHz, mono: 144·128000/48000
    [[0xff, 0xf3, 0x40, 0xc4], 22050, 1, 104, 576], // MPEG-2 L3 32 kbit/s 22.05 kHz: ⌊72·32000/22050⌋
    [[0xff, 0xe3, 0x10, 0xc4], 11025, 1, 52, 576], // MPEG-2.5 L3 8 kbit/s 11.025 kHz: ⌊72·8000/11025⌋
    [[0xff, 0xfd, 0x18, 0x04], 32000, 2, 144, 1152], // MPEG-1 L2 32 kbit/s 32 kHz, stereo: 144·32000/32000
    [[0xff, 0xff, 0x18, 0x04], 32000, 2, 48, 384], // MPEG-1 L1 32 kbit/s 32 kHz: 4·⌊12·32000/32000⌋
  ])('%j → %i Hz, %i ch, %i bytes, %i samples', (hdr, rate, ch, len, spf) => {
    const h = parseMp3Header(Uint8Array.from(hdr), 0);
    expect(h).not.toBeNull();
    expect(h!.sampleRate).toBe(rate);
    expect(h!.channelCount).toBe(ch);
    expect(h!.frameBytes).toBe(len);
    expect(h!.samplesPerFrame).toBe(spf);
  });

  it('rejects free-format, reserved and non-sync headers', () => {
    expect(parseMp3Header(Uint8Array.of(0xff, 0xfb, 0x00, 0x64), 0)).toBeNull(); // free format
    expect(parseMp3Header(Uint8Array.of(0xff, 0xfb, 0xf0, 0x64), 0)).toBeNull(); // bit-rate index 15
    expect(parseMp3Header(Uint8Array.of(0xff, 0xfb, 0x9c, 0x64), 0)).toBeNull(); // sample-rate index 3
    expect(parseMp3Header(Uint8Array.of(0xff, 0xeb, 0x90, 0x64), 0)).toBeNull(); // version 01 reserved
    expect(parseMp3Header(Uint8Array.of(0xff, 0xf1, 0x50, 0x80), 0)).toBeNull(); // layer 00: AAC ADTS
  });
});

describe('probeMp3 on the fixtures', () => {
  // Outside check of the tables and the walk: audio frames × samples per frame, minus the encoder delay
  // and padding that LAME stores in its tag (LAME tag at Info + 141: 12-bit delay, 12-bit padding,
  // per the LAME technical documentation [recalled]), equals the sample count ffmpeg decodes.
  it.each(['tone-44k1-stereo.mp3', 'tone-32k-mono.mp3', 'tone-22k05-mono.mp3', 'tone-44k1-dualmono.mp3'])('%s', (f) => {
    const b = bytesOf(f);
    const p = probeMp3(b, skipId3v2(b))!;
    const info = Buffer.from(b).indexOf('Info');
    const delay = (b[info + 141] << 4) | (b[info + 142] >> 4);
    const padding = ((b[info + 142] & 0x0f) << 8) | b[info + 143];
    expect(p.sampleRate).toBe(REF[f].sampleRate);
    expect(p.channelCount).toBe(REF[f].channels);
    expect(p.frameCount - delay - padding).toBe(REF[f].frames);
    expect(p.truncated).toBe(false);
  });

  it('a file cut mid-frame is truncated; one cut at a frame boundary is caught by the Info frame count', () => {
    const b = bytesOf('tone-44k1-stereo.mp3');
    expect(probeMp3(b.subarray(0, b.length - 100), 0)!.truncated).toBe(true);
    // Find where the last frame starts by walking the headers, and cut exactly there.
    let o = Buffer.from(b).indexOf('Info') - 36; // Info sits 4 + 32 bytes into the first (stereo MPEG-1) frame
    let lastStart = o;
    while (o < b.length) {
      lastStart = o;
      o += parseMp3Header(b, o)!.frameBytes;
    }
    expect(o).toBe(b.length); // the walk ends exactly at the end of the file
    const cut = probeMp3(b.subarray(0, lastStart), 0)!;
    expect(cut.truncated).toBe(true); // no partial frame: only the Info frame count (116) reveals it
  });
});

describe('probeFlac / probeOgg', () => {
  it('FLAC STREAMINFO: rate, channels, bits, total samples (RFC 9639 §8.2)', () => {
    const p = probeFlac(bytesOf('tone-44k1-stereo.flac'), 0);
    expect(p).toMatchObject({ sampleRate: 44100, channelCount: 2, bitsPerSample: 16, frameCount: 88200 });
    expect(p.durationS).toBeCloseTo(2, 12);
  });
  it('Ogg Vorbis: identification header and last granule = length (Vorbis I §A.2)', () => {
    const p = probeOgg(bytesOf('tone-48k-stereo.ogg'));
    expect(p).toMatchObject({ sampleRate: 48000, channelCount: 2, frameCount: REF['tone-48k-stereo.ogg'].frames, truncated: false });
  });
  it('Ogg without its end-of-stream page is truncated even when cut at a page boundary', () => {
    const b = bytesOf('tone-48k-stereo.ogg');
    const lastPage = Buffer.from(b).lastIndexOf('OggS');
    expect(probeOgg(b.subarray(0, lastPage)).truncated).toBe(true);
  });
});

describe('sniffFormat', () => {
  it('recognises each fixture by its magic, after an ID3v2 tag for MP3', () => {
    expect(sniffFormat(bytesOf('tone-44k1-stereo.flac'))).toBe('flac');
    expect(sniffFormat(bytesOf('tone-48k-stereo.ogg'))).toBe('ogg');
    expect(sniffFormat(bytesOf('wav-s16-stereo.wav'))).toBe('wav');
    const mp3 = bytesOf('tone-44k1-stereo.mp3');
    expect(mp3.subarray(0, 3)).toEqual(Uint8Array.from([0x49, 0x44, 0x33])); // 'ID3': ffmpeg writes a tag first
    expect(skipId3v2(mp3)).toBeGreaterThan(10);
    expect(sniffFormat(mp3)).toBe('mp3');
  });
});
