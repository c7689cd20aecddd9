/**
 * A WAV file read again, block by block, for each pass of the render and the preview: the
 * modulation source is never whole in memory (shared/preview/sample-blocks.ts). The header is
 * parsed and the samples converted by the decoder's own functions (server/audio/wav-parse.ts
 * parseWavHeaderPrefix, convertWavFrames), so a block holds exactly what decodeAudioFile gives for
 * those frames. Reads are synchronous (a pass is a synchronous loop; the command line and the
 * server's job threads run it off any event loop that serves requests).
 *
 * The file must not change between the decoding that planned it and the passes that read it again:
 * its identity (device, inode, size, modification time) is recorded when it is opened and checked
 * at the start of every pass and against the path ({@link WavChannelReader.checkUnchanged});
 * a change is an InputError, never a render of two different files.
 */
import { type Stats, closeSync, fstatSync, openSync, readSync, statSync } from 'node:fs';
import { InputError } from '../../shared/errors.ts';
import type { ModulationChannel } from '../../shared/audio/clip.ts';
import { type ChannelBlockReader, ModulationBlocks, type SampleBlocks } from '../../shared/preview/sample-blocks.ts';
import { type WavHeader, convertWavFrames, parseWavHeaderPrefix } from '../audio/wav-parse.ts';

const LITTLE_ENDIAN = new Uint8Array(new Uint16Array([1]).buffer)[0] === 1;

/** First bytes read for the header; longer prefixes are read until it is complete. */
const HEAD_BYTES = 64 << 10;

const sameFile = (a: Stats, b: Stats) => a.dev === b.dev && a.ino === b.ino && a.size === b.size && a.mtimeMs === b.mtimeMs;

const changed = (path: string) =>
  new InputError('changed', `${path} changed while it was being rendered (its size, time or identity differs from when it was read); leave the file alone while coilcue works and try again`);

/**
 * The channels of a WAV file's data chunk, read on demand into arrays of `maxBlock` frames that are
 * reused from read to read. Open with {@link WavChannelReader.open}.
 */
export class WavChannelReader implements ChannelBlockReader {
  readonly frames: number;
  readonly channelCount: number;
  readonly sampleRate: number;
  private readonly bytes: Uint8Array;
  private readonly channels: Float32Array[];
  private fd: number | null;

  private constructor(
    private readonly path: string,
    fd: number,
    private readonly stats: Stats,
    private readonly h: WavHeader,
    readonly maxBlock: number,
  ) {
    this.fd = fd;
    this.frames = h.framesPresent;
    this.channelCount = h.channelCount;
    this.sampleRate = h.sampleRate;
    const block = Math.max(1, Math.min(maxBlock, h.framesPresent));
    this.maxBlock = block;
    this.bytes = new Uint8Array(block * h.blockAlign);
    this.channels = Array.from({ length: h.channelCount }, () => new Float32Array(block));
  }

  /**
   * Opens `path` when it is a RIFF/WAVE file coilcue reads (PCM or IEEE float, complete, not
   * empty); null for anything else (another format, a damaged header: the decoder reports those,
   * with its messages). Reads of at most `maxBlock` frames.
   *
   * @example const r = WavChannelReader.open('/clips/song.wav', 65536); r?.readChannels(0, 1024)
   */
  static open(path: string, maxBlock: number): WavChannelReader | null {
    if (!(Number.isInteger(maxBlock) && maxBlock >= 1)) throw new RangeError(`WavChannelReader.open: maxBlock must be an integer ≥ 1, got ${maxBlock}`);
    let fd: number;
    try {
      fd = openSync(path, 'r');
    } catch {
      return null;
    }
    try {
      const st = fstatSync(fd);
      if (!st.isFile()) throw new Error('not a file');
      let want = Math.min(st.size, HEAD_BYTES);
      for (;;) {
        const prefix = new Uint8Array(want);
        const got = readSync(fd, prefix, 0, want, 0);
        if (got < want) throw new Error('short read');
        const h = parseWavHeaderPrefix(prefix, st.size);
        if (h !== null) {
          if (h.truncated || h.framesPresent === 0) throw new Error('incomplete');
          return new WavChannelReader(path, fd, st, h, maxBlock);
        }
        if (want >= st.size) throw new Error('no header');
        want = Math.min(st.size, want * 8);
      }
    } catch {
      closeSync(fd);
      return null;
    }
  }

