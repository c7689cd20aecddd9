/**
 * The coil-ready render: the ONE signal that drives the coil, prepared so it stays inside the
 * advised limits, as a WAV file.
 *
 * Chain: modulation source (mix / left / right → mono, shared/audio/clip.ts) → optional
 * pre-emphasis (BiquadFilterNode "highshelf" at a corner with a gain in dB, S = 1: the Web Audio
 * spec's shelf, which is R. Bristow-Johnson's *Audio EQ Cookbook* high shelf) → gain (GainNode,
 * g = 10^(gainDb/20)) rendered through the `web-audio-api` package's OfflineAudioContext; then the
 * look-ahead peak limiter of shared/dsp/limiter.ts at the ceiling; then encodeWav.
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
import { OfflineAudioContext } from 'web-audio-api';
import { type AudioClip, type ModulationChannel, modulationSource } from '../../shared/audio/clip.ts';
import { DEFAULT_LOOKAHEAD_S, DEFAULT_RELEASE_S, lookAheadLimit } from '../../shared/dsp/limiter.ts';
import { TRUE_PEAK_PHASES, channelTruePeakLinear, samplePeakLinear } from '../../shared/dsp/true-peak.ts';
import { InputError } from '../../shared/errors.ts';
import { ampToDb, dbToAmp } from '../../shared/units.ts';
import { type WavSampleFormat, encodeWav } from '../audio/wav.ts';

/** A high-shelf pre-emphasis: half its gain (in dB) at `cornerHz`, the full gain towards Nyquist. */
export interface PreEmphasis {
  /** Shelf midpoint frequency, Hz (0 < f < fs/2). */
  cornerHz: number;
  /** Shelf gain at high frequencies, dB (−24…+24). */
  shelfGainDb: number;
}

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

/** Largest change a sample undergoes in encodeWav, linear full scale: < 1.5 LSB (s16, dithered), ≤ 0.5 LSB (s24), 0 (f32). */
export function quantisationMargin(format: WavSampleFormat): number {
  return format === 's16' ? 1.5 / 32768 : format === 's24' ? 0.5 / 8388608 : 0;
}

/** max over branches of Σ|h_p[k]| of the BS.1770-4 Annex 2 filter (≈ 2.02): the most a bounded error can grow in the oversampled signal. */
const ANNEX2_ABS_TAP_SUM = Math.max(...TRUE_PEAK_PHASES.map((h) => h.reduce((s, v) => s + Math.abs(v), 0)));

/** Checks render options; InputError naming the option (they come from flags). */
function checkOptions(clip: AudioClip, o: RenderOptions): void {
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

/**
 * Runs the Web Audio graph (source → [highshelf] → gain → destination) offline over a mono signal.
 * Exported for tests (the graph alone, without the limiter).
 *
 * @example await renderGraph(x, 48000, 0, null) // x unchanged (gain 1, no filter)
 */
export async function renderGraph(mono: Float32Array, sampleRate: number, gainDb: number, preEmphasis: PreEmphasis | null): Promise<Float32Array> {
  const n = mono.length;
  if (n === 0) return new Float32Array(0);
  const ctx = new OfflineAudioContext(1, n, sampleRate);
  const buffer = ctx.createBuffer(1, n, sampleRate);
  // set() rather than copyToChannel, which refuses samples in shared memory (the analysis keeps the
  // modulation source in a SharedArrayBuffer for its worker thread)
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

/**
 * Renders the coil-ready modulation signal of `clip` (module comment): mono, gained, optionally
 * pre-emphasised, limited so that every sample (and the true peak, by default) of the encoded file
 * stays at or below the ceiling. Throws InputError for options out of range (naming them) and a
 * mono clip asked for its right channel.
 *
 * @example const r = await renderModulation(clip, { gainDb: -3.4 }); r.truePeakDbtp // ≤ 0
 */
export async function renderModulation(clip: AudioClip, opts: RenderOptions): Promise<RenderedModulation> {
  checkOptions(clip, opts);
  const channel = opts.channel ?? 'mix';
  if (channel === 'right' && clip.channels.length < 2) {
    throw new InputError('bad-arguments', 'the right channel was asked of a mono clip; use the mix or the left channel');
  }
  const fs = clip.sampleRate;
  const preEmphasis = opts.preEmphasis ?? null;
  const graph = await renderGraph(modulationSource(clip, channel), fs, opts.gainDb, preEmphasis);
  const beforeLimiter = { samplePeakDbfs: ampToDb(samplePeakLinear(graph)), truePeakDbtp: ampToDb(channelTruePeakLinear(graph)) };
  if (opts.noLimiter) {
    return { sampleRate: fs, samples: graph, channel, gainDb: opts.gainDb, preEmphasis, limiter: null, beforeLimiter, ...beforeLimiter };
  }
  const ceilingDbfs = opts.ceilingDbfs ?? 0;
  const truePeak = opts.truePeak ?? true;
  const q = quantisationMargin(opts.format ?? 's16');
  const working = dbToAmp(ceilingDbfs) - q * (truePeak ? ANNEX2_ABS_TAP_SUM : 1);
  const lookAheadS = opts.lookAheadS ?? DEFAULT_LOOKAHEAD_S;
  const releaseS = opts.releaseS ?? DEFAULT_RELEASE_S;
  const r = lookAheadLimit(graph, fs, { ceiling: working, truePeak, lookAheadS, releaseS }, graph);
  const tp = truePeak ? r.truePeak : channelTruePeakLinear(r.output);
  return {
    sampleRate: fs,
    samples: r.output,
    channel,
    gainDb: opts.gainDb,
    preEmphasis,
    limiter: {
      ceilingDbfs,
      workingCeilingDbfs: ampToDb(working),
      truePeak,
      lookAheadS,
      releaseS,
      limitedSamples: r.limitedSamples,
      limitedFraction: r.output.length ? r.limitedSamples / r.output.length : 0,
      deepFraction: r.output.length ? r.deepSamples / r.output.length : 0,
      maxReductionDb: r.maxReductionDb,
      passes: r.passes,
    },
    beforeLimiter,
    samplePeakDbfs: ampToDb(r.samplePeak),
    truePeakDbtp: ampToDb(tp),
  };
}

/**
 * Encodes a render as a mono WAV (RIFF/WAVE, `fmt `, `data`; see server/audio/wav.ts): 16-bit with
 * TPDF dither, 24-bit, or 32-bit float. `seed` makes the dither reproducible (default 1).
 * @example const bytes = encodeRender(r, 's24'); await writeWavAtomic('out.wav', bytes)
 */
export function encodeRender(r: RenderedModulation, format: WavSampleFormat, seed = 1): Uint8Array {
  return encodeWav({ sampleRate: r.sampleRate, channels: [r.samples] }, { format, seed });
}
