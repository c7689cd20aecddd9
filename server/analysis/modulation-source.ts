/**
 * The modulation source of a block of decoded frames, written as the block arrives (the analysis
 * and planning read files block by block: analyze-stream.ts, services/planning-input.ts). The
 * source is modulationSource's (shared/audio/clip.ts) bit for bit: one channel's samples, or the
 * mix, per sample the channels summed in order with each partial sum rounded to float32, then
 * scaled by 1/channels and rounded again (what `out[i] += ch[i]` then `out[i] *= scale` does on a
 * Float32Array).
 */
import type { ModulationChannel } from '../../shared/audio/clip.ts';

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
