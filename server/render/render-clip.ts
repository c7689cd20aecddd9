/**
 * The coil-ready render: the ONE signal that drives the coil, prepared so it stays inside the
 * advised limits, as a WAV file.
 *
 * Chain: modulation source (mix / left / right → mono, shared/audio/clip.ts) → optional
 * pre-emphasis (the Web Audio "highshelf" at a corner with a gain in dB, S = 1, which is
 * R. Bristow-Johnson's *Audio EQ Cookbook* high shelf) → gain (g = 10^(gainDb/20)) → the look-ahead
 * peak limiter of shared/dsp/limiter.ts at the ceiling → the WAV encoder. All of it runs block by
 * block (block-render.ts) from a source read block by block (SampleBlocks: the WAV file read again
 * for each pass, server/render/wav-source.ts), so memory does not grow with the clip's length;
 * the shelf and the gain compute what the `web-audio-api` package's OfflineAudioContext graph
 * (render-graph.ts renderGraph, kept as the reference for the tests, outside the render's imports)
 * computes.
 *
 * Why the limiter is not the graph's DynamicsCompressorNode: in this package it is a dB-domain
 * envelope follower with a one-pole attack (attack ≥ 0 s, no look-ahead) and a ratio of at most
 * 20:1 with a soft knee (node_modules/audio-effect/dynamics/compressor.js). Above the threshold the
 * output still rises by 1/ratio of the input, and a transient passes at near full level until the
 * envelope catches up: it bounds nothing. The look-ahead limiter guarantees the ceiling on every
 * sample (and on the BS.1770 true peak).
 *
 * Levels: the rendered samples are output-referred: 1.0 (0 dBFS) is the rail at its ends
 * (v = (V_s/2)(1 ± 1)) in the rail schemes and the longest on-time in the pulse scheme, the gain
 * convention of shared/plan/evaluate.ts with the gain already inside the file. Played at 0 dB, the
 * file IS the modulation the advice was for.
 *
 * Quantisation: encodeWav adds TPDF dither of less than ±1 LSB to 16-bit output and rounds, so a
 * sample may move by < 1.5 LSB (s16) or ≤ 0.5 LSB (s24, no dither). The limiter therefore works to
 * the ceiling minus that margin (times the Annex 2 filter's Σ|h| for the true peak), so the
 * FILE, not just the float render, stays at or below the ceiling.
 */
import { type AudioClip, type ModulationChannel, modulationSource } from '../../shared/audio/clip.ts';
import { DEFAULT_LOOKAHEAD_S, DEFAULT_RELEASE_S } from '../../shared/dsp/limiter.ts';
import { InputError } from '../../shared/errors.ts';
import { type SampleBlocks, arraySamples } from '../../shared/preview/sample-blocks.ts';
import { ampToDb, dbToAmp } from '../../shared/units.ts';
import { type WavSampleFormat, encodeWav } from '../audio/wav.ts';
import { ANNEX2_ABS_TAP_SUM, type BlockRenderFigures, type PreEmphasis, WavBlockEncoder, quantisationMargin, renderBlocks } from './block-render.ts';

export { type PreEmphasis, quantisationMargin } from './block-render.ts';

/** Options of {@link renderModulation}; levels in dB/dBFS, times in seconds. */
export interface RenderOptions {
  /** Which signal drives the coil (default 'mix'). */
  channel?: ModulationChannel;
  /** Gain applied before the limiter, dB (−60…+40). */
  gainDb: number;
  /** Optional high-shelf pre-emphasis (before the gain). */
  preEmphasis?: PreEmphasis | null;
  /** Ceiling of the limiter, dBFS (−40…0; default 0 = the rail's ends / the longest on-time). */
  ceilingDbfs?: number;
  /** Keep the BS.1770-4 true peak at or below the ceiling too (default true). */
  truePeak?: boolean;
  /** Limiter look-ahead and release, s (defaults 0.005 and 0.05). */
  lookAheadS?: number;
  releaseS?: number;
  /** The WAV sample format the render is for: sets the quantisation margin (default 's16'). */
  format?: WavSampleFormat;
  /** Skip the limiter (for measuring the graph alone; the render then guarantees nothing). */
  noLimiter?: boolean;
}

/** What the limiter did, in the units a person reads. */
export interface LimiterReport {
  ceilingDbfs: number;
  /** Ceiling the limiter worked to after the quantisation margin, dBFS. */
  workingCeilingDbfs: number;
  truePeak: boolean;
  lookAheadS: number;
  releaseS: number;
  limitedSamples: number;
  /** Share of samples whose gain was reduced at all (0…1). */
  limitedFraction: number;
  /** Share of samples whose gain was reduced by more than 1 dB (0…1). */
  deepFraction: number;
  /** Largest gain reduction, dB. */
  maxReductionDb: number;
  passes: number;
}

