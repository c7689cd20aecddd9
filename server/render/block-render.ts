/**
 * The coil-ready render block by block: modulation source → [high-shelf pre-emphasis] → gain →
 * look-ahead limiter → WAV encoder (TPDF dither for 16-bit), each stage carrying its state (the
 * shelf's delay line, the limiter's look-ahead window and release, the true-peak meter's history,
 * the dither generator) from one block to the next. Memory is a few blocks, whatever the clip's
 * length; the output is the same, sample for sample, as running each stage over the whole signal.
 *
 * The shelf and the gain are the Web Audio graph the render used before (web-audio-api's
 * BiquadFilterNode "highshelf" and GainNode, rendered offline), computed here with the same
 * arithmetic: the node's parameters are float32 (AudioParam), its coefficients R. Bristow-Johnson's
 * *Audio EQ Cookbook* high shelf with S = 1 (Q = 1/√2), its filter direct form I in float64 with the
 * output stored as float32, and the gain a float32 product. test/server/render/block-render.test.ts
 * checks it against the package's graph on a long signal.
 *
 * True peak: the limiter's true-peak passes (shared/dsp/limiter.ts) need the whole output's true
 * peak before they know whether to run again at a lower sample ceiling. Each pass therefore reads
 * the source again (SampleBlocks: from memory, or from the WAV file, shared/preview/sample-blocks.ts)
 * through the chain and measures the output's true peak as it goes (TruePeakMeter). The first pass
 * only measures; every later pass writes as it goes (the sink starts over before each), so the
 * pass whose true peak is within the ceiling is already the file: music usually takes two passes,
 * the second of which is written. Only when the first pass already meets the ceiling, or the passes
 * run out and a final scaling is needed, does one more pass write.
 */
import { DEFAULT_LOOKAHEAD_S, DEFAULT_RELEASE_S, LimiterStream } from '../../shared/dsp/limiter.ts';
import { TRUE_PEAK_PHASES, TruePeakMeter } from '../../shared/dsp/true-peak.ts';
import { rngSeedState } from '../../shared/demo/prng.ts';
import type { SampleBlocks } from '../../shared/preview/sample-blocks.ts';
import { dbToAmp } from '../../shared/units.ts';
import { type WavSampleFormat, encodeWav } from '../audio/wav.ts';

const LITTLE_ENDIAN = new Uint8Array(new Uint16Array([1]).buffer)[0] === 1;

/** Samples per block (256 KiB of float32): long enough that per-block costs vanish. */
export const RENDER_BLOCK = 65536;

/** max over branches of Σ|h_p[k]| of the BS.1770-4 Annex 2 filter (≈ 2.02): the most a bounded error can grow in the oversampled signal. */
export const ANNEX2_ABS_TAP_SUM = Math.max(...TRUE_PEAK_PHASES.map((h) => h.reduce((s, v) => s + Math.abs(v), 0)));

/** Largest change a sample undergoes in the encoder, linear full scale: < 1.5 LSB (s16, dithered), ≤ 0.5 LSB (s24), 0 (f32). */
export function quantisationMargin(format: WavSampleFormat): number {
  return format === 's16' ? 1.5 / 32768 : format === 's24' ? 0.5 / 8388608 : 0;
}

/** Biquad coefficients, a0 = 1. */
interface Coeffs {
  b0: number;
  b1: number;
  b2: number;
  a1: number;
  a2: number;
}

/**
 * The Web Audio "highshelf" at `cornerHz` with `gainDb` (Audio EQ Cookbook, S = 1): A = 10^(G/40),
 * ω0 = 2π·f0/fs, α = sin ω0/(2Q) with Q = 1/√2, normalised by a0. The parameters are rounded to
 * float32 first, as an AudioParam holds them.
 *
 * @example highShelfCoefficients(3000, 6, 44100).b0 // ≈ 1.62 (+6 dB towards Nyquist)
 */
