/**
 * Recognises an audio file's container from its first bytes (its "magic"), so we can pick a reader,
 * check limits from the header, and name formats we do not read in the error message.
 *
 * Magic numbers: RIFF/WAVE (Microsoft RIFF spec, 1991); `fLaC` (FLAC format, xiph.org / RFC 9639 §8);
 * `OggS` page capture pattern (RFC 3533 §6) with the first packet naming the codec (Vorbis I spec §4.2.2
 * `\x01vorbis`, RFC 7845 `OpusHead`, Ogg FLAC mapping `\x7fFLAC`); MPEG audio frame sync, 11 set bits
 * (ISO/IEC 11172-3 §2.4.2.3), optionally after an ID3v2 tag (id3.org ID3v2.4 §3.1, synchsafe size).
 */
import { InputError } from '../../shared/errors.ts';
import { findFirstMp3Frame } from './probe-mp3.ts';

/** The containers coilcue decodes. */
export type SupportedFormat = 'wav' | 'flac' | 'ogg' | 'mp3';

const ascii = (b: Uint8Array, o: number, s: string): boolean => {
  if (o + s.length > b.length) return false;
  for (let i = 0; i < s.length; i++) if (b[o + i] !== s.charCodeAt(i)) return false;
  return true;
};

/**
 * Length of the ID3v2 tag at `o` (10-byte header + synchsafe size + optional 10-byte footer), or 0.
 * @example id3v2Length(bytes, 0) // 4106 for a tag declaring 4096 bytes
 */
export function id3v2Length(b: Uint8Array, o: number): number {
  if (!ascii(b, o, 'ID3') || o + 10 > b.length) return 0;
  const size = ((b[o + 6] & 0x7f) << 21) | ((b[o + 7] & 0x7f) << 14) | ((b[o + 8] & 0x7f) << 7) | (b[o + 9] & 0x7f);
  return 10 + size + (b[o + 5] & 0x10 ? 10 : 0);
}

/** Offset just past any ID3v2 tags at the start of the file (some files carry more than one). */
export function skipId3v2(b: Uint8Array): number {
  let o = 0;
  for (let len = id3v2Length(b, o); len > 0; len = id3v2Length(b, o)) o += len;
  return o;
}

const TRY = 'give a WAV, FLAC, Ogg Vorbis or MP3 file';
const unsupported = (what: string): InputError =>
  new InputError('unsupported-codec', `this looks like ${what}, which coilcue does not decode; convert it to WAV, FLAC, Ogg Vorbis or MP3 (e.g. ffmpeg -i in.x out.flac)`);

/**
 * Returns the container of `b` or throws InputError: `not-audio` when nothing is recognised,
 * `unsupported-codec` for audio containers or Ogg codecs we do not decode (MP4/AAC, AIFF, Opus…).
 *
 * @example sniffFormat(new TextEncoder().encode('fLaC…')) // 'flac'
 */
export function sniffFormat(b: Uint8Array): SupportedFormat {
  if (ascii(b, 0, 'RIFF') || ascii(b, 0, 'RIFX') || ascii(b, 0, 'RF64') || ascii(b, 0, 'BW64')) {
    if (ascii(b, 8, 'WAVE')) return 'wav';
    if (ascii(b, 8, 'AVI ')) throw unsupported('an AVI video');
    throw new InputError('not-audio', `the file is a RIFF container but not WAVE audio; ${TRY}`);
  }
  const afterId3 = skipId3v2(b);
  if (ascii(b, afterId3, 'fLaC')) return 'flac';
  if (ascii(b, 0, 'OggS')) {
    const nseg = b[26] ?? 0;
    const p = 27 + nseg;
    if (ascii(b, p, '\x01vorbis')) return 'ogg';
    if (ascii(b, p, 'OpusHead')) throw unsupported('Ogg Opus audio');
    if (ascii(b, p, '\x7fFLAC')) throw unsupported('FLAC inside an Ogg container');
    if (ascii(b, p, 'Speex')) throw unsupported('Ogg Speex audio');
    if (ascii(b, p, '\x80theora')) throw unsupported('an Ogg Theora video');
    if (b.length < p + 8) throw new InputError('truncated', 'the Ogg file is cut short before its first packet; re-export or re-download it');
    throw unsupported('an Ogg file with an unknown codec');
  }
  if (findFirstMp3Frame(b, afterId3) >= 0) return 'mp3';
  if (ascii(b, 4, 'ftyp')) throw unsupported('an MP4/M4A (AAC or ALAC) file');
  if (ascii(b, 0, 'FORM') && (ascii(b, 8, 'AIFF') || ascii(b, 8, 'AIFC'))) throw unsupported('an AIFF file');
  if (ascii(b, 0, 'caf ')) throw unsupported('a Core Audio (CAF) file');
  if (b[0] === 0x1a && b[1] === 0x45 && b[2] === 0xdf && b[3] === 0xa3) throw unsupported('a Matroska/WebM file');
  if (b[0] === 0xff && (b[1] & 0xf6) === 0xf0) throw unsupported('raw AAC (ADTS) audio');
  if (ascii(b, 0, 'MThd')) throw new InputError('not-audio', `this is a MIDI file (notes, not recorded sound); render it to audio first, or ${TRY}`);
  if (ascii(b, 0, 'wvpk')) throw unsupported('a WavPack file');
  if (ascii(b, 0, 'MAC ')) throw unsupported("a Monkey's Audio file");
  if (afterId3 > 0 && afterId3 >= b.length) {
    throw new InputError('truncated', 'the file holds only an ID3 tag and no audio after it; it is cut short or not an audio file');
  }
  throw new InputError('not-audio', `the file is not in a recognised audio format; ${TRY}`);
}
