/**
 * Our own RIFF/WAVE reader.
 *
 * Why not the `web-audio-api` package's `decodeAudioData` for WAV (it wraps @audio/decode-wav 1.5.1)?
 * Checked in its source (node_modules/@audio/decode-wav/decode-wav.js: scanWavHdr, decodeRaw) and by
 * decoding hand-built files with it:
 *  1. It ignores the RIFF pad byte after an odd-sized chunk, so a file with, say, an odd-length LIST
 *     chunk before `data` fails with an unrelated message ("source array must be non-empty").
 *  2. It silently accepts a file cut short: the header's data size is not compared with the bytes present.
 *  3. It scales integers asymmetrically (negatives by 2^-(b-1), positives by 1/(2^(b-1)-1)), a kink at
 *     zero: 16384 reads as 0.500015 but -16384 as -0.5. We use one linear scale, 2^-(b-1), so a
 *     sample k reads as exactly k/2^(b-1) and our writer (wav.ts) round-trips bit-exactly.
 * The package does handle 8-bit unsigned, 64-bit float and WAVE_FORMAT_EXTENSIBLE; it also decodes
 * G.711 and ADPCM, which we reject as `unsupported-codec` (not verified here; convert such files).
 *
 * Format source: Microsoft/IBM, "Multimedia Programming Interface and Data Specifications 1.0" (1991),
 * RIFF chunks (4-byte id, 32-bit little-endian size, body, one pad byte when the size is odd) and the
 * WAVE `fmt ` / `data` chunks; Microsoft, "Multiple Channel Audio Data and WAVE Files" (2001) for
 * WAVE_FORMAT_EXTENSIBLE (tag 0xFFFE; the real format is the first two bytes of the SubFormat GUID
 * 0000xxxx-0000-0010-8000-00AA00389B71; integer samples are left-justified in their container).
 */
import { InputError } from '../../shared/errors.ts';

/** What the `fmt ` and `data` chunks say; byte offsets are into the whole file. */
export interface WavHeader {
  /** 'int' for WAVE_FORMAT_PCM (tag 1), 'float' for WAVE_FORMAT_IEEE_FLOAT (tag 3), either direct or via EXTENSIBLE. */
  encoding: 'int' | 'float';
  /** True when the fmt chunk is WAVE_FORMAT_EXTENSIBLE (0xFFFE). */
  extensible: boolean;
  channelCount: number;
  sampleRate: number;
  /** Bytes per sample frame (all channels): nBlockAlign. */
  blockAlign: number;
  /** Bytes per sample of one channel: 1, 2, 3, 4 (int) or 4, 8 (float). */
  containerBytes: number;
  /** Significant bits per sample: wBitsPerSample, or for EXTENSIBLE wValidBitsPerSample when non-zero (informative only). */
  bitsPerSample: number;
  /** Offset of the first sample byte. */
  dataOffset: number;
  /** Audio bytes the header promises; for a streamed file (size 0xFFFFFFFF) the bytes to the end of the file. */
  dataBytes: number;
  /** Whole sample frames the header promises: floor(dataBytes / blockAlign). */
  frameCount: number;
  /** frameCount / sampleRate, in seconds. */
  durationS: number;
  /** True when the file ends before the promised data does. */
  truncated: boolean;
  /** Whole frames actually present in the file (≤ frameCount). */
  framesPresent: number;
}

/** Names of the common non-PCM WAVE format tags, for the error message. */
const TAG_NAMES: Record<number, string> = {
  0x0002: 'Microsoft ADPCM',
  0x0006: 'A-law (G.711)',
  0x0007: 'µ-law (G.711)',
  0x0011: 'IMA ADPCM',
  0x0031: 'GSM 6.10',
  0x0050: 'MPEG audio',
  0x0055: 'MP3',
  0x00ff: 'AAC',
  0x2000: 'AC-3',
};

/** Tail of the KSDATAFORMAT_SUBTYPE_* GUIDs after the 16-bit format tag (bytes 2..15 as stored). */
const KS_GUID_TAIL = [0x00, 0x00, 0x00, 0x00, 0x10, 0x00, 0x80, 0x00, 0x00, 0xaa, 0x00, 0x38, 0x9b, 0x71];

const id4 = (b: Uint8Array, o: number): string => String.fromCharCode(b[o], b[o + 1], b[o + 2], b[o + 3]);

const CONVERT_HINT = 'convert it to 16- or 24-bit PCM WAV, FLAC, Ogg Vorbis or MP3 (e.g. ffmpeg -i in.wav -c:a pcm_s16le out.wav)';