export function highShelfCoefficients(cornerHz: number, gainDb: number, sampleRate: number): Coeffs {
  const f0 = Math.fround(cornerHz);
  const A = Math.pow(10, Math.fround(gainDb) / 40);
  if (f0 <= 0) return { b0: A * A, b1: 0, b2: 0, a1: 0, a2: 0 };
  if (f0 >= sampleRate / 2) return { b0: 1, b1: 0, b2: 0, a1: 0, a2: 0 };
  const w0 = (2 * Math.PI * f0) / sampleRate;
  const cosw = Math.cos(w0);
  const alpha = Math.sin(w0) / (2 * Math.SQRT1_2);
  const s = 2 * Math.sqrt(A) * alpha;
  const a0 = A + 1 - (A - 1) * cosw + s;
  return {
    b0: (A * (A + 1 + (A - 1) * cosw + s)) / a0,
    b1: (-2 * A * (A - 1 + (A + 1) * cosw)) / a0,
    b2: (A * (A + 1 + (A - 1) * cosw - s)) / a0,
    a1: (2 * (A - 1 - (A + 1) * cosw)) / a0,
    a2: (A + 1 - (A - 1) * cosw - s) / a0,
  };
}

/** A high-shelf pre-emphasis: half its gain (in dB) at `cornerHz`, the full gain towards Nyquist. */
export interface PreEmphasis {
  /** Shelf midpoint frequency, Hz (0 < f < fs/2). */
  cornerHz: number;
  /** Shelf gain at high frequencies, dB (−24…+24). */
  shelfGainDb: number;
}

/**
 * The graph's part of the chain, [high shelf →] gain, block by block with the shelf's state
 * carried over (module comment for the arithmetic). `reset` starts a new signal.
 *
 * @example const g = new GraphStream(44100, -6, null); g.process(x, y) // y = fround(x·fround(10^(−6/20)))
 */
export class GraphStream {
  private readonly gain: number;
  private readonly c: Coeffs | null;
  private x1 = 0;
  private x2 = 0;
  private y1 = 0;
  private y2 = 0;

  constructor(sampleRate: number, gainDb: number, preEmphasis: PreEmphasis | null) {
    this.gain = Math.fround(dbToAmp(gainDb));
    this.c = preEmphasis ? highShelfCoefficients(preEmphasis.cornerHz, preEmphasis.shelfGainDb, sampleRate) : null;
  }

  reset(): void {
    this.x1 = this.x2 = this.y1 = this.y2 = 0;
  }

  /** out[i] = the graph's output for x[i] (out may be x). */
  process(x: Float32Array, out: Float32Array): void {
    const g = this.gain;
    const n = x.length;
    if (this.c === null) {
      for (let i = 0; i < n; i++) out[i] = x[i] * g;
      return;
    }
    const { b0, b1, b2, a1, a2 } = this.c;
    let { x1, x2, y1, y2 } = this;
    for (let i = 0; i < n; i++) {
      const xi = x[i];
      const y = b0 * xi + b1 * x1 + b2 * x2 - a1 * y1 - a2 * y2;
      x2 = x1;
      x1 = xi;
      y2 = y1;
      y1 = y;
      out[i] = Math.fround(y) * g;
    }
    this.x1 = x1;
    this.x2 = x2;
    this.y1 = y1;
    this.y2 = y2;
  }
}

/**
 * The mono WAV encoder of server/audio/wav.ts (encodeWav) block by block: the header first (its
 * sizes from the frame count given in advance), then each block's samples quantised as encodeWav
 * does (s16: round(x·32768 + d) with TPDF dither d from the same generator and seed; s24:
 * round(x·8388608); f32 as is), so the bytes equal encodeWav's of the whole signal. `onChunk`
 * receives the bytes in order; `onDecoded` the samples as a reader of the file gets them back
 * (code/2^(b−1), or the float32 value): what the closed loop checks.
 */
