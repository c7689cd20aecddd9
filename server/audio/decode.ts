/**
 * Audio file → AudioClip. WAV is read by our own parser (wav-parse.ts says why); FLAC, Ogg Vorbis and
 * MP3 go through the `web-audio-api` package's decodeAudioData in a worker thread that is killed on
 * timeout (worker-decode.ts). Limits are checked from the header before decoding where the format
 * allows (WAV data size, FLAC STREAMINFO, Ogg last granule, MP3 frame walk), and again after.
 * The file's own sample rate is kept; nothing is resampled.
 */
import { type FileHandle, open, stat } from 'node:fs/promises';
import { setImmediate as yieldToEventLoop } from 'node:timers/promises';
import type { AudioClip } from '../../shared/audio/clip.ts';
import { InputError } from '../../shared/errors.ts';
import { probeFlac } from './probe-flac.ts';
import { probeMp3 } from './probe-mp3.ts';
import { probeOgg } from './probe-ogg.ts';
import { skipId3v2, sniffFormat, type SupportedFormat } from './sniff.ts';
import { type WavHeader, convertWavFrames, parseWavHeader, parseWavHeaderPrefix, readWavFrames } from './wav-parse.ts';
import { CodecError, decodeInWorker } from './worker-decode.ts';

/** A decoded file: planar float channels at the file's own rate, plus where they came from. */
export interface DecodedClip extends AudioClip {
  /** Container read: 'wav', 'flac', 'ogg' (Ogg Vorbis) or 'mp3'. */
  format: SupportedFormat | string;
  /** Size of the encoded file in bytes. */
  sourceBytes: number;
  /** Decoded length in seconds: frames / sampleRate. */
  durationS: number;
}

/** Limits and progress for one decode. */
export interface DecodeOptions {
  /** Longest clip accepted, seconds. Default 1200 (20 min). */
  maxDurationS?: number;
  /** Largest file accepted, bytes. Default 200e6. */
  maxBytes?: number;
  /** Wall-clock budget for reading and decoding, seconds. Default 120. */
  timeoutS?: number;
  /**
   * Largest decoded size accepted, bytes of float32 samples (frames × channels × 4), checked from the
   * header. Default 1.5e9: 20 min of 8 channels at 48 kHz fits (0.74 GB); the duration limit alone does
   * not bound memory for many channels at high rates.
   */
  maxDecodedBytes?: number;
  /** Called with a fraction 0…1 as work proceeds (non-decreasing; 1 once, at the end). */
  onProgress?(fraction: number): void;
  /**
   * Called as decoded frames become final: frames from…to−1 of every channel, in order, each frame
   * once (a WAV block by block, other formats all at once at the end). For work that is cheapest
   * while a block is fresh in the cache, such as writing the modulation mix for the analysis worker
   * (server/analysis/modulation-source.ts). An error it throws ends the decoding.
   */
  onFrames?(channels: Float32Array[], from: number, to: number): void;
  /**
   * Called once, before the first `onFrames`, with the clip's length in frames, its channel count
   * and sample rate (for a caller that sizes its own arrays).
   */
  onStart?(frames: number, channelCount: number, sampleRate: number): void;
  /**
   * Decode a WAV file (decodeAudioFile) without keeping its samples: each block is converted into
   * arrays of one block's length, reused from block to block, and handed to `onFrames` as frames
   * 0…to−from−1 of those arrays (the blocks arrive in order; the caller counts where it is); the
   * clip returned has channels of length 0. For callers that reduce the samples as they arrive
   * (planning keeps only the modulation source and its reductions): the decoded clip is never in
   * memory. Other formats are decoded whole as usual. Default false.
   */
  discardSamples?: boolean;
}

/** Default longest clip, s (20 min). */
export const DEFAULT_MAX_DURATION_S = 1200;
/** Default largest file, bytes (200 MB). */
export const DEFAULT_MAX_BYTES = 200e6;
/** Default time budget for reading and decoding, s. */
export const DEFAULT_TIMEOUT_S = 120;
/** Default largest decoded size, bytes of float32 samples (1.5 GB). */
export const DEFAULT_MAX_DECODED_BYTES = 1.5e9;

/** Frames converted between event-loop turns and progress reports when reading WAV. */
const WAV_CHUNK_FRAMES = 1 << 20;
/** Most bytes of one WAV block read from a file (2^18 frames of 16-bit stereo). */
const WAV_BLOCK_BYTES = 1 << 20;
/** Bytes per read() when loading a file. */
const READ_CHUNK_BYTES = 8 << 20;
/** First bytes read from a file: enough to tell WAV from the rest and, usually, for its whole header. */
const HEAD_BYTES = 64 << 10;