/**
 * Parses the RIFF/WAVE header of a whole file and validates it.
 *
 * Walks the chunks from byte 12: each is id (4 bytes), size (uint32 LE), body, and a pad byte when
 * the size is odd. Stops at `data` once `fmt ` is known. A data size of 0xFFFFFFFF (or 0 with bytes
 * following, as written by some streaming encoders) means "to the end of the file".
 *
 * Throws InputError: `not-audio` (no RIFF/WAVE magic), `unsupported-codec` (RIFX/RF64, compressed or
 * unknown format tag, unusual sample size), `no-channels`, `corrupt` (inconsistent fmt fields),
 * `truncated` (the file ends inside the header). A data chunk shorter than promised is reported through
 * `truncated: true`, not thrown, so the caller can check the duration limit first.
 *
 * @example parseWavHeader(bytes).durationS // 3.0 for 132300 frames at 44100 Hz
 */
export function parseWavHeader(bytes: Uint8Array): WavHeader {
  return walkHeader(bytes, bytes.length) as WavHeader;
}

/**
 * {@link parseWavHeader} from the first bytes of a file of `fileBytes` bytes, for reading a file in
 * pieces: returns null when `prefix` ends before the header does (before the `fmt ` chunk's body or
 * the `data` chunk's 8-byte header); read a longer prefix and call again. Otherwise the same header,
 * the same checks and the same errors as parseWavHeader on the whole file (offsets and sizes refer
 * to the whole file; `truncated` and `framesPresent` compare the data chunk with `fileBytes`).
 *
 * @param prefix the file's first bytes (any length ≤ fileBytes)
 * @param fileBytes length of the whole file, bytes
 * @example parseWavHeaderPrefix(first64KiB, stat.size)?.dataOffset // 44 for a plain PCM file
 */
export function parseWavHeaderPrefix(prefix: Uint8Array, fileBytes: number): WavHeader | null {
  if (!(Number.isInteger(fileBytes) && fileBytes >= prefix.length)) {
    throw new RangeError(`parseWavHeaderPrefix: fileBytes must be an integer ≥ prefix.length (${prefix.length}), got ${fileBytes}`);
  }
  return walkHeader(prefix, fileBytes);
}

/** The chunk walk of parseWavHeader over a prefix of a file of n bytes; null when the prefix is too short. */
function walkHeader(bytes: Uint8Array, n: number): WavHeader | null {
  const have = bytes.length;
  if (n < 12) throw new InputError('truncated', `the WAV file is cut short: only ${n} bytes, not even a complete RIFF header; re-export or re-download it`);
  if (have < 12) return null;
  const magic = id4(bytes, 0);
  if (magic === 'RIFX' || magic === 'RF64' || magic === 'BW64') {
    throw new InputError('unsupported-codec', `this is a ${magic} WAV variant, which coilcue does not read; ${CONVERT_HINT}`);
  }
  if (magic !== 'RIFF' || id4(bytes, 8) !== 'WAVE') {
    throw new InputError('not-audio', 'the file does not start with a RIFF/WAVE header; give a WAV, FLAC, Ogg Vorbis or MP3 file');
  }
  const dv = new DataView(bytes.buffer, bytes.byteOffset, bytes.byteLength);
  let pos = 12;
  let fmt: Omit<WavHeader, 'dataOffset' | 'dataBytes' | 'frameCount' | 'durationS' | 'truncated' | 'framesPresent'> | null = null;
  while (pos + 8 <= n) {
    if (pos + 8 > have) return null;
    const id = id4(bytes, pos);
    const size = dv.getUint32(pos + 4, true);
    const body = pos + 8;
    if (id === 'fmt ') {
      if (size < 16) throw new InputError('corrupt', `the WAV fmt chunk is ${size} bytes, less than the 16 the format requires; the file is damaged`);
      if (body + size > n) break;
      if (body + size > have) return null;
      fmt = parseFmt(bytes, dv, body, size);
    } else if (id === 'data') {
      if (!fmt) throw new InputError('corrupt', 'the WAV data chunk comes before its fmt chunk, so its samples cannot be interpreted; re-export the file');
      const available = n - body;
      const streamed = size === 0xffffffff || (size === 0 && available > 0);
      const dataBytes = streamed ? available : size;
      const frameCount = Math.floor(dataBytes / fmt.blockAlign);
      const framesPresent = Math.min(frameCount, Math.floor(available / fmt.blockAlign));
      return {
        ...fmt,
        dataOffset: body,
        dataBytes,
        frameCount,
        durationS: frameCount / fmt.sampleRate,
        truncated: dataBytes > available,
        framesPresent,
      };
    }
    // Next chunk: body plus the pad byte of an odd-sized chunk (RIFF rule). Sizes are < 2^32, no overflow in doubles.
    pos = body + size + (size & 1);
  }
  if (!fmt) throw new InputError('truncated', 'the WAV file ends before its fmt chunk is complete; it is cut short or damaged');
  throw new InputError('truncated', 'the WAV file has no data chunk (it ends after the header); it is cut short or empty');
}