export class WavBlockEncoder {
  /** The dither generator's state (xoshiro128**, shared/demo/prng.ts createRng's, stepped inline). */
  private rng: Int32Array;
  private written = 0;
  private readonly full: number;
  private readonly bytesPer: number;
  private readonly header: Uint8Array;
  private bytes: Uint8Array = new Uint8Array(0);
  private decoded: Float32Array = new Float32Array(0);

  constructor(
    readonly sampleRate: number,
    readonly frames: number,
    readonly format: WavSampleFormat,
    private readonly seed: number,
    private readonly onChunk: (bytes: Uint8Array) => void,
    private readonly onDecoded?: (samples: Float32Array) => void,
  ) {
    this.rng = rngSeedState(seed);
    this.full = format === 's16' ? 32768 : 8388608;
    this.bytesPer = format === 's16' ? 2 : format === 's24' ? 3 : 4;
    this.header = wavHeader(sampleRate, frames, format);
  }

  /** Bytes of the whole file: header, samples and the pad byte of an odd data size. */
  get totalBytes(): number {
    const data = this.frames * this.bytesPer;
    return this.header.length + data + (data & 1);
  }

  /** Starts the file over (a new pass): the header again, the dither generator from its seed. */
  restart(): void {
    this.rng = rngSeedState(this.seed);
    this.written = 0;
  }

  /** Encodes the next samples (finite, full scale ±1); the header goes out with the first. */
  write(x: Float32Array): void {
    const n = x.length;
    if (n === 0) return;
    if (this.written === 0) this.onChunk(this.header);
    if (this.written + n > this.frames) throw new RangeError(`WavBlockEncoder.write: more than the ${this.frames} frames announced`);
    if (this.bytes.length < n * this.bytesPer) this.bytes = new Uint8Array(n * this.bytesPer);
    if (this.decoded.length < n) this.decoded = new Float32Array(n);
    const out = this.bytes;
    const dec = this.decoded;
    const dv = new DataView(out.buffer);
    const i16 = this.format === 's16' && LITTLE_ENDIAN ? new Int16Array(out.buffer, 0, n) : null;
    if (this.format === 'f32') {
      for (let i = 0; i < n; i++) {
        dv.setFloat32(4 * i, x[i], true);
        dec[i] = x[i];
      }
    } else {
      const full = this.full;
      const lo = -full;
      const hi = full - 1;
      const inv = 1 / full;
      const dither = this.format === 's16';
      const st = this.rng;
      let s0 = st[0];
      let s1 = st[1];
      let s2 = st[2];
      let s3 = st[3];
      for (let i = 0; i < n; i++) {
        // TPDF, as encodeWav: rng() + rng() − 1, with createRng's xoshiro128** step written out
        let d = 0;
        if (dither) {
          let m = Math.imul(s1, 5);
          const u1 = Math.imul((m << 7) | (m >>> 25), 9) >>> 0;
          let t = s1 << 9;
          s2 ^= s0;
          s3 ^= s1;
          s1 ^= s2;
          s0 ^= s3;
          s2 ^= t;
          s3 = (s3 << 11) | (s3 >>> 21);
          m = Math.imul(s1, 5);
          const u2 = Math.imul((m << 7) | (m >>> 25), 9) >>> 0;
          t = s1 << 9;
          s2 ^= s0;
          s3 ^= s1;
          s1 ^= s2;
          s0 ^= s3;
          s2 ^= t;
          s3 = (s3 << 11) | (s3 >>> 21);
          d = u1 / 4294967296 + u2 / 4294967296 - 1;
        }
        let q = Math.round(x[i] * full + d);
        q = q < lo ? lo : q > hi ? hi : q;
        dec[i] = q * inv;
        if (i16 !== null) i16[i] = q;
        else if (dither) dv.setInt16(2 * i, q, true);
        else {
          out[3 * i] = q & 0xff;
          out[3 * i + 1] = (q >> 8) & 0xff;
          out[3 * i + 2] = (q >> 16) & 0xff;
        }
      }
      st[0] = s0;
      st[1] = s1;
      st[2] = s2;
      st[3] = s3;
    }
    this.written += n;
    this.onChunk(out.subarray(0, n * this.bytesPer));
    this.onDecoded?.(dec.subarray(0, n));
  }