interface Resolved {
  maxDurationS: number;
  maxBytes: number;
  maxDecodedBytes: number;
  timeoutS: number;
  deadlineMs: number;
  onFrames(channels: Float32Array[], from: number, to: number): void;
  onStart(frames: number, channelCount: number, sampleRate: number): void;
  discardSamples: boolean;
  progress(f: number): void;
  /** `count` channels of `frames` samples. */
  allocate(count: number, frames: number): Float32Array[];
}

function resolveOptions(opts: DecodeOptions | undefined): Resolved {
  const o = opts ?? {};
  const pos = (v: number | undefined, name: string, dflt: number): number => {
    if (v === undefined) return dflt;
    if (typeof v !== 'number' || !(v > 0)) throw new RangeError(`DecodeOptions.${name} must be a positive number, got ${v}`);
    return v;
  };
  const timeoutS = pos(o.timeoutS, 'timeoutS', DEFAULT_TIMEOUT_S);
  let last = 0;
  return {
    maxDurationS: pos(o.maxDurationS, 'maxDurationS', DEFAULT_MAX_DURATION_S),
    maxBytes: pos(o.maxBytes, 'maxBytes', DEFAULT_MAX_BYTES),
    maxDecodedBytes: pos(o.maxDecodedBytes, 'maxDecodedBytes', DEFAULT_MAX_DECODED_BYTES),
    timeoutS,
    deadlineMs: Date.now() + timeoutS * 1000,
    onFrames: o.onFrames ? (c, from, to) => o.onFrames!(c, from, to) : () => undefined,
    onStart: o.onStart ? (n, c, fs) => o.onStart!(n, c, fs) : () => undefined,
    discardSamples: o.discardSamples === true,
    allocate: (count, frames) => Array.from({ length: count }, () => new Float32Array(frames)),
    progress(f) {
      const c = Math.min(1, Math.max(last, f));
      if (c === last && c !== 0) return;
      last = c;
      o.onProgress?.(c);
    },
  };
}

const mb = (n: number): string => `${(n / 1e6).toFixed(1)} MB`;

/** "25 min 3 s" / "42.5 s": a duration a person reads. */
function humanDuration(s: number): string {
  if (s < 60) return `${s.toFixed(1)} s`;
  const m = Math.floor(s / 60);
  return `${m} min ${Math.round(s - 60 * m)} s`;
}

function tooLong(durationS: number, maxS: number): InputError {
  return new InputError(
    'too-long',
    `the clip is ${humanDuration(durationS)} long; the limit is ${humanDuration(maxS)}. Cut a shorter excerpt first (e.g. ffmpeg -i in.mp3 -t ${Math.floor(maxS)} out.wav)`,
  );
}

/** Throws `too-large` when frames × channels float32 samples exceed the decoded-size limit. */
function checkDecodedSize(frames: number, channelCount: number, r: Resolved): void {
  const need = frames * channelCount * 4;
  if (need > r.maxDecodedBytes) {
    throw new InputError(
      'too-large',
      `decoded, this file would take ${mb(need)} of memory (${channelCount} channels), over the ${mb(r.maxDecodedBytes)} limit; mix it down to stereo or cut a shorter excerpt`,
    );
  }
}

function timedOut(timeoutS: number): InputError {
  return new InputError('decode-timeout', `decoding took longer than ${timeoutS} s and was stopped; try a shorter excerpt, or convert the file to WAV, which reads fastest`);
}

/**
 * Reads and decodes an audio file (WAV PCM/float, FLAC, Ogg Vorbis, MP3).
 *
 * The size is checked with stat() before reading (`too-large`), the duration from the header before
 * decoding (`too-long`). File-system failures become InputError `not-found` or `unreadable`; bad content
 * the codes listed at {@link decodeAudioBytes}. Units: seconds, bytes, hertz.
 *
 * Memory: a WAV file is never held whole: its header is read first, then the data chunk in blocks of
 * at most 1 MiB straight into the float channels, so the peak is the decoded clip plus two blocks.
 * Compressed files are read whole and handed to the decoding worker.
 *
 * @example const clip = await decodeAudioFile('song.flac', { maxDurationS: 600 }); clip.sampleRate // 44100
 */