  /** InputError `changed` when the file under the path or behind the handle is no longer the one opened. */
  checkUnchanged(): void {
    if (this.fd === null) throw new RangeError('WavChannelReader: read after close');
    let now: Stats;
    let named: Stats;
    try {
      now = fstatSync(this.fd);
      named = statSync(this.path);
    } catch {
      throw changed(this.path);
    }
    if (!sameFile(now, this.stats) || !sameFile(named, this.stats)) throw changed(this.path);
  }

  /** True for 16-bit PCM in two channels: the layout {@link readBytes} serves the fused mix of openWavSource. */
  get isStereo16(): boolean {
    return this.h.encoding === 'int' && this.h.containerBytes === 2 && this.h.channelCount === 2;
  }

  /** The data chunk's bytes of frames from…from+count−1 (a view reused by the next read; at offset 0 of its buffer). */
  readBytes(from: number, count: number): Uint8Array {
    if (this.fd === null) throw new RangeError('WavChannelReader: read after close');
    if (!(Number.isInteger(from) && Number.isInteger(count) && from >= 0 && count >= 0 && count <= this.maxBlock && from + count <= this.frames)) {
      throw new RangeError(`WavChannelReader: frames ${from}…${from + count - 1} (at most ${this.maxBlock} at a time) outside 0…${this.frames - 1}`);
    }
    if (from === 0) this.checkUnchanged();
    const h = this.h;
    const want = count * h.blockAlign;
    const buf = this.bytes.subarray(0, want);
    let got = 0;
    while (got < want) {
      const n = readSync(this.fd, buf, got, want - got, h.dataOffset + from * h.blockAlign + got);
      if (n === 0) throw changed(this.path);
      got += n;
    }
    return buf;
  }

  /** Frames from…from+count−1 of every channel: the first `count` samples of each array returned (reused by the next read). */
  readChannels(from: number, count: number): Float32Array[] {
    const h = this.h;
    const buf = this.readBytes(from, count);
    const bad = convertWavFrames(buf, h, this.channels, 0, count);
    if (bad >= 0) throw new InputError('corrupt', `the float WAV file holds a sample that is not a number (NaN or infinity) at ${((from + bad) / h.sampleRate).toFixed(3)} s; the file is damaged`);
    return this.channels;
  }

  close(): void {
    if (this.fd === null) return;
    closeSync(this.fd);
    this.fd = null;
  }
}

/** The modulation source of a WAV file as SampleBlocks, and the reader behind it (for its checks). */
export interface WavSource extends SampleBlocks {
  reader: WavChannelReader;
}

/**
 * The modulation source `channel` of the WAV file at `path`, read again from the file for each
 * pass, bit for bit the source decodeAudioFile + modulationSource give (module comment); null when
 * the file is not a WAV file this reader reads (keep the decoded source instead).
 *
 * @example const src = openWavSource('/clips/song.wav', 'mix', 65536); src?.read(0, 65536)
 */
export function openWavSource(path: string, channel: ModulationChannel, maxBlock: number): WavSource | null {
  const reader = WavChannelReader.open(path, maxBlock);
  if (reader === null) return null;
  if (channel === 'mix' && reader.isStereo16 && LITTLE_ENDIAN) {
    // The common file, mixed straight from its codes: the decoder reads k/32768 (exact in float32),
    // modulationSource sums two of them (|k1 + k2| ≤ 2^16: exact) and halves (exact), so the mix
    // is exactly (k1 + k2)/65536, which this computes in one pass over the bytes (~3× quicker).
    const out = new Float32Array(reader.maxBlock);
    return {
      reader,
      length: reader.frames,
      maxBlock: reader.maxBlock,
      read(from, count) {
        const b = reader.readBytes(from, count);
        const codes = new Int16Array(b.buffer, b.byteOffset, 2 * count);
        for (let i = 0, k = 0; i < count; i++, k += 2) out[i] = (codes[k] + codes[k + 1]) * (1 / 65536);
        return out.subarray(0, count);
      },
      close: () => reader.close(),
    };
  }
  const blocks = new ModulationBlocks(reader, channel);
  return {
    reader,
    length: blocks.length,
    maxBlock: blocks.maxBlock,
    read: (from, count) => blocks.read(from, count),
    close: () => blocks.close(),
  };
}