function parseFmt(bytes: Uint8Array, dv: DataView, o: number, size: number) {
  let tag = dv.getUint16(o, true);
  const channelCount = dv.getUint16(o + 2, true);
  const sampleRate = dv.getUint32(o + 4, true);
  const blockAlign = dv.getUint16(o + 12, true);
  const containerBits = dv.getUint16(o + 14, true);
  let bitsPerSample = containerBits;
  let extensible = false;
  if (tag === 0xfffe) {
    extensible = true;
    if (size < 40) {
      throw new InputError('corrupt', `the WAV fmt chunk says WAVE_FORMAT_EXTENSIBLE but is ${size} bytes, less than the 40 that format needs; the file is damaged`);
    }
    const valid = dv.getUint16(o + 18, true);
    tag = dv.getUint16(o + 24, true);
    for (let i = 0; i < KS_GUID_TAIL.length; i++) {
      if (bytes[o + 26 + i] !== KS_GUID_TAIL[i]) {
        throw new InputError('unsupported-codec', `the WAV file uses a non-standard SubFormat GUID (not PCM or IEEE float); ${CONVERT_HINT}`);
      }
    }
    if (valid > 0) bitsPerSample = valid;
  }
  if (tag !== 1 && tag !== 3) {
    const name = TAG_NAMES[tag] ?? `format tag 0x${tag.toString(16).padStart(4, '0')}`;
    throw new InputError('unsupported-codec', `the WAV file holds ${name} data; coilcue reads only PCM and IEEE-float WAV: ${CONVERT_HINT}`);
  }
  if (channelCount === 0) throw new InputError('no-channels', 'the WAV header says the file has 0 channels, so there is no audio to read; re-export it');
  if (channelCount > 32) {
    throw new InputError('unsupported-codec', `the WAV file has ${channelCount} channels; coilcue reads at most 32: mix it down first (e.g. ffmpeg -i in.wav -ac 2 out.wav)`);
  }
  if (sampleRate < 1000 || sampleRate > 768000) {
    throw new InputError('corrupt', `the WAV header gives a sample rate of ${sampleRate} Hz, outside 1000…768000 Hz; the file is damaged or mislabelled`);
  }
  if (blockAlign === 0 || blockAlign % channelCount !== 0) {
    throw new InputError('corrupt', `the WAV block alignment (${blockAlign} bytes) is not a whole number of bytes per channel for ${channelCount} channels; the file is damaged`);
  }
  const containerBytes = blockAlign / channelCount;
  const encoding: WavHeader['encoding'] = tag === 3 ? 'float' : 'int';
  const okContainer = encoding === 'float' ? containerBytes === 4 || containerBytes === 8 : containerBytes >= 1 && containerBytes <= 4;
  if (!okContainer) {
    throw new InputError('unsupported-codec', `the WAV file stores ${encoding === 'float' ? 'floating-point' : 'integer'} samples in ${containerBytes}-byte words, which coilcue does not read; ${CONVERT_HINT}`);
  }
  // wBitsPerSample must fill the container's top byte (plain PCM may say e.g. 20 in 3 bytes); the
  // EXTENSIBLE valid-bits field may be anything up to the container (samples are left-justified).
  if (containerBits > 8 * containerBytes || containerBits <= 8 * (containerBytes - 1) || bitsPerSample > 8 * containerBytes) {
    throw new InputError('corrupt', `the WAV header says ${containerBits} bits per sample in ${containerBytes}-byte words; the file is damaged`);
  }
  return { encoding, extensible, channelCount, sampleRate, blockAlign, containerBytes, bitsPerSample };
}

/**
 * Converts frames [from, to) of the data chunk into the planar channels `out`, at the same frame index.
 *
 * Scaling (linear, one factor per width, so sample code k maps to exactly k/2^(b-1)):
 * 8-bit unsigned: (u − 128)/128; 16-bit: s/32768; 24-bit: s/8388608; 32-bit int: s/2147483648
 * (b = 8·container bytes: left-justified narrower samples scale the same). Float samples are copied
 * (64-bit rounded to float32); values beyond ±1 are kept (float WAV may exceed full scale).
 * Returns the frame index of the first non-finite float sample (NaN, ±∞), or −1 when there is none.
 *
 * @param bytes the whole file (the data chunk at h.dataOffset)
 * @example readWavFrames(bytes, h, out, 0, h.framesPresent)
 */