export async function decodeAudioFile(path: string, opts?: DecodeOptions): Promise<DecodedClip> {
  const r = resolveOptions(opts);
  r.progress(0);
  let size: number;
  try {
    const st = await stat(path);
    if (st.isDirectory()) throw new InputError('unreadable', `${path} is a directory, not an audio file; give the path of a file`);
    if (!st.isFile()) throw new InputError('unreadable', `${path} is not a regular file; give the path of an audio file`);
    size = st.size;
  } catch (e) {
    throw fsError(e, path);
  }
  if (size === 0) throw new InputError('empty', `${path} is empty (0 bytes); give a file that holds audio`);
  if (size > r.maxBytes) {
    throw new InputError('too-large', `${path} is ${mb(size)}, over the ${mb(r.maxBytes)} limit; cut a shorter excerpt or use a compressed format (FLAC, Ogg Vorbis, MP3)`);
  }
  let fh: FileHandle;
  try {
    fh = await open(path, 'r');
  } catch (e) {
    throw fsError(e, path);
  }
  try {
    const head = await readAt(fh, new Uint8Array(Math.min(size, HEAD_BYTES)), 0, path);
    if (isRiffWave(head)) {
      // A RIFF file with WAVE at byte 8: sniffFormat gives 'wav' from these 12 bytes alone.
      const clip = await decodeWavFile(fh, head, size, r, path);
      r.progress(1);
      return clip;
    }
    const bytes = head.length === size ? head : await readWhole(fh, head, size, r, path);
    return await decodeCore(bytes, r, true, 0.25);
  } finally {
    await fh.close().catch(() => undefined);
  }
}

/** True when `b` starts like a file sniffFormat calls 'wav': a RIFF-family magic and WAVE at byte 8. */
function isRiffWave(b: Uint8Array): boolean {
  if (b.length < 12) return false;
  const id = (o: number) => String.fromCharCode(b[o], b[o + 1], b[o + 2], b[o + 3]);
  return ['RIFF', 'RIFX', 'RF64', 'BW64'].includes(id(0)) && id(8) === 'WAVE' && sniffFormat(b) === 'wav';
}

/** Reads into `buf` from file offset `pos` until it is full or the file ends; returns the bytes read. */
async function readAt(fh: FileHandle, buf: Uint8Array, pos: number, path: string): Promise<Uint8Array> {
  let got = 0;
  try {
    while (got < buf.length) {
      const { bytesRead } = await fh.read(buf, got, buf.length - got, pos + got);
      if (bytesRead === 0) break; // the file shrank while we read it
      got += bytesRead;
    }
  } catch (e) {
    throw fsError(e, path);
  }
  return got === buf.length ? buf : buf.subarray(0, got);
}

/** The whole file, `head` (its first bytes) included, read in 8 MiB pieces; progress 0…0.25. */
async function readWhole(fh: FileHandle, head: Uint8Array, size: number, r: Resolved, path: string): Promise<Uint8Array> {
  const bytes = new Uint8Array(size);
  bytes.set(head);
  let got = head.length;
  if (got < size && head.length === Math.min(size, HEAD_BYTES)) {
    // (a head shorter than asked for means the file shrank: keep what there is)
    while (got < size) {
      const part = await readAt(fh, bytes.subarray(got, Math.min(size, got + READ_CHUNK_BYTES)), got, path);
      got += part.length;
      r.progress(0.25 * (got / size));
      if (part.length === 0 || Date.now() > r.deadlineMs) break;
    }
    if (Date.now() > r.deadlineMs) throw timedOut(r.timeoutS);
  }
  return got === size ? bytes : bytes.subarray(0, got);
}

/**
 * A WAV file read in pieces: the header from a prefix (longer prefixes read until it is complete),
 * the limits checked from it, then the data chunk block by block (the next block read while this one
 * is converted) into the channels. Errors and messages are those of decodeWav on the whole file.
 */
