/**
 * A signal read block by block, as often as a pass needs it: what the render's and the preview's
 * passes read instead of the whole modulation source, so that their memory does not grow with the
 * clip's length. An in-memory array is one kind ({@link arraySamples}); the server reads a WAV file
 * again for each pass (server/render/wav-source.ts), through {@link ModulationBlocks}, which makes
 * the modulation source of each block of channels with the arithmetic of modulationSource
 * (shared/audio/clip.ts): one channel as it is, or the mix, per sample the channels summed in order
 * with each partial sum rounded to float32, then scaled by 1/channels and rounded again. The blocks
 * are therefore equal, bit for bit, to the whole-buffer source.
 */
import type { ModulationChannel } from '../audio/clip.ts';

/**
 * A signal of `length` samples read in blocks. `read(from, count)` returns samples
 * from…from+count−1 (count ≤ `maxBlock`): a view that stays valid until the next `read` and that
 * the caller must not write into. Reads in order are the fast path; any order is allowed.
 * `close` releases what the reader holds (a file handle); reading after it is an error.
 */
export interface SampleBlocks {
  readonly length: number;
  /** Most samples one read may ask for. */
  readonly maxBlock: number;
  read(from: number, count: number): Float32Array;
  close(): void;
}

/**
 * A whole array as SampleBlocks: each read is a view into it (no copy).
 * @example arraySamples(x).read(0, 4) // x.subarray(0, 4)
 */
export function arraySamples(x: Float32Array): SampleBlocks {
  return {
    length: x.length,
    maxBlock: Math.max(1, x.length),
    read(from, count) {
      if (!(from >= 0 && count >= 0 && from + count <= x.length)) throw new RangeError(`arraySamples.read: samples ${from}…${from + count - 1} outside 0…${x.length - 1}`);
      return x.subarray(from, from + count);
    },
    close() {},
  };
}

/** Planar channel blocks read from somewhere (a file): frames from…from+count−1 of every channel, views valid until the next read. */
export interface ChannelBlockReader {
  readonly frames: number;
  readonly channelCount: number;
  readonly maxBlock: number;
  readChannels(from: number, count: number): Float32Array[];
  close(): void;
}

/**
 * The modulation source `which` of `count` frames of `channels` (from index 0) into out[0…count−1]
 * (module comment for the arithmetic; 'right' of a mono clip is its only channel). Returns the
 * channel itself (a view) when the source is one channel, else `out`.
 *
 * @example modulationBlock([l, r], 'mix', out, l.length) // out[i] = fround(fround(l[i] + r[i]) / 2)
 */
export function modulationBlock(channels: readonly Float32Array[], which: ModulationChannel, out: Float32Array, count: number): Float32Array {
  const nc = channels.length;
  if (nc === 0) throw new RangeError('modulationBlock: no channels');
  if (which === 'left' || nc === 1) return channels[0].subarray(0, count);
  if (which === 'right') return channels[1].subarray(0, count);
  const scale = 1 / nc;
  if (nc === 2) {
    const a = channels[0];
    const b = channels[1];
    for (let i = 0; i < count; i++) out[i] = Math.fround(Math.fround(0 + a[i]) + b[i]) * scale;
    return out.subarray(0, count);
  }
  for (let i = 0; i < count; i++) {
    let acc = 0;
    for (let c = 0; c < nc; c++) acc = Math.fround(acc + channels[c][i]);
    out[i] = acc * scale;
  }
  return out.subarray(0, count);
}

/**
 * The modulation source `which` of a channel reader, as SampleBlocks (module comment): one buffer of
 * `maxBlock` samples, reused. Closing it closes the reader. As in modulationSource, 'right' of a
 * one-channel reader is its only channel (callers refuse that choice earlier, with a message).
 *
 * @example const src = new ModulationBlocks(reader, 'mix'); src.read(0, 65536)
 */
export class ModulationBlocks implements SampleBlocks {
  readonly length: number;
  readonly maxBlock: number;
  private readonly out: Float32Array;

  constructor(
    private readonly reader: ChannelBlockReader,
    private readonly which: ModulationChannel,
  ) {
    this.length = reader.frames;
    this.maxBlock = reader.maxBlock;
    this.out = new Float32Array(reader.channelCount > 1 && which === 'mix' ? reader.maxBlock : 0);
  }

  read(from: number, count: number): Float32Array {
    return modulationBlock(this.reader.readChannels(from, count), this.which, this.out, count);
  }

  close(): void {
    this.reader.close();
  }
}