export function readWavFrames(bytes: Uint8Array, h: WavHeader, out: Float32Array[], from: number, to: number): number {
  if (to <= from) return -1;
  const start = h.dataOffset + from * h.blockAlign;
  return convertWavFrames(bytes.subarray(start, start + (to - from) * h.blockAlign), h, out, from, to);
}

/**
 * {@link readWavFrames} from a piece of the data chunk read on its own: `block` starts with the
 * first byte of frame `from` and holds at least (to − from)·blockAlign bytes. Same scaling, same
 * result, same return value (frame index of the first non-finite float sample, or −1).
 *
 * @example convertWavFrames(blockRead, h, out, 1048576, 2097152) // the second 2^20 frames
 */
export function convertWavFrames(block: Uint8Array, h: WavHeader, out: Float32Array[], from: number, to: number): number {
  const nc = h.channelCount;
  const cb = h.containerBytes;
  const base = block.byteOffset;
  const frames = to - from;
  if (frames <= 0) return -1;
  if (block.length < frames * h.blockAlign) {
    throw new RangeError(`convertWavFrames: block holds ${block.length} bytes, ${frames} frames need ${frames * h.blockAlign}`);
  }
  // Little-endian host fast path: a typed-array view when the data is aligned, else DataView.
  const aligned = base % cb === 0 && LITTLE_ENDIAN;
  if (h.encoding === 'float') {
    if (aligned) {
      const src = cb === 4 ? new Float32Array(block.buffer, base, frames * nc) : new Float64Array(block.buffer, base, frames * nc);
      for (let c = 0; c < nc; c++) {
        const x = out[c];
        for (let i = 0, k = c; i < frames; i++, k += nc) x[from + i] = src[k];
      }
    } else {
      const dv = new DataView(block.buffer, base, frames * h.blockAlign);
      for (let c = 0; c < nc; c++) {
        const x = out[c];
        for (let i = 0, p = c * cb; i < frames; i++, p += h.blockAlign) x[from + i] = cb === 4 ? dv.getFloat32(p, true) : dv.getFloat64(p, true);
      }
    }
    for (let c = 0; c < nc; c++) {
      const x = out[c];
      for (let i = from; i < to; i++) if (!Number.isFinite(x[i])) return i;
    }
    return -1;
  }
  if (cb === 1) {
    for (let c = 0; c < nc; c++) {
      const x = out[c];
      for (let i = 0, p = c; i < frames; i++, p += nc) x[from + i] = (block[p] - 128) * (1 / 128);
    }
  } else if (cb === 2) {
    const s = 1 / 32768;
    if (aligned) {
      const src = new Int16Array(block.buffer, base, frames * nc);
      if (nc === 2) {
        // the common case, both channels in one pass over the block
        const x0 = out[0];
        const x1 = out[1];
        for (let i = 0, k = 0; i < frames; i++, k += 2) {
          x0[from + i] = src[k] * s;
          x1[from + i] = src[k + 1] * s;
        }
      } else {
        for (let c = 0; c < nc; c++) {
          const x = out[c];
          for (let i = 0, k = c; i < frames; i++, k += nc) x[from + i] = src[k] * s;
        }
      }
    } else {
      const dv = new DataView(block.buffer, base, frames * h.blockAlign);
      for (let c = 0; c < nc; c++) {
        const x = out[c];
        for (let i = 0, p = c * 2; i < frames; i++, p += h.blockAlign) x[from + i] = dv.getInt16(p, true) * s;
      }
    }
  } else if (cb === 3) {
    const s = 1 / 8388608;
    for (let c = 0; c < nc; c++) {
      const x = out[c];
      for (let i = 0, p = c * 3; i < frames; i++, p += h.blockAlign) {
        x[from + i] = (((block[p] | (block[p + 1] << 8) | (block[p + 2] << 16)) << 8) >> 8) * s;
      }
    }
  } else {
    const s = 1 / 2147483648;
    if (aligned) {
      const src = new Int32Array(block.buffer, base, frames * nc);
      for (let c = 0; c < nc; c++) {
        const x = out[c];
        for (let i = 0, k = c; i < frames; i++, k += nc) x[from + i] = src[k] * s;
      }
    } else {
      const dv = new DataView(block.buffer, base, frames * h.blockAlign);
      for (let c = 0; c < nc; c++) {
        const x = out[c];
        for (let i = 0, p = c * 4; i < frames; i++, p += h.blockAlign) x[from + i] = dv.getInt32(p, true) * s;
      }
    }
  }
  return -1;
}

const LITTLE_ENDIAN = new Uint8Array(new Uint16Array([1]).buffer)[0] === 1;