async function decodeWavFile(fh: FileHandle, head: Uint8Array, size: number, r: Resolved, path: string): Promise<DecodedClip> {
  let fileBytes = head.length < Math.min(size, HEAD_BYTES) ? head.length : size; // a short read: the file shrank
  let prefix = head;
  let h: WavHeader | null = parseWavHeaderPrefix(prefix, fileBytes);
  while (h === null) {
    const want = Math.min(fileBytes, prefix.length * 8);
    prefix = await readAt(fh, new Uint8Array(want), 0, path);
    if (prefix.length < want) fileBytes = prefix.length;
    h = parseWavHeaderPrefix(prefix, fileBytes);
  }
  prefix = new Uint8Array(0); // the header's bytes are no longer needed
  checkWavHeader(h, fileBytes, r);
  r.progress(0.01);
  const n = h.framesPresent;
  const blockFrames = Math.max(1, Math.min(WAV_CHUNK_FRAMES, Math.floor(WAV_BLOCK_BYTES / h.blockAlign)));
  const keep = !r.discardSamples;
  const channels = keep ? r.allocate(h.channelCount, n) : Array.from({ length: h.channelCount }, () => new Float32Array(Math.min(n, blockFrames)));
  r.onStart(n, h.channelCount, h.sampleRate);
  const bufBytes = Math.min(n, blockFrames) * h.blockAlign;
  const bufs = [new Uint8Array(bufBytes), new Uint8Array(bufBytes)];
  const readBlock = (from: number, buf: Uint8Array) =>
    readAt(fh, buf.subarray(0, (Math.min(n, from + blockFrames) - from) * h.blockAlign), h.dataOffset + from * h.blockAlign, path);
  let pending = readBlock(0, bufs[0]);
  for (let from = 0, k = 0; from < n; from += blockFrames, k++) {
    const to = Math.min(n, from + blockFrames);
    const block = await pending;
    if (block.length < (to - from) * h.blockAlign) {
      throw new InputError('truncated', `the WAV file ended after ${humanDuration((from + Math.floor(block.length / h.blockAlign)) / h.sampleRate)} of audio while being read (it was cut short or changed meanwhile); re-export or re-download it`);
    }
    if (to < n) pending = readBlock(to, bufs[(k + 1) & 1]); // read ahead while converting this block
    try {
      const at = keep ? from : 0; // where the block lands in `channels`
      const bad = convertWavFrames(block, h, channels, at, at + to - from);
      if (bad >= 0) throw nonFinite(bad - at + from, h.sampleRate);
      r.onFrames(channels, at, at + to - from);
      r.progress(0.01 + 0.98 * (to / n));
      if (to < n && Date.now() > r.deadlineMs) throw timedOut(r.timeoutS);
    } catch (e) {
      if (to < n) await pending.catch(() => undefined); // let the read-ahead finish before the handle closes
      throw e;
    }
  }
  return { sampleRate: h.sampleRate, channels: keep ? channels : channels.map(() => new Float32Array(0)), format: 'wav', sourceBytes: fileBytes, durationS: n / h.sampleRate };
}

/** The header checks of a WAV, before any sample is read: duration, decoded size, truncation, emptiness. */
function checkWavHeader(h: WavHeader, fileBytes: number, r: Resolved): void {
  if (h.durationS > r.maxDurationS) throw tooLong(h.durationS, r.maxDurationS);
  checkDecodedSize(h.frameCount, h.channelCount, r);
  if (h.truncated) {
    throw new InputError(
      'truncated',
      `the WAV file is cut short: its header promises ${h.dataBytes} bytes of audio (${humanDuration(h.durationS)}) but only ${fileBytes - h.dataOffset} are present; re-export or re-download it`,
    );
  }
  if (h.framesPresent === 0) throw new InputError('empty', 'the WAV file holds no audio samples (its data chunk is empty); give a file that holds audio');
}

const nonFinite = (frame: number, sampleRate: number): InputError =>
  new InputError('corrupt', `the float WAV file holds a sample that is not a number (NaN or infinity) at ${(frame / sampleRate).toFixed(3)} s; the file is damaged`);

/**
 * Decodes an encoded audio file held in memory; `bytes` is not modified or kept.
 *
 * InputError codes: `empty` (0 bytes, or no samples), `not-audio` (unrecognised), `unsupported-codec`
 * (compressed WAV such as ADPCM or µ-law, RIFX/RF64, and containers we do not decode: MP4/AAC, Opus, AIFF…),
 * `truncated` (the header promises more than is present, or the codec fails mid-stream), `corrupt`
 * (impossible header values, non-finite float samples), `no-channels`, `too-long`, `too-large` (file
 * bytes, or decoded size over maxDecodedBytes), `decode-timeout`.
 *
 * @example const clip = await decodeAudioBytes(new Uint8Array(await blob.arrayBuffer()))
 */
export async function decodeAudioBytes(bytes: Uint8Array, opts?: DecodeOptions): Promise<DecodedClip> {
  const r = resolveOptions(opts);
  r.progress(0);
  return decodeCore(bytes, r, false, 0);
}

