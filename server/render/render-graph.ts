/**
 * The render's Web Audio graph (source → [highshelf] → gain → destination) run offline by the
 * `web-audio-api` package's OfflineAudioContext over a whole mono signal: the reference the
 * block-by-block graph (block-render.ts GraphStream) is tested against
 * (test/server/render/block-render.test.ts). Kept apart from render-clip.ts so that the render
 * itself never loads the package.
 */
import { OfflineAudioContext } from 'web-audio-api';
import { dbToAmp } from '../../shared/units.ts';
import type { PreEmphasis } from './block-render.ts';

/**
 * Runs the Web Audio graph (source → [highshelf] → gain → destination) offline over a mono signal.
 * The graph alone, without the limiter; for tests (it holds the whole signal).
 *
 * @example await renderGraph(x, 48000, 0, null) // x unchanged (gain 1, no filter)
 */
export async function renderGraph(mono: Float32Array, sampleRate: number, gainDb: number, preEmphasis: PreEmphasis | null): Promise<Float32Array> {
  const n = mono.length;
  if (n === 0) return new Float32Array(0);
  const ctx = new OfflineAudioContext(1, n, sampleRate);
  const buffer = ctx.createBuffer(1, n, sampleRate);
  // set() rather than copyToChannel, which refuses samples in shared memory (a caller's source may
  // lie in a SharedArrayBuffer)
  buffer.getChannelData(0).set(mono);
  const source = ctx.createBufferSource();
  source.buffer = buffer;
  const gain = ctx.createGain();
  gain.gain.value = dbToAmp(gainDb);
  if (preEmphasis) {
    const shelf = ctx.createBiquadFilter();
    shelf.type = 'highshelf';
    shelf.frequency.value = preEmphasis.cornerHz;
    shelf.gain.value = preEmphasis.shelfGainDb;
    source.connect(shelf);
    shelf.connect(gain);
  } else {
    source.connect(gain);
  }
  gain.connect(ctx.destination);
  source.start(0);
  const rendered = await ctx.startRendering();
  return rendered.getChannelData(0);
}