/** A mono, output-referred render (module comment). */
export interface RenderedModulation {
  sampleRate: number;
  samples: Float32Array;
  channel: ModulationChannel;
  gainDb: number;
  preEmphasis: PreEmphasis | null;
  limiter: LimiterReport | null;
  /** Levels of the float render before the limiter, dBFS / dBTP. */
  beforeLimiter: { samplePeakDbfs: number; truePeakDbtp: number };
  /** Levels of the float render after the limiter. */
  samplePeakDbfs: number;
  truePeakDbtp: number;
}

/** Checks render options; InputError naming the option (they come from flags). */
function checkOptions(clip: Pick<AudioClip, 'sampleRate'>, o: RenderOptions): void {
  if (!(Number.isFinite(o.gainDb) && o.gainDb >= -60 && o.gainDb <= 40)) {
    throw new InputError('bad-arguments', `the gain must be −60…+40 dB, got ${o.gainDb}`);
  }
  const ceiling = o.ceilingDbfs ?? 0;
  if (!(Number.isFinite(ceiling) && ceiling >= -40 && ceiling <= 0)) {
    throw new InputError('bad-arguments', `the limiter ceiling must be −40…0 dBFS (0 dBFS is the rail's ends), got ${ceiling}`);
  }
  const fs = clip.sampleRate;
  if (!(fs >= 3000 && fs <= 768000)) {
    throw new InputError('bad-sample-rate', `the clip's sample rate ${fs} Hz is outside 3000…768000 Hz, which the renderer supports; resample it first`);
  }
  const pe = o.preEmphasis;
  if (pe) {
    if (!(Number.isFinite(pe.cornerHz) && pe.cornerHz > 0 && pe.cornerHz < fs / 2)) {
      throw new InputError('bad-arguments', `the pre-emphasis corner must lie between 0 and ${fs / 2} Hz (half the sample rate), got ${pe.cornerHz} Hz`);
    }
    if (!(Number.isFinite(pe.shelfGainDb) && Math.abs(pe.shelfGainDb) <= 24)) {
      throw new InputError('bad-arguments', `the pre-emphasis gain must be −24…+24 dB, got ${pe.shelfGainDb}`);
    }
  }
}

/** A render's levels and limiter report, without its samples (they went to the file). */
export type RenderedModulationFigures = Omit<RenderedModulation, 'samples'> & { sampleCount: number };

/**
 * Renders the coil-ready modulation signal of `source` (the modulation source `channel` of a clip:
 * mono, linear full scale; an array, or SampleBlocks read again for each pass) block by block (module comment) and encodes it as a mono WAV in
 * `format` (16-bit with TPDF dither seeded by `seed`, 24-bit, or 32-bit float): `onChunk` receives
 * the file's bytes in order, `onDecoded` the samples as a reader decodes them from the file (for the
 * closed loop), `onRestart` is called when a pass that was written is replaced by the next (the
 * limiter's true-peak passes): whatever was received so far must be dropped. Every sample of the
 * file (and its true peak, by default) stays at or below the ceiling. InputError for options out of
 * range (naming them).
 *
 * @example const parts: Uint8Array[] = []; renderModulationWav(src, 44100, 'mix', { gainDb: -3, format: 's16' }, { onChunk: (b) => parts.push(b.slice()), onRestart: () => (parts.length = 0) })
 */
export function renderModulationWav(
  source: Float32Array | SampleBlocks,
  sampleRate: number,
  channel: ModulationChannel,
  opts: RenderOptions & { format: WavSampleFormat; seed?: number; blockSize?: number },
  sink: { onChunk(bytes: Uint8Array): void; onDecoded?(samples: Float32Array): void; onRestart?(): void },
): RenderedModulationFigures {
  checkOptions({ sampleRate }, opts);
  const blocks = source instanceof Float32Array ? arraySamples(source) : source;
  const enc = new WavBlockEncoder(sampleRate, blocks.length, opts.format, opts.seed ?? 1, sink.onChunk, sink.onDecoded);
  const r = renderSamples(blocks, sampleRate, opts, opts.format, {
    write: (b) => enc.write(b),
    restart: () => {
      enc.restart();
      sink.onRestart?.();
    },
  });
  enc.finish();
  return figuresOf(r, sampleRate, channel, opts);
}