async function decodeCore(bytes: Uint8Array, r: Resolved, owned: boolean, p0: number): Promise<DecodedClip> {
  const n = bytes.length;
  if (n === 0) throw new InputError('empty', 'the file is empty (0 bytes); give a file that holds audio');
  if (n > r.maxBytes) throw new InputError('too-large', `the file is ${mb(n)}, over the ${mb(r.maxBytes)} limit; cut a shorter excerpt or use a compressed format`);
  const format = sniffFormat(bytes);
  const clip = format === 'wav' ? await decodeWav(bytes, r, p0) : await decodeCompressed(bytes, format, r, owned, p0);
  r.progress(1);
  return clip;
}

async function decodeWav(bytes: Uint8Array, r: Resolved, p0: number): Promise<DecodedClip> {
  const h = parseWavHeader(bytes);
  checkWavHeader(h, bytes.length, r);
  const channels = r.allocate(h.channelCount, h.framesPresent);
  r.onStart(h.framesPresent, h.channelCount, h.sampleRate);
  for (let from = 0; from < h.framesPresent; from += WAV_CHUNK_FRAMES) {
    const to = Math.min(h.framesPresent, from + WAV_CHUNK_FRAMES);
    const bad = readWavFrames(bytes, h, channels, from, to);
    if (bad >= 0) throw nonFinite(bad, h.sampleRate);
    r.onFrames(channels, from, to);
    r.progress(p0 + (1 - p0) * (to / h.framesPresent));
    if (to < h.framesPresent) {
      if (Date.now() > r.deadlineMs) throw timedOut(r.timeoutS);
      await yieldToEventLoop();
    }
  }
  return { sampleRate: h.sampleRate, channels, format: 'wav', sourceBytes: bytes.length, durationS: h.framesPresent / h.sampleRate };
}

const FORMAT_NAME: Record<Exclude<SupportedFormat, 'wav'>, string> = { flac: 'FLAC', ogg: 'Ogg Vorbis', mp3: 'MP3' };

