/**
 * WAV writing: encodeWav (AudioClip → bytes) and writeWavAtomic (temp file + rename).
 *
 * Layout: Microsoft/IBM "Multimedia Programming Interface and Data Specifications 1.0" (1991), RIFF
 * `WAVE` with `fmt ` and `data` chunks; WAVE_FORMAT_EXTENSIBLE per Microsoft "Multiple Channel Audio Data
 * and WAVE Files" (2001), which asks for it when there are more than two channels or more than 16 bits
 * per sample; a `fact` chunk (frame count) accompanies non-PCM (float) data as the 1991 spec requires.
 * Integer scaling is the reader's inverse (wav-parse.ts): code = round(x·2^(b−1)), clipped to
 * [−2^(b−1), 2^(b−1) − 1], so a value k/2^(b−1) round-trips exactly.
 */
import { randomBytes } from 'node:crypto';
import { open, rename, unlink } from 'node:fs/promises';
import { basename, dirname, join } from 'node:path';
import type { AudioClip } from '../../shared/audio/clip.ts';
import { createRng, type Rng } from '../../shared/demo/prng.ts';
import { InputError } from '../../shared/errors.ts';

/** Sample encodings we write: 16- or 24-bit integer PCM, 32-bit IEEE float. */
export type WavSampleFormat = 's16' | 's24' | 'f32';

/** How encodeWav stores samples. */
export interface EncodeWavOptions {
  format: WavSampleFormat;
  /** Add TPDF dither before rounding to integers. Default true for s16, false otherwise; ignored for f32. */
  dither?: boolean;
  /** Seed of the dither generator (reproducible output). Default 1. */
  seed?: number;
}

const LITTLE_ENDIAN = new Uint8Array(new Uint16Array([1]).buffer)[0] === 1;

const KS_GUID_TAIL = [0x00, 0x00, 0x00, 0x00, 0x10, 0x00, 0x80, 0x00, 0x00, 0xaa, 0x00, 0x38, 0x9b, 0x71];

/**
 * One TPDF dither value in LSB: the sum of two independent uniform variables on [−½, ½), so the result
 * lies in [−1, 1) with a triangular density, mean 0 and variance 2·(1/12) = 1/6 LSB². With it the first
 * and second moments of the total quantisation error (dither + rounding) are independent of the signal,
 * the error variance being 1/12 + 1/6 = 1/4 LSB² (Lipshitz, Wannamaker & Vanderkooy, "Quantization and
 * Dither: A Theoretical Survey", J. Audio Eng. Soc. 40(5), 1992, §4–5).
 * @example tpdfDither(createRng(1)) // e.g. −0.37
 */
export function tpdfDither(rng: Rng): number {
  return rng() - 0.5 + (rng() - 0.5);
}

/**
 * Encodes a clip as a WAV file.
 *
 * s16: code = round(x·32768 + d), d TPDF dither in LSB when enabled; s24: code = round(x·8388608 (+ d));
 * both clipped to the integer range. f32: the float samples as they are (values beyond ±1 kept).
 * Header: plain PCM (tag 1) for s16 with ≤ 2 channels, IEEE float (tag 3) + `fact` for f32 with ≤ 2
 * channels, else WAVE_FORMAT_EXTENSIBLE (channel mask: mono front-centre, stereo front-left/right, more
 * channels unassigned). Throws RangeError for an empty/ragged clip, a non-integer sample rate,
 * non-finite samples or data beyond the 4 GiB RIFF limit.
 *
 * @example encodeWav({ sampleRate: 44100, channels: [left, right] }, { format: 's16', seed: 7 })
 */