  /** Ends the file: the header if no sample was written, and the pad byte of an odd data size. */
  finish(): void {
    if (this.written !== this.frames) throw new RangeError(`WavBlockEncoder.finish: ${this.written} of ${this.frames} frames written`);
    if (this.frames === 0) this.onChunk(this.header);
    if ((this.frames * this.bytesPer) & 1) this.onChunk(new Uint8Array(1));
  }
}

/** encodeWav's header for a mono file of `frames` frames (its sizes patched in; no samples). */
function wavHeader(sampleRate: number, frames: number, format: WavSampleFormat): Uint8Array {
  const empty = encodeWav({ sampleRate, channels: [new Float32Array(0)] }, { format });
  const h = empty.slice();
  const dv = new DataView(h.buffer);
  const bytesPer = format === 's16' ? 2 : format === 's24' ? 3 : 4;
  const data = frames * bytesPer;
  if (h.length - 8 + data + (data & 1) > 0xffffffff) throw new RangeError(`wavHeader: ${data} bytes of audio exceed the 4 GiB RIFF limit; split the clip`);
  dv.setUint32(4, h.length - 8 + data + (data & 1), true);
  dv.setUint32(h.length - 4, data, true); // the `data` chunk's size: the header's last field
  for (let o = 12; o + 8 <= h.length; ) {
    const id = String.fromCharCode(h[o], h[o + 1], h[o + 2], h[o + 3]);
    if (id === 'fact') dv.setUint32(o + 8, frames >>> 0, true);
    if (id === 'data') break;
    o += 8 + dv.getUint32(o + 4, true);
  }
  return h;
}

/** What the limiter did (RenderedModulation.limiter in render-clip.ts). */
export interface BlockLimiterFigures {
  workingCeiling: number;
  limitedSamples: number;
  deepSamples: number;
  minGain: number;
  passes: number;
  finalScale: number;
}

/** Levels and limiter figures of a block render, linear full scale. */
export interface BlockRenderFigures {
  sampleCount: number;
  beforeLimiter: { samplePeak: number; truePeak: number };
  samplePeak: number;
  truePeak: number;
  limiter: BlockLimiterFigures | null;
}

/** Settings of {@link renderBlocks}; levels linear. */
export interface BlockRenderSettings {
  gainDb: number;
  preEmphasis: PreEmphasis | null;
  /** null: no limiter (the graph alone). */
  limiter: { ceiling: number; workingCeiling: number; truePeak: boolean; lookAheadS?: number; releaseS?: number } | null;
  /** Samples per block (default RENDER_BLOCK). */
  blockSize?: number;
}

/** Most limiter passes in true-peak mode before the final scaling (as lookAheadLimit). */
const MAX_TRUE_PEAK_PASSES = 6;

/**
 * Streams `source` through the chain (module comment) into `sink` (called with each block of
 * final samples, in order; `restart` is called before a pass that replaces what was written). The
 * passes and their arithmetic are lookAheadLimit's (shared/dsp/limiter.ts), so the samples equal
 * the whole-buffer render's. Memory: a few blocks.
 */
