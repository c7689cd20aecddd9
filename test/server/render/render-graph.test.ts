/**
 * The Web Audio graph of the render (server/render/render-graph.ts renderGraph) through the
 * `web-audio-api` package's OfflineAudioContext: transparency, the gain, and the high-shelf
 * pre-emphasis against R. Bristow-Johnson's *Audio EQ Cookbook* formulas (coded here from the
 * cookbook, independently of the package). Also why the render does not use the package's
 * DynamicsCompressorNode as its limiter.
 */
import { OfflineAudioContext } from 'web-audio-api';
import { describe, expect, it } from 'vitest';
import { biquadGainDb, type BiquadCoeffs } from '../../../shared/dsp/biquad.ts';
import { samplePeakLinear } from '../../../shared/dsp/true-peak.ts';
import { ampToDb } from '../../../shared/units.ts';
import { renderGraph } from '../../../server/render/render-graph.ts';

const FS = 44100;

function sine(freqHz: number, amp: number, n: number, fs = FS): Float32Array {
  const x = new Float32Array(n);
  for (let i = 0; i < n; i++) x[i] = amp * Math.sin((2 * Math.PI * freqHz * i) / fs);
  return x;
}

/**
 * High shelf of the Audio EQ Cookbook (R. Bristow-Johnson), shelf slope S:
 * A = 10^(G/40), w0 = 2π·f0/fs, α = sin(w0)/2·√((A + 1/A)(1/S − 1) + 2),
 * b0 = A((A+1) + (A−1)cos w0 + 2√A·α), b1 = −2A((A−1) + (A+1)cos w0), b2 = A((A+1) + (A−1)cos w0 − 2√A·α),
 * a0 = (A+1) − (A−1)cos w0 + 2√A·α, a1 = 2((A−1) − (A+1)cos w0), a2 = (A+1) − (A−1)cos w0 − 2√A·α.
 * The Web Audio spec's "highshelf" is this with S = 1.
 */
function cookbookHighShelf(f0: number, gainDb: number, fs: number, S = 1): BiquadCoeffs {
  const A = 10 ** (gainDb / 40);
  const w0 = (2 * Math.PI * f0) / fs;
  const cw = Math.cos(w0);
  const alpha = (Math.sin(w0) / 2) * Math.sqrt((A + 1 / A) * (1 / S - 1) + 2);
  const sa = 2 * Math.sqrt(A) * alpha;
  const a0 = A + 1 - (A - 1) * cw + sa;
  return {
    b0: (A * (A + 1 + (A - 1) * cw + sa)) / a0,
    b1: (-2 * A * (A - 1 + (A + 1) * cw)) / a0,
    b2: (A * (A + 1 + (A - 1) * cw - sa)) / a0,
    a1: (2 * (A - 1 - (A + 1) * cw)) / a0,
    a2: (A + 1 - (A - 1) * cw - sa) / a0,
  };
}

/** |DFT of h at f| in dB: 20·log10|Σ h[n]·e^(−j2πfn/fs)|. */
function responseDb(h: Float32Array, f: number, fs: number): number {
  let re = 0;
  let im = 0;
  const w = (2 * Math.PI * f) / fs;
  for (let n = 0; n < h.length; n++) {
    re += h[n] * Math.cos(w * n);
    im -= h[n] * Math.sin(w * n);
  }
  return 10 * Math.log10(re * re + im * im);
}

describe('the render graph', () => {
  it('is transparent at 0 dB without pre-emphasis (bit for bit)', async () => {
    const x = sine(997, 0.7, 5000);
    const y = await renderGraph(x, FS, 0, null);
    expect(Array.from(y)).toEqual(Array.from(x));
  });

  it('applies the gain: 20·log10(g) = gainDb', async () => {
    const x = sine(997, 0.5, 5000);
    const y = await renderGraph(x, FS, -6, null);
    // GainNode multiplies in float32: agreement to float32 precision (1e-6 relative).
    const g = 10 ** (-6 / 20);
    for (let i = 0; i < x.length; i += 37) expect(Math.abs(y[i] - g * x[i])).toBeLessThan(1e-6);
    expect(ampToDb(samplePeakLinear(y) / samplePeakLinear(x))).toBeCloseTo(-6, 4);
  });

  it.each([
    [435, 6],
    [2000, -4],
    [160, 12],
  ])('high shelf at %d Hz, %d dB matches the Audio EQ Cookbook within 0.001 dB', async (f0, gDb) => {
    // Impulse response through the graph; its DFT is the filter's response (the IIR has decayed to
    // below float32 resolution within the 16384 samples for these corners, Q = 1/√2).
    const imp = new Float32Array(16384);
    imp[0] = 1;
    const h = await renderGraph(imp, FS, 0, { cornerHz: f0, shelfGainDb: gDb });
    const ref = cookbookHighShelf(f0, gDb, FS);
    for (const f of [20, f0 / 4, f0 / 2, f0, 2 * f0, 4 * f0, 10000, 20000]) {
      // float32 arithmetic in the node: ~1e-6 relative, far below 0.001 dB (1.2e-4 relative).
      expect(Math.abs(responseDb(h, f, FS) - biquadGainDb(ref, f, FS))).toBeLessThan(1e-3);
    }
    // Anchors of the cookbook shelf: 0 dB at DC, G at Nyquist, G/2 at the corner (its "midpoint").
    expect(biquadGainDb(ref, 0, FS)).toBeCloseTo(0, 9);
    expect(biquadGainDb(ref, FS / 2, FS)).toBeCloseTo(gDb, 9);
    expect(responseDb(h, f0, FS)).toBeCloseTo(gDb / 2, 3);
  });
});

describe('why the limiter is not the DynamicsCompressorNode', () => {
  it('the package compressor at its hardest settings lets a 0 dBFS sine through above a −12 dB threshold', async () => {
    // Threshold −12 dB, ratio 20 (its maximum), knee 0, attack 0: an ideal compressor would still
    // let the output rise 1/20 dB per dB over the threshold: 12/20 = 0.6 dB above it in steady state.
    const n = 8192;
    const ctx = new OfflineAudioContext(1, n, FS);
    const buf = ctx.createBuffer(1, n, FS);
    buf.copyToChannel(sine(997, 1, n), 0);
    const src = ctx.createBufferSource();
    src.buffer = buf;
    const comp = ctx.createDynamicsCompressor();
    comp.threshold.value = -12;
    comp.ratio.value = 20;
    comp.knee.value = 0;
    comp.attack.value = 0;
    comp.release.value = 0.1;
    src.connect(comp);
    comp.connect(ctx.destination);
    src.start(0);
    const out = (await ctx.startRendering()).getChannelData(0);
    const peakDb = ampToDb(samplePeakLinear(out));
    expect(peakDb).toBeGreaterThan(-12 + 0.5); // the "ceiling" is exceeded
  });
});
