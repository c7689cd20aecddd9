/**
 * The block-by-block render (server/render/block-render.ts, render-clip.ts renderModulationWav)
 * against the whole-buffer render it replaces: the `web-audio-api` package's OfflineAudioContext
 * graph (renderGraph) over the whole signal, then lookAheadLimit over the whole output, then
 * encodeWav. The file must be the same within 1 LSB (16/24-bit) or 1e-6 (float), whatever the block
 * length, including blocks shorter than the limiter's look-ahead (220 samples at 44.1 kHz), and
 * whether the source is an array or the WAV file read again for each pass (wav-source.ts).
 */
import { describe, expect, it } from 'vitest';
import { mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { decodeAudioBytes, decodeAudioFile } from '../../../server/audio/decode.ts';
import { type WavSampleFormat, encodeWav } from '../../../server/audio/wav.ts';
import { ANNEX2_ABS_TAP_SUM, GraphStream, WavBlockEncoder } from '../../../server/render/block-render.ts';
import { PlanReducer, ZeroCrossingStream } from '../../../server/render/closed-loop.ts';
import { type PreEmphasis, quantisationMargin, renderModulationWav } from '../../../server/render/render-clip.ts';
import { renderGraph } from '../../../server/render/render-graph.ts';
import { openWavSource } from '../../../server/render/wav-source.ts';
import { modulationSource } from '../../../shared/audio/clip.ts';
import type { SampleBlocks } from '../../../shared/preview/sample-blocks.ts';
import { sourceStatsPass } from '../../../shared/dsp/envelope.ts';
import { FrameStatsStream, computeFrameStats } from '../../../shared/dsp/frame-stats.ts';
import { lookAheadLimit } from '../../../shared/dsp/limiter.ts';
import { TruePeakMeter, channelTruePeakLinear } from '../../../shared/dsp/true-peak.ts';
import { zeroCrossingEvents } from '../../../shared/plan/pulse-train.ts';
import { dbToAmp } from '../../../shared/units.ts';
import { uniformNoise } from '../../shared/dsp/uniform-noise.ts';

const FS = 44100;

/** A loud, busy test signal: two tones, noise, and bursts that drive the limiter hard. */
function programme(seconds: number, seed = 3): Float32Array {
  const n = Math.round(seconds * FS);
  const noise = uniformNoise(n, 0.3, seed);
  const x = new Float32Array(n);
  for (let i = 0; i < n; i++) {
    const t = i / FS;
    const burst = Math.floor(t * 3) % 4 === 0 ? 1.6 : 0.5;
    x[i] = burst * (0.5 * Math.sin(2 * Math.PI * 220 * t) + 0.3 * Math.sin(2 * Math.PI * 5512.5 * t + 0.7)) + noise[i];
  }
  return x;
}

/** The whole-buffer render: the package's graph, then the limiter over the whole output, then encodeWav. */
async function wholeBufferRender(x: Float32Array, gainDb: number, pe: PreEmphasis | null, format: WavSampleFormat): Promise<Float32Array> {
  const graph = await renderGraph(x, FS, gainDb, pe);
  const working = 1 - quantisationMargin(format) * ANNEX2_ABS_TAP_SUM;
  const r = lookAheadLimit(graph, FS, { ceiling: working, truePeak: true }, graph);
  const bytes = encodeWav({ sampleRate: FS, channels: [r.output] }, { format, seed: 1 });
  return (await decodeAudioBytes(bytes)).channels[0];
}

/** The block render into bytes, decoded back. */
async function blockRender(x: Float32Array | SampleBlocks, gainDb: number, pe: PreEmphasis | null, format: WavSampleFormat, blockSize: number) {
  let parts: Uint8Array[] = [];
  const fig = renderModulationWav(x, FS, 'mix', { gainDb, preEmphasis: pe, format, blockSize }, {
    onChunk: (b) => parts.push(b.slice()),
    onRestart: () => (parts = []),
  });
  const bytes = new Uint8Array(parts.reduce((s, p) => s + p.length, 0));
  let at = 0;
  for (const p of parts) {
    bytes.set(p, at);
    at += p.length;
  }
  return { fig, bytes, samples: (await decodeAudioBytes(bytes)).channels[0] };
}

const LSB: Record<WavSampleFormat, number> = { s16: 1 / 32768, s24: 1 / 8388608, f32: 1e-6 };

function maxDiff(a: Float32Array, b: Float32Array): number {
  expect(a.length).toBe(b.length);
  let m = 0;
  for (let i = 0; i < a.length; i++) m = Math.max(m, Math.abs(a[i] - b[i]));
  return m;
}

describe('the graph block by block', () => {
  it('agrees with the package’s OfflineAudioContext graph within 1 LSB of 24 bits on a long signal', async () => {
    // 60 s of programme through a +9 dB shelf at 2 kHz and −4.5 dB of gain.
    const x = programme(60);
    const pe = { cornerHz: 2000, shelfGainDb: 9 };
    const ref = await renderGraph(x, FS, -4.5, pe);
    const ours = new Float32Array(x.length);
    const g = new GraphStream(FS, -4.5, pe);
    for (let a = 0; a < x.length; a += 10007) g.process(x.subarray(a, a + 10007), ours.subarray(a, a + 10007));
    // Same coefficients and arithmetic as the package (module comment of block-render.ts): measured
    // equal; the bound asked of the render is 1 LSB of 24 bits.
    expect(maxDiff(ref, ours)).toBeLessThanOrEqual(LSB.s24);
  });
});

describe('the render block by block against the whole-buffer render', () => {
  const x = programme(12);
  for (const format of ['s16', 's24', 'f32'] as const) {
    it(`${format}: the same file within 1 LSB for awkward block lengths, one shorter than the look-ahead`, async () => {
      const ref = await wholeBufferRender(x, 6, { cornerHz: 1500, shelfGainDb: 6 }, format);
      // 97 < 220 samples of look-ahead at 44.1 kHz (5 ms); 4099 and 65521 are primes; 65536 the default.
      for (const blockSize of [97, 4099, 65521, 65536]) {
        const { samples, fig } = await blockRender(x, 6, { cornerHz: 1500, shelfGainDb: 6 }, format, blockSize);
        expect(maxDiff(ref, samples)).toBeLessThanOrEqual(LSB[format]);
        // the limiter worked: several true-peak passes, and the file stays at the ceiling
        expect(fig.limiter!.passes).toBeGreaterThanOrEqual(2);
        expect(fig.limiter!.maxReductionDb).toBeGreaterThan(3);
        expect(channelTruePeakLinear(samples)).toBeLessThanOrEqual(1);
      }
    });
  }

  it('renders a clip shorter than the look-ahead and an empty one', async () => {
    const short = programme(0.003);
    const ref = await wholeBufferRender(short, 12, null, 's24');
    expect(maxDiff(ref, (await blockRender(short, 12, null, 's24', 50)).samples)).toBeLessThanOrEqual(LSB.s24);
    const parts: Uint8Array[] = [];
    renderModulationWav(new Float32Array(0), FS, 'mix', { gainDb: 0, format: 's16', blockSize: 64 }, { onChunk: (b) => parts.push(b.slice()) });
    expect(new Uint8Array(Buffer.concat(parts))).toEqual(encodeWav({ sampleRate: FS, channels: [new Float32Array(0)] }, { format: 's16' }));
  });
});

describe('the render read from the WAV file against the whole-buffer render', () => {
  it('a long stereo file, its mix read again from the file for each pass: the same file within 1 LSB', async () => {
    // 40 s of stereo programme, the channels out of step, as a 16-bit file: the source the command
    // line and the server render from.
    const left = programme(40, 5);
    const right = programme(40, 6).map((v, i) => 0.8 * v + 0.2 * left[(i + 333) % left.length]);
    const dir = mkdtempSync(join(tmpdir(), 'coilcue-block-file-'));
    try {
      const path = join(dir, 'long.wav');
      writeFileSync(path, encodeWav({ sampleRate: FS, channels: [left, right] }, { format: 's16', seed: 2 }));
      const source = modulationSource(await decodeAudioFile(path), 'mix');
      const pe = { cornerHz: 900, shelfGainDb: 4 };
      const ref = await wholeBufferRender(source, 5, pe, 's16');
      // 97 < the limiter's 220 samples of look-ahead; 4099 and 65521 are primes; reads of the file as long as the blocks
      for (const blockSize of [97, 4099, 65521]) {
        const file = openWavSource(path, 'mix', blockSize)!;
        const { samples, fig } = await blockRender(file, 5, pe, 's16', blockSize);
        file.close();
        expect(maxDiff(ref, samples)).toBeLessThanOrEqual(LSB.s16);
        expect(fig.limiter!.passes).toBeGreaterThanOrEqual(2);
      }
    } finally {
      rmSync(dir, { recursive: true, force: true });
    }
  });
});

describe('the pieces of the stream', () => {
  const x = programme(3, 11);
  const cuts = [1, 15, 16, 17, 1000, 44100];

  it('TruePeakMeter equals channelTruePeakLinear for any split', () => {
    for (const b of cuts) {
      const m = new TruePeakMeter();
      for (let a = 0; a < x.length; a += b) m.add(x.subarray(a, a + b));
      expect(m.value()).toBe(channelTruePeakLinear(x));
    }
  });

  it('FrameStatsStream equals computeFrameStats for any split', () => {
    const whole = computeFrameStats(x, FS);
    for (const b of cuts) {
      const s = new FrameStatsStream(x.length, FS);
      for (let a = 0; a < x.length; a += b) s.add(x.subarray(a, a + b));
      const r = s.result();
      expect(r.count).toBe(whole.count);
      expect(r.mean).toEqual(whole.mean);
      expect(r.meanSquare).toEqual(whole.meanSquare);
      expect(r.min).toEqual(whole.min);
      expect(r.max).toEqual(whole.max);
    }
  });

  it('PlanReducer gives the analysis’s histogram and zero crossings', () => {
    const whole = sourceStatsPass(x, FS, { attackS: 0.001, releaseS: 0.05 });
    const r = new PlanReducer(x.length, FS, true);
    for (let a = 0; a < x.length; a += 777) r.add(x.subarray(a, a + 777));
    const p = r.result('x');
    expect(Array.from(p.histogram.counts)).toEqual(Array.from(whole.histogram.counts));
    const zc = zeroCrossingEvents(x, FS);
    expect(p.pulseEvents!.timeS).toEqual(zc.timeS);
    expect(p.pulseEvents!.level).toEqual(zc.level);
    const z = new ZeroCrossingStream(FS);
    z.add(x);
    expect(z.result().timeS.length).toBe(zc.timeS.length);
  });

  it('WavBlockEncoder writes encodeWav’s bytes, dither included', () => {
    for (const format of ['s16', 's24', 'f32'] as const) {
      const y = x.subarray(0, 10001).map((v) => v * dbToAmp(-6));
      const parts: Uint8Array[] = [];
      const enc = new WavBlockEncoder(FS, y.length, format, 5, (b) => parts.push(b.slice()));
      for (let a = 0; a < y.length; a += 333) enc.write(y.subarray(a, a + 333));
      enc.finish();
      const got = Buffer.concat(parts);
      expect(new Uint8Array(got)).toEqual(encodeWav({ sampleRate: FS, channels: [y] }, { format, seed: 5 }));
    }
  });
});
