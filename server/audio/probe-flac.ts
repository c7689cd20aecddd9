/**
 * FLAC stream header: sample rate, channels, bit depth and total samples from STREAMINFO, read
 * without decoding.
 *
 * Layout: RFC 9639 "Free Lossless Audio Codec (FLAC)" (2024), §8.1 metadata block header (1 bit
 * last-block flag, 7 bits type, 24 bits length, big-endian) and §8.2 STREAMINFO (34 bytes: 16-bit min/max
 * block size, 24-bit min/max frame size, 20-bit sample rate, 3-bit channels − 1, 5-bit bits per
 * sample − 1, 36-bit interchannel sample count where 0 means unknown, 128-bit MD5).
 */
import { InputError } from '../../shared/errors.ts';

/** What STREAMINFO declares. */
export interface FlacProbe {
  sampleRate: number;
  channelCount: number;
  bitsPerSample: number;
  /** Samples per channel, or null when the encoder did not know it (streamed). */
  frameCount: number | null;
  /** frameCount / sampleRate, seconds, or null. */
  durationS: number | null;
  /** Offset of the first audio frame (after the last metadata block). */
  audioOffset: number;
}

/**
 * Reads the metadata blocks starting at the `fLaC` marker at `start`.
 * Throws InputError `truncated` when the file ends inside the metadata, `corrupt` when STREAMINFO is
 * missing or invalid (sample rate 0), `no-channels` never (FLAC stores channels − 1, so ≥ 1).
 * @example probeFlac(bytes, 0).durationS // 3 for a 3 s file
 */
export function probeFlac(b: Uint8Array, start: number): FlacProbe {
  let o = start + 4;
  if (o + 4 + 34 > b.length) throw new InputError('truncated', 'the FLAC file is cut short inside its header; re-export or re-download it');
  const type0 = b[o] & 0x7f;
  const len0 = (b[o + 1] << 16) | (b[o + 2] << 8) | b[o + 3];
  if (type0 !== 0 || len0 < 34) throw new InputError('corrupt', 'the FLAC file does not begin with a STREAMINFO block; it is damaged');
  const s = o + 4;
  const sampleRate = (b[s + 10] << 12) | (b[s + 11] << 4) | (b[s + 12] >> 4);
  const channelCount = ((b[s + 12] >> 1) & 7) + 1;
  const bitsPerSample = (((b[s + 12] & 1) << 4) | (b[s + 13] >> 4)) + 1;
  const total = (b[s + 13] & 0x0f) * 2 ** 32 + ((b[s + 14] << 24) >>> 0) + (b[s + 15] << 16) + (b[s + 16] << 8) + b[s + 17];
  if (sampleRate === 0) throw new InputError('corrupt', 'the FLAC header gives a sample rate of 0 Hz; the file is damaged');
  // Walk the remaining metadata blocks (pictures can be large) to find where audio starts.
  for (;;) {
    if (o + 4 > b.length) throw new InputError('truncated', 'the FLAC file ends inside its metadata, before any audio; it is cut short');
    const last = (b[o] & 0x80) !== 0;
    const len = (b[o + 1] << 16) | (b[o + 2] << 8) | b[o + 3];
    o += 4 + len;
    if (o > b.length) throw new InputError('truncated', 'the FLAC file ends inside its metadata, before any audio; it is cut short');
    if (last) break;
  }
  return {
    sampleRate,
    channelCount,
    bitsPerSample,
    frameCount: total > 0 ? total : null,
    durationS: total > 0 ? total / sampleRate : null,
    audioOffset: o,
  };
}