async function decodeCompressed(
  bytes: Uint8Array,
  format: Exclude<SupportedFormat, 'wav'>,
  r: Resolved,
  owned: boolean,
  p0: number,
): Promise<DecodedClip> {
  const name = FORMAT_NAME[format];
  const sourceBytes = bytes.length; // `bytes` may be handed to the worker (detached) below
  // Header facts before decoding: rate, channels, declared length, structural truncation.
  let headerRate: number;
  let headerChannels: number;
  let declaredFrames: number | null = null;
  // Decoded frames may fall short of the header's count by this much before we call the file damaged.
  let shortfallFrames = 0;
  let flacBits = 0;
  if (format === 'flac') {
    const p = probeFlac(bytes, skipId3v2(bytes));
    flacBits = p.bitsPerSample;
    headerRate = p.sampleRate;
    headerChannels = p.channelCount;
    declaredFrames = p.frameCount; // STREAMINFO total samples: exact (RFC 9639 §8.2)
    if (p.durationS !== null && p.durationS > r.maxDurationS) throw tooLong(p.durationS, r.maxDurationS);
    if (p.frameCount !== null) checkDecodedSize(p.frameCount, p.channelCount, r);
    if (p.audioOffset >= bytes.length) throw new InputError('truncated', 'the FLAC file has a header but no audio frames; it is cut short');
  } else if (format === 'ogg') {
    const p = probeOgg(bytes);
    headerRate = p.sampleRate;
    headerChannels = p.channelCount;
    // Last granule = stream length (Vorbis I §A.2); a decoder drops pages that fail their CRC, so a
    // shortfall of more than one long block (8192 samples, Vorbis I §1.3.2) means lost data.
    declaredFrames = p.frameCount;
    shortfallFrames = 8192;
    if (p.durationS !== null && p.durationS > r.maxDurationS) throw tooLong(p.durationS, r.maxDurationS);
    if (p.frameCount !== null) checkDecodedSize(p.frameCount, p.channelCount, r);
    if (p.truncated) throw new InputError('truncated', 'the Ogg Vorbis file is cut short (its last page is incomplete or missing); re-export or re-download it');
  } else {
    const p = probeMp3(bytes, skipId3v2(bytes));
    if (!p) throw new InputError('not-audio', 'no MP3 frames were found in the file; give a WAV, FLAC, Ogg Vorbis or MP3 file');
    headerRate = p.sampleRate;
    headerChannels = p.channelCount;
    // The walk counts encoder delay and padding (≤ ~2 frames); allow that much before refusing.
    if (p.durationS - 2 * 1152 / p.sampleRate > r.maxDurationS) throw tooLong(p.durationS, r.maxDurationS);
    checkDecodedSize(p.frameCount, p.channelCount, r);
    if (p.truncated) throw new InputError('truncated', 'the MP3 file is cut short (its last frame is incomplete or frames are missing); re-export or re-download it');
  }
  r.progress(p0 + 0.05 * (1 - p0));
  const remainingS = (r.deadlineMs - Date.now()) / 1000;
  if (remainingS <= 0) throw timedOut(r.timeoutS);
  let decoded: Awaited<ReturnType<typeof decodeInWorker>>;
  try {
    decoded = await decodeInWorker(bytes, { timeoutS: remainingS, contextSampleRate: headerRate, transfer: owned });
  } catch (e) {
    if (e instanceof CodecError) {
      // audio-buffer's "source array must be non-empty" means the codec produced no samples at all.
      const what = /non-empty/.test(e.message) ? 'found no audio frames in this file' : `stopped on this file (${e.message})`;
      throw new InputError('truncated', `the ${name} decoder ${what}; it is damaged or cut short: re-export or re-download it`);
    }
    if (e instanceof InputError && e.code === 'decode-timeout') throw timedOut(r.timeoutS);
    throw e;
  }
  let { channels } = decoded;
  if (decoded.sampleRate !== headerRate) {
    throw new Error(`${name} decoder returned ${decoded.sampleRate} Hz for a file whose header says ${headerRate} Hz`);
  }
  const frames = channels.length ? channels[0].length : 0;
  if (channels.length === 0) throw new InputError('no-channels', `the ${name} decoder found no audio channels in the file; it is damaged`);
  if (frames === 0) throw new InputError('empty', `the ${name} file holds no audio samples; give a file that holds audio`);
  if (flacBits > 0 && flacBits <= 24) rescaleFlac(channels, flacBits);
  // @audio/decode folds an MP3 whose two channels are identical to mono; restore the file's own layout.
  if (channels.length === 1 && headerChannels === 2 && format === 'mp3') channels = [channels[0], channels[0].slice()];
  // MP3 is not checked this way: its decoders conceal bad frames by design and the walk's count
  // includes encoder delay and padding.
  if (declaredFrames !== null && frames < declaredFrames - shortfallFrames) {
    throw new InputError(
      'truncated',
      `the ${name} file is damaged or cut short: its header promises ${humanDuration(declaredFrames / headerRate)} but only ${humanDuration(frames / headerRate)} decoded; re-export or re-download it`,
    );
  }
  const durationS = frames / decoded.sampleRate;
  if (durationS > r.maxDurationS) throw tooLong(durationS, r.maxDurationS);
  checkDecodedSize(frames, channels.length, r);
  r.onStart(frames, channels.length, decoded.sampleRate);
  r.onFrames(channels, 0, frames);
  return { sampleRate: decoded.sampleRate, channels, format, sourceBytes, durationS };
}

/**
 * The FLAC codec in @audio/decode-flac 1.x divides integer sample k by 2^(b−1) − 1 (checked on 16- and
 * 24-bit files: every decoded value is k/32767 or k/8388607), so −2^(b−1) reads as −1.00003. Recover k
 * (exact for b ≤ 24: the float32 error is < 0.5 code) and rescale to k/2^(b−1), the convention of our
 * WAV reader and of ffmpeg, so a FLAC and a WAV of the same PCM decode to the same samples.
 */
function rescaleFlac(channels: Float32Array[], bits: number): void {
  const up = 2 ** (bits - 1) - 1;
  const down = 1 / 2 ** (bits - 1);
  for (const x of channels) for (let i = 0; i < x.length; i++) x[i] = Math.round(x[i] * up) * down;
}

/** Maps a file-system error to InputError(`not-found` | `unreadable`); passes InputErrors through. */
function fsError(e: unknown, path: string): unknown {
  if (e instanceof InputError) return e;
  const code = (e as { code?: string } | null)?.code;
  if (code === 'ENOENT' || code === 'ENOTDIR') return new InputError('not-found', `no file at ${path}; check the path`);
  if (code === 'EACCES' || code === 'EPERM') return new InputError('unreadable', `permission denied reading ${path}; check the file's permissions`);
  if (code === 'EISDIR') return new InputError('unreadable', `${path} is a directory, not an audio file; give the path of a file`);
  if (typeof code === 'string' && code.startsWith('E')) {
    return new InputError('unreadable', `could not read ${path} (${code}); check the file and the disk`);
  }
  return e;
}