export function renderBlocks(
  source: SampleBlocks,
  sampleRate: number,
  s: BlockRenderSettings,
  sink: { write(block: Float32Array): void; restart(): void },
): BlockRenderFigures {
  const n = source.length;
  const B = Math.max(1, Math.min(Math.floor(s.blockSize ?? RENDER_BLOCK), source.maxBlock));
  const graph = new GraphStream(sampleRate, s.gainDb, s.preEmphasis);
  const g = new Float32Array(Math.min(B, Math.max(1, n)));
  const before = new TruePeakMeter();
  let beforePeak = 0;
  const lim = s.limiter;
  if (lim === null) {
    for (let a = 0; a < n; a += B) {
      const blk = g.subarray(0, Math.min(B, n - a));
      graph.process(source.read(a, blk.length), blk);
      before.add(blk);
      for (let i = 0; i < blk.length; i++) beforePeak = Math.max(beforePeak, Math.abs(blk[i]));
      sink.write(blk);
    }
    const tp = before.value();
    return { sampleCount: n, beforeLimiter: { samplePeak: beforePeak, truePeak: tp }, samplePeak: beforePeak, truePeak: tp, limiter: null };
  }
  const lookAheadS = lim.lookAheadS ?? DEFAULT_LOOKAHEAD_S;
  const releaseS = lim.releaseS ?? DEFAULT_RELEASE_S;
  const L = Math.round(lookAheadS * sampleRate);
  const a = releaseS > 0 ? Math.exp(-1 / (releaseS * sampleRate)) : 0;
  const out = new Float32Array(Math.max(g.length, L));
  const c = lim.workingCeiling;
  const meter = new TruePeakMeter();
  let written = false;

  /** One pass at sample ceiling `ceiling`, scaled by `scale`, to the sink when `write`; returns the limiter's counts and the output's levels. */
  const pass = (ceiling: number, scale: number, first: boolean, write: boolean) => {
    graph.reset();
    meter.reset();
    if (write && written) sink.restart();
    written ||= write;
    const stream = new LimiterStream(ceiling, L, a);
    let samplePeak = 0;
    const emit = (blk: Float32Array) => {
      if (blk.length === 0) return;
      if (scale !== 1) for (let i = 0; i < blk.length; i++) blk[i] = Math.fround(blk[i] * scale);
      for (let i = 0; i < blk.length; i++) {
        const v = Math.abs(blk[i]);
        if (v > samplePeak) samplePeak = v;
      }
      meter.add(blk);
      if (write) sink.write(blk);
    };
    for (let at = 0; at < n; at += B) {
      const blk = g.subarray(0, Math.min(B, n - at));
      graph.process(source.read(at, blk.length), blk);
      if (first) {
        before.add(blk);
        for (let i = 0; i < blk.length; i++) {
          const v = Math.abs(blk[i]);
          if (v > beforePeak) beforePeak = v;
        }
      }
      emit(out.subarray(0, stream.write(blk, out)));
    }
    emit(out.subarray(0, stream.end(out)));
    return { stream, samplePeak, tp: meter.value() };
  };

  // Without the true peak, one pass is the file. With it, the first pass measures and each later
  // one writes as it measures (module comment).
  let sampleCeiling = c;
  let passes = 1;
  let finalScale = 1;
  let r = pass(sampleCeiling, 1, true, !lim.truePeak);
  if (lim.truePeak) {
    while (r.tp > c && passes < MAX_TRUE_PEAK_PASSES) {
      sampleCeiling *= (c / r.tp) * (1 - 1e-6);
      r = pass(sampleCeiling, 1, false, true);
      passes++;
    }
    if (r.tp > c) {
      finalScale = (c / r.tp) * (1 - 1e-6);
      r = pass(sampleCeiling, finalScale, false, true);
    } else if (passes === 1) {
      // the first pass met the ceiling but was not written
      r = pass(sampleCeiling, 1, false, true);
    }
  }
  const minGain = r.stream.minGain * finalScale;
  return {
    sampleCount: n,
    beforeLimiter: { samplePeak: beforePeak, truePeak: before.value() },
    samplePeak: r.samplePeak,
    truePeak: r.tp,
    limiter: {
      workingCeiling: c,
      limitedSamples: finalScale < 1 ? n : r.stream.limited,
      deepSamples: finalScale < 0.8912509381337456 ? n : r.stream.deep,
      minGain,
      passes,
      finalScale,
    },
  };
}