export function encodeWav(clip: AudioClip, opts: EncodeWavOptions): Uint8Array {
  const { format } = opts;
  if (format !== 's16' && format !== 's24' && format !== 'f32') throw new RangeError(`encodeWav: format must be s16, s24 or f32, got ${String(format)}`);
  const { sampleRate, channels } = clip;
  if (!Number.isInteger(sampleRate) || sampleRate < 1 || sampleRate > 0xffffffff) {
    throw new RangeError(`encodeWav: sampleRate must be a positive integer (WAV stores whole hertz), got ${sampleRate}`);
  }
  const nc = channels.length;
  if (nc < 1 || nc > 65535) throw new RangeError(`encodeWav: need 1…65535 channels, got ${nc}`);
  const frames = channels[0].length;
  channels.forEach((ch, c) => {
    if (ch.length !== frames) throw new RangeError(`encodeWav: channel ${c} has ${ch.length} samples, channel 0 has ${frames}`);
    for (let i = 0; i < frames; i++) {
      if (!Number.isFinite(ch[i])) throw new RangeError(`encodeWav: channel ${c} sample ${i} is ${ch[i]}, not a finite number`);
    }
  });
  const bytesPer = format === 's16' ? 2 : format === 's24' ? 3 : 4;
  const isFloat = format === 'f32';
  const extensible = nc > 2 || format === 's24';
  const fmtBytes = extensible ? 40 : isFloat ? 18 : 16;
  const hasFact = isFloat;
  const blockAlign = nc * bytesPer;
  const dataBytes = frames * blockAlign;
  const headerBytes = 12 + 8 + fmtBytes + (hasFact ? 12 : 0) + 8;
  const riffSize = headerBytes - 8 + dataBytes + (dataBytes & 1);
  if (riffSize > 0xffffffff) throw new RangeError(`encodeWav: ${dataBytes} bytes of audio exceed the 4 GiB RIFF limit; split the clip`);

  const out = new Uint8Array(headerBytes + dataBytes + (dataBytes & 1));
  const dv = new DataView(out.buffer);
  const ascii = (o: number, s: string) => {
    for (let i = 0; i < 4; i++) out[o + i] = s.charCodeAt(i);
  };
  ascii(0, 'RIFF');
  dv.setUint32(4, riffSize, true);
  ascii(8, 'WAVE');
  ascii(12, 'fmt ');
  dv.setUint32(16, fmtBytes, true);
  let o = 20;
  dv.setUint16(o, extensible ? 0xfffe : isFloat ? 3 : 1, true);
  dv.setUint16(o + 2, nc, true);
  dv.setUint32(o + 4, sampleRate, true);
  dv.setUint32(o + 8, sampleRate * blockAlign, true); // byte rate; wraps only for absurd rates, as other writers do
  dv.setUint16(o + 12, blockAlign, true);
  dv.setUint16(o + 14, 8 * bytesPer, true);
  if (fmtBytes >= 18) dv.setUint16(o + 16, fmtBytes - 18, true); // cbSize
  if (extensible) {
    dv.setUint16(o + 18, 8 * bytesPer, true); // valid bits
    dv.setUint32(o + 20, nc === 1 ? 0x4 : nc === 2 ? 0x3 : 0, true); // channel mask
    dv.setUint16(o + 24, isFloat ? 3 : 1, true); // SubFormat: KSDATAFORMAT_SUBTYPE_PCM / _IEEE_FLOAT
    out.set(KS_GUID_TAIL, o + 26);
  }
  o += fmtBytes;
  if (hasFact) {
    ascii(o, 'fact');
    dv.setUint32(o + 4, 4, true);
    dv.setUint32(o + 8, frames >>> 0, true);
    o += 12;
  }
  ascii(o, 'data');
  dv.setUint32(o + 4, dataBytes, true);
  o += 8;

  if (isFloat) {
    for (let i = 0, p = o; i < frames; i++) for (let c = 0; c < nc; c++, p += 4) dv.setFloat32(p, channels[c][i], true);
    return out;
  }
  const dither = opts.dither ?? format === 's16';
  const rng = createRng(opts.seed ?? 1);
  const full = format === 's16' ? 32768 : 8388608;
  const lo = -full;
  const hi = full - 1;
  // Channel by channel (dither drawn in that order), monomorphic loops: 16-bit through an Int16Array view
  // on little-endian hosts (the data offset is even), 24-bit byte by byte.
  const i16 = bytesPer === 2 && LITTLE_ENDIAN ? new Int16Array(out.buffer, o, frames * nc) : null;
  for (let c = 0; c < nc; c++) {
    const x = channels[c];
    for (let i = 0, k = c, p = o + c * bytesPer; i < frames; i++, k += nc, p += blockAlign) {
      const d = dither ? rng() + rng() - 1 : 0; // TPDF, as tpdfDither
      let q = Math.round(x[i] * full + d);
      q = q < lo ? lo : q > hi ? hi : q;
      if (i16 !== null) i16[k] = q;
      else if (bytesPer === 2) dv.setInt16(p, q, true);
      else {
        out[p] = q & 0xff;
        out[p + 1] = (q >> 8) & 0xff;
        out[p + 2] = (q >> 16) & 0xff;
      }
    }
  }
  return out;
}

/**
 * Writes `bytes` to `path` atomically: to a temporary file in the same directory (so the rename stays on
 * one file system), flushed to disk, then renamed over `path` (POSIX rename(2) replaces the target in one
 * step). On any failure the temporary file is removed and an existing file at `path` is left untouched.
 * File-system refusals a person can fix (missing directory, permissions, full disk, path is a directory)
 * become InputError `unwritable`; other errors are rethrown.
 * @example await writeWavAtomic('out/clip.wav', encodeWav(clip, { format: 's24' }))
 */
export async function writeWavAtomic(path: string, bytes: Uint8Array): Promise<void> {
  const tmp = join(dirname(path), `.${basename(path)}.${process.pid}.${randomBytes(6).toString('hex')}.tmp`);
  let created = false;
  try {
    const fh = await open(tmp, 'wx', 0o644);
    created = true;
    try {
      let off = 0;
      while (off < bytes.length) {
        const { bytesWritten } = await fh.write(bytes, off, bytes.length - off);
        off += bytesWritten;
      }
      await fh.sync();
    } finally {
      await fh.close();
    }
    await rename(tmp, path);
    created = false;
  } catch (e) {
    if (created) await unlink(tmp).catch(() => undefined);
    throw writeError(e, path);
  }
}

/**
 * A file-system error writing `path` as a person reads it: InputError `unwritable` for refusals they
 * can fix (missing folder, permissions, full disk, a folder of that name), else the error itself.
 */
export function writeError(e: unknown, path: string): unknown {
  const code = (e as { code?: string } | null)?.code;
  const why: Record<string, string> = {
    ENOENT: 'its folder does not exist',
    ENOTDIR: 'part of the path is not a folder',
    EACCES: 'permission denied',
    EPERM: 'permission denied',
    EROFS: 'the file system is read-only',
    ENOSPC: 'the disk is full',
    EDQUOT: 'the disk quota is exhausted',
    EISDIR: 'a folder of that name exists',
    ENOTEMPTY: 'a folder of that name exists',
    EEXIST: 'a folder of that name exists',
  };
  if (code && why[code]) return new InputError('unwritable', `cannot write ${path}: ${why[code]}; choose another output path`);
  return e;
}

/** The same atomic write for any file the command line produces (CSV traces, reports). */
export const writeFileAtomic = writeWavAtomic;
