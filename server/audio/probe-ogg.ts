/**
 * Ogg Vorbis stream header and page walk: sample rate, channels, length and whether pages are missing
 * at the end, without decoding.
 *
 * Page layout: RFC 3533 "The Ogg Encapsulation Format" §6: `OggS`, version 0, header-type flags
 * (0x02 first page of a stream, 0x04 last page), 64-bit little-endian granule position, serial number,
 * sequence number, CRC, segment count, segment table; page length = 27 + segments + Σ segment sizes.
 * Vorbis I specification (Xiph.Org, 2020) §4.2.2: identification packet `\x01vorbis`, 32-bit version,
 * 8-bit channels, 32-bit sample rate; §A.2: a page's granule position is the PCM sample count at the end
 * of the last packet completed on the page, so the last page's granule is the stream length.
 */
import { InputError } from '../../shared/errors.ts';

/** What the pages declare. */
export interface OggProbe {
  sampleRate: number;
  channelCount: number;
  /** Samples per channel: Σ over chained streams of the last granule position; null when unknown. */
  frameCount: number | null;
  /** frameCount / sampleRate, seconds, or null. */
  durationS: number | null;
  /** True when a page runs past the end of the file, or the file ends without an end-of-stream page. */
  truncated: boolean;
}

const isOggS = (b: Uint8Array, o: number): boolean => b[o] === 0x4f && b[o + 1] === 0x67 && b[o + 2] === 0x67 && b[o + 3] === 0x53;

/** Granule position (int64 LE) as a double; −1 (all bits set) means "no packet ends on this page". */
function granule(b: Uint8Array, o: number): number {
  const dv = new DataView(b.buffer, b.byteOffset + o, 8);
  const lo = dv.getUint32(0, true);
  const hi = dv.getInt32(4, true);
  return hi * 2 ** 32 + lo;
}

/**
 * Reads the Vorbis identification header on the first page, then walks every page.
 * Throws InputError `truncated` when the first page is incomplete, `no-channels` when the header says 0
 * channels, `corrupt` for a 0 Hz sample rate. Skips bytes that are not a page up to the next `OggS`.
 * @example probeOgg(bytes).durationS // 3 for a 3 s file
 */
export function probeOgg(b: Uint8Array): OggProbe {
  const nseg0 = b[26];
  const p = 27 + nseg0;
  if (b.length < p + 16) throw new InputError('truncated', 'the Ogg file is cut short inside its first page; re-export or re-download it');
  const channelCount = b[p + 11];
  const sampleRate = new DataView(b.buffer, b.byteOffset + p + 12, 4).getUint32(0, true);
  if (channelCount === 0) throw new InputError('no-channels', 'the Ogg Vorbis header says the stream has 0 channels, so there is no audio; re-export it');
  if (sampleRate === 0) throw new InputError('corrupt', 'the Ogg Vorbis header gives a sample rate of 0 Hz; the file is damaged');

  let o = 0;
  let completed = 0; // samples of the chained streams that ended before the current one
  let lastGranule = 0;
  let endedWithEos = false;
  let known = true;
  let truncated = false;
  while (o < b.length) {
    if (o + 27 > b.length) {
      truncated = true;
      break;
    }
    if (!isOggS(b, o) || b[o + 4] !== 0) {
      // Not a page (damaged bytes): resynchronise on the next capture pattern, as decoders do (RFC 3533 §6).
      let next = o + 1;
      while (next + 5 <= b.length && !(isOggS(b, next) && b[next + 4] === 0)) next++;
      if (next + 5 > b.length) {
        known = false; // no further page: the length is unknown
        break;
      }
      o = next;
      continue;
    }
    const flags = b[o + 5];
    const nseg = b[o + 26];
    if (o + 27 + nseg > b.length) {
      truncated = true;
      break;
    }
    let body = 0;
    for (let i = 0; i < nseg; i++) body += b[o + 27 + i];
    const end = o + 27 + nseg + body;
    if (end > b.length) {
      truncated = true;
      break;
    }
    if (flags & 0x02 && o > 0 && endedWithEos) {
      completed += lastGranule; // a new chained stream begins after the previous one ended
      lastGranule = 0;
    }
    const g = granule(b, o + 6);
    if (g >= 0) lastGranule = g;
    endedWithEos = (flags & 0x04) !== 0;
    o = end;
  }
  if (!truncated && known && !endedWithEos) truncated = true; // whole pages missing at the end
  const frameCount = known ? completed + lastGranule : null;
  return { sampleRate, channelCount, frameCount, durationS: frameCount === null ? null : frameCount / sampleRate, truncated };
}