/** The limiter's settings from the options, and renderBlocks over `source` into `sink`. */
function renderSamples(
  source: SampleBlocks,
  sampleRate: number,
  opts: RenderOptions & { blockSize?: number },
  format: WavSampleFormat,
  sink: { write(b: Float32Array): void; restart(): void },
): BlockRenderFigures {
  const ceilingDbfs = opts.ceilingDbfs ?? 0;
  const truePeak = opts.truePeak ?? true;
  const q = quantisationMargin(opts.format ?? format);
  const working = dbToAmp(ceilingDbfs) - q * (truePeak ? ANNEX2_ABS_TAP_SUM : 1);
  return renderBlocks(
    source,
    sampleRate,
    {
      gainDb: opts.gainDb,
      preEmphasis: opts.preEmphasis ?? null,
      limiter: opts.noLimiter ? null : { ceiling: dbToAmp(ceilingDbfs), workingCeiling: working, truePeak, lookAheadS: opts.lookAheadS, releaseS: opts.releaseS },
      blockSize: opts.blockSize,
    },
    sink,
  );
}

/** The report of a block render in the units a person reads. */
function figuresOf(r: BlockRenderFigures, sampleRate: number, channel: ModulationChannel, opts: RenderOptions): RenderedModulationFigures {
  const beforeLimiter = { samplePeakDbfs: ampToDb(r.beforeLimiter.samplePeak), truePeakDbtp: ampToDb(r.beforeLimiter.truePeak) };
  const n = r.sampleCount;
  const l = r.limiter;
  return {
    sampleRate,
    sampleCount: n,
    channel,
    gainDb: opts.gainDb,
    preEmphasis: opts.preEmphasis ?? null,
    limiter:
      l === null
        ? null
        : {
            ceilingDbfs: opts.ceilingDbfs ?? 0,
            workingCeilingDbfs: ampToDb(l.workingCeiling),
            truePeak: opts.truePeak ?? true,
            lookAheadS: opts.lookAheadS ?? DEFAULT_LOOKAHEAD_S,
            releaseS: opts.releaseS ?? DEFAULT_RELEASE_S,
            limitedSamples: l.limitedSamples,
            limitedFraction: n ? l.limitedSamples / n : 0,
            deepFraction: n ? l.deepSamples / n : 0,
            maxReductionDb: l.minGain > 0 ? -20 * Math.log10(l.minGain) : Infinity,
            passes: l.passes,
          },
    beforeLimiter,
    samplePeakDbfs: ampToDb(r.samplePeak),
    truePeakDbtp: ampToDb(r.truePeak),
  };
}

/**
 * Renders the coil-ready modulation signal of `clip` (module comment) into memory: mono, gained,
 * optionally pre-emphasised, limited so that every sample (and the true peak, by default) of the
 * encoded file stays at or below the ceiling. The same samples as {@link renderModulationWav}
 * writes before quantisation; for tests and small clips (it holds the whole render). Throws
 * InputError for options out of range (naming them) and a mono clip asked for its right channel.
 *
 * @example const r = await renderModulation(clip, { gainDb: -3.4 }); r.truePeakDbtp // ≤ 0
 */
export async function renderModulation(clip: AudioClip, opts: RenderOptions & { blockSize?: number }): Promise<RenderedModulation> {
  checkOptions(clip, opts);
  const channel = opts.channel ?? 'mix';
  if (channel === 'right' && clip.channels.length < 2) {
    throw new InputError('bad-arguments', 'the right channel was asked of a mono clip; use the mix or the left channel');
  }
  const source = modulationSource(clip, channel);
  const samples = new Float32Array(source.length);
  let at = 0;
  const r = renderSamples(arraySamples(source), clip.sampleRate, opts, opts.format ?? 's16', {
    write: (b) => {
      samples.set(b, at);
      at += b.length;
    },
    restart: () => (at = 0),
  });
  const { sampleCount: _n, ...figures } = figuresOf(r, clip.sampleRate, channel, opts);
  return { ...figures, samples };
}

/**
 * Encodes a render as a mono WAV (RIFF/WAVE, `fmt `, `data`; see server/audio/wav.ts): 16-bit with
 * TPDF dither, 24-bit, or 32-bit float. `seed` makes the dither reproducible (default 1).
 * @example const bytes = encodeRender(r, 's24'); await writeWavAtomic('out.wav', bytes)
 */
export function encodeRender(r: RenderedModulation, format: WavSampleFormat, seed = 1): Uint8Array {
  return encodeWav({ sampleRate: r.sampleRate, channels: [r.samples] }, { format, seed });
}
