/**
 * The modulation source in shared memory, for the analysis worker (analyze-parallel.ts), made while
 * the file is decoded: decodeAudioFile calls `onFrames` as each block of frames is final, and the
 * source for that block is written while the block is still in the cache. The source is
 * modulationSource's (shared/audio/clip.ts) bit for bit: one channel's samples, or the mix, per
 * sample the channels summed in order with each partial sum rounded to float32, then scaled by
 * 1/channels and rounded again (what `out[i] += ch[i]` then `out[i] *= scale` does on a
 * Float32Array).
 */
import type { AudioClip, ModulationChannel } from '../../shared/audio/clip.ts';

/** Which channel of `chs` is the source by itself, or −1 for the mix (modulationSource's rule). */
const singleIndex = (chs: readonly Float32Array[], which: ModulationChannel): number =>
  which === 'left' || chs.length === 1 ? 0 : which === 'right' ? 1 : -1;

/**
 * Writes samples from…to−1 of the modulation source of `chs` into out[from…to−1].
 *
 * @example writeModulationSource(clip.channels, 'mix', mix, 0, mix.length) // mix = (L + R)/2 per sample
 */
export function writeModulationSource(chs: readonly Float32Array[], which: ModulationChannel, out: Float32Array, from: number, to: number): void {
  const one = singleIndex(chs, which);
  if (one >= 0) {
    out.set(chs[one].subarray(from, to), from);
    return;
  }
  const scale = 1 / chs.length;
  if (chs.length === 2) {
    const a = chs[0];
    const b = chs[1];
    for (let i = from; i < to; i++) out[i] = Math.fround(Math.fround(0 + a[i]) + b[i]) * scale;
    return;
  }
  for (let i = from; i < to; i++) {
    let acc = 0;
    for (let c = 0; c < chs.length; c++) acc = Math.fround(acc + chs[c][i]);
    out[i] = acc * scale;
  }
}

/** Collects the modulation source in shared memory while decoding: pass `onFrames` to decodeAudioFile. */
export interface SharedSourceWriter {
  /** The DecodeOptions.onFrames hook. */
  onFrames(channels: Float32Array[], from: number, to: number): void;
  /** The source in a SharedArrayBuffer once decoding has covered every frame; null before (or if it never ran). */
  source(): Float32Array | null;
}

/**
 * A SharedSourceWriter for the modulation source `which`. The shared array is allocated at the first
 * block (its length is the channels'); `source()` is null until the last frame is written.
 *
 * @example
 *   const w = sharedSourceWriter('mix');
 *   const clip = await decodeAudioFile(file, { onFrames: w.onFrames });
 *   await analyzeClipParallel(clip, { sharedSource: w.source() ?? undefined });
 */
export function sharedSourceWriter(which: ModulationChannel): SharedSourceWriter {
  let out: Float32Array | null = null;
  let written = 0;
  return {
    onFrames(channels, from, to) {
      if (channels.length === 0) return;
      const n = channels[0].length;
      if (out === null || out.length !== n) {
        out = new Float32Array(new SharedArrayBuffer(4 * n));
        written = 0;
      }
      writeModulationSource(channels, which, out, from, to);
      written += to - from;
    },
    source: () => (out !== null && written >= out.length ? out : null),
  };
}

/**
 * True when `candidate` can stand for the modulation source of `clip` in the worker: in shared
 * memory, of the clip's length, and equal to it, bit for bit, at 1024 samples spread over the clip
 * (a check against passing the wrong array, not a proof).
 *
 * @example matchesModulationSource(clip, 'mix', writer.source()!) // true
 */
export function matchesModulationSource(clip: AudioClip, which: ModulationChannel, candidate: Float32Array): boolean {
  const chs = clip.channels;
  const n = chs.length ? chs[0].length : 0;
  if (!(candidate.buffer instanceof SharedArrayBuffer) || candidate.length !== n || n === 0) return false;
  const step = Math.max(1, Math.floor(n / 1024));
  const one = singleIndex(chs, which);
  const scale = 1 / chs.length;
  for (let i = 0; i < n; i += step) {
    let want: number;
    if (one >= 0) want = chs[one][i];
    else {
      let acc = 0;
      for (let c = 0; c < chs.length; c++) acc = Math.fround(acc + chs[c][i]);
      want = Math.fround(acc * scale);
    }
    if (!Object.is(want, candidate[i])) return false;
  }
  return true;
}
