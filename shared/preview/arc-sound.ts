/**
 * The arc-sound preview: an audio rendering of what the arcs would sound like, for listening before
 * anything is switched on.
 *
 * Rail schemes: the arcs sound because the power they receive varies. Per sample, the rail as a
 * fraction of the supply u = clamp(1 + g·x, 0, 2)/2 (v = (V_s/2)(1 + g·x) confined to 0…V_s,
 * shared/plan/evaluate.ts), the delivered power as a fraction of full power p = u² (resistive
 * equivalent, P = (I_full/V_s)·v²), its variation p − mean(p) (the steady part is silent), then
 * band-limited by the coil: a resonant tank's envelope follows its drive as a first-order low-pass
 * with time constant τ = Q/(π·f0), i.e. corner f_c = f0/(2Q) (the coil's modulation corner,
 * shared/physics/coil/resonance.ts). The low-pass is applied to the power variation, a simple
 * reading of "the arcs cannot follow faster than the tank": filtering the rail before squaring
 * would differ only in the small second-harmonic term.
 *
 * The first-order low-pass is discretised by the matched-z transform (pole s = −2π·f_c mapped to
 * z = e^(−2π·f_c/fs)), with unit gain at DC:
 *   y[n] = (1 − α)·x[n] + α·y[n−1],  α = e^(−2π·f_c/fs)
 * Its magnitude is within 0.15 dB of the analogue |H| = 1/√(1 + (f/f_c)²) for f ≤ fs/10 whenever
 * f_c ≤ fs/20 (computed, see the tests); it flattens towards Nyquist where the analogue keeps
 * falling (it does not warp the corner as the bilinear transform would, nor put a zero at Nyquist).
 * Source: matched-z transform, Oppenheim & Schafer, *Discrete-Time Signal Processing* [recalled];
 * first-order response, any circuits textbook.
 *
 * Pulse scheme: the pulse train itself at audio rate: sample n holds the fraction of its period
 * [n/fs, (n+1)/fs) covered by pulses (rectangular pulses of the on-times, integrated over each
 * sample, so on-times shorter than a sample keep their area), with its mean removed (DC is silent
 * and only costs headroom).
 *
 * Level: the result is scaled for listening as loud as it may be while its sample peak, true peak
 * (BS.1770-4 Annex 2) and RMS stay at or below the ORIGINAL modulation source's: never louder than
 * the music it came from.
 */
import { TRUE_PEAK_PHASES, TruePeakMeter, channelTruePeakLinear, samplePeakLinear } from '../dsp/true-peak.ts';
import type { CoilAtResonance } from '../physics/driver/types.ts';
import { type PulseEvents, pulseLimitsFor, pulsesAtGain, zeroCrossingEvents } from '../plan/pulse-train.ts';
import type { DriverProfile } from '../schemas/driver.ts';
import { type SampleBlocks, arraySamples } from './sample-blocks.ts';
import { dbToAmp } from '../units.ts';

/** Coefficients of the matched-z one-pole low-pass: y[n] = b0·x[n] + α·y[n−1], b0 = 1 − α. */
export interface OnePoleLowpass {
  cornerHz: number;
  sampleRate: number;
  /** Pole, e^(−2π·f_c/fs). */
  alpha: number;
  b0: number;
}

/**
 * Matched-z first-order low-pass at `cornerHz` (module comment): α = e^(−2π·f_c/fs), b0 = 1 − α
 * (unit DC gain). RangeError for a non-positive corner or rate.
 * @example onePoleLowpass(1000, 48000).alpha // e^(−2π/48) = 0.8773
 */
export function onePoleLowpass(cornerHz: number, sampleRate: number): OnePoleLowpass {
  if (!(Number.isFinite(cornerHz) && cornerHz > 0)) throw new RangeError(`onePoleLowpass: cornerHz must be > 0 Hz, got ${cornerHz}`);
  if (!(Number.isFinite(sampleRate) && sampleRate > 0)) throw new RangeError(`onePoleLowpass: sampleRate must be > 0 Hz, got ${sampleRate}`);
  const alpha = Math.exp((-2 * Math.PI * cornerHz) / sampleRate);
  return { cornerHz, sampleRate, alpha, b0: 1 - alpha };
}

/**
 * Magnitude of the matched-z one-pole at `freqHz`: (1 − α)/|1 − α·e^(−jω)|, ω = 2π·f/fs, linear.
 * @example onePoleGain(onePoleLowpass(1000, 48000), 0) // 1
 */
export function onePoleGain(lp: OnePoleLowpass, freqHz: number): number {
  const w = (2 * Math.PI * freqHz) / lp.sampleRate;
  const a = lp.alpha;
  return lp.b0 / Math.sqrt(1 - 2 * a * Math.cos(w) + a * a);
}

/**
 * Filters `input` through the one-pole from rest (y[−1] = 0) into `out` (may be `input`).
 * @example filterOnePole(onePoleLowpass(100, 48000), step) // rises as 1 − α^(n+1)
 */
export function filterOnePole(lp: OnePoleLowpass, input: Float32Array | Float64Array, out: Float64Array = new Float64Array(input.length)): Float64Array {
  const { alpha, b0 } = lp;
  let y = 0;
  for (let i = 0; i < input.length; i++) {
    y = b0 * input[i] + alpha * y;
    out[i] = y;
  }
  return out;
}

/** Sample peak, true peak and RMS of a signal, linear full scale. */
export interface LevelTriple {
  samplePeak: number;
  truePeak: number;
  rms: number;
}

/** Sample peak, BS.1770-4 true peak and RMS of `x`, linear. */
export function levelTriple(x: Float32Array): LevelTriple {
  let s2 = 0;
  for (let i = 0; i < x.length; i++) s2 += x[i] * x[i];
  return { samplePeak: samplePeakLinear(x), truePeak: channelTruePeakLinear(x), rms: x.length ? Math.sqrt(s2 / x.length) : 0 };
}

/** The arc-sound preview: mono samples at the source's rate, linear full scale, with how they were levelled. */
export interface ArcSound {
  sampleRate: number;
  samples: Float32Array;
  scheme: DriverProfile['scheme'];
  gainDb: number;
  /** The envelope corner f0/(2Q), Hz (rail schemes; null for pulses). */
  cornerHz: number | null;
  /** Scale from the model's units (fraction of full power) to the output, linear. */
  scale: number;
  /** Which of the source's levels set the scale ('silence': nothing to hear). */
  limitedBy: 'sample-peak' | 'true-peak' | 'rms' | 'silence';
  /** Levels of the original modulation source and of the preview, linear full scale. */
  source: LevelTriple;
  output: LevelTriple;
  /** Pulse scheme: pulses rendered. */
  pulseCount: number | null;
}

/** max over branches of Σ|h_p[k]| of the BS.1770-4 Annex 2 filter: how far a bounded error can move the true peak. */
const ANNEX2_ABS_TAP_SUM = Math.max(...TRUE_PEAK_PHASES.map((h) => h.reduce((s, v) => s + Math.abs(v), 0)));

/** Below this (fraction of full power) the variation is taken as silence, not amplified. */
const SILENCE_FLOOR = 1e-9;

/** Samples per block of {@link arcSoundBlocks}. */
const ARC_BLOCK = 65536;

/**
 * The arc-sound preview (module comment) of `source` (the modulation source, linear full scale: an
 * array, or SampleBlocks read again for each pass, shared/preview/sample-blocks.ts) on `driver` and
 * `coil` at `gainDb`, made block by block: one pass for the mean of the modelled power and the
 * source's levels, one for the preview's levels before scaling, one that hands the scaled blocks to
 * `sink` in order (the array is reused: copy what you keep). The one-pole's state and the true-peak
 * meter's history carry across blocks, so the samples equal those of one pass over the whole
 * signal; memory is a few blocks. `pulseEvents` (pulse scheme) default to the zero crossings of an
 * array source (SampleBlocks need them given). `peakMargin` (linear, default 0) is kept below the
 * source's sample peak (and ANNEX2 Σ|h| ≈ 2.02 times it below its true peak) for a later
 * quantisation that moves samples by up to that much (16-bit dither: 1.5 LSB). RangeError for an
 * empty source, a NaN gain, bad coil figures, or pulse-scheme SampleBlocks without pulse events.
 *
 * @example arcSoundBlocks(source, 44100, DEMO_DRIVER_LINEAR, coil, -3, {}, (b) => encoder.write(b)).limitedBy
 */
export function arcSoundBlocks(
  source: Float32Array | SampleBlocks,
  sampleRate: number,
  driver: DriverProfile,
  coil: CoilAtResonance,
  gainDb: number,
  opts: { pulseEvents?: PulseEvents; peakMargin?: number; blockSize?: number },
  sink: (block: Float32Array) => void,
): Omit<ArcSound, 'samples'> & { sampleCount: number } {
  const blocks = source instanceof Float32Array ? arraySamples(source) : source;
  const n = blocks.length;
  if (n === 0) throw new RangeError('arcSound: source has no samples');
  if (Number.isNaN(gainDb) || gainDb === Infinity) throw new RangeError(`arcSound: gainDb must be finite or −Infinity, got ${gainDb}`);
  if (!(coil.resonanceHz > 0 && coil.qualityFactor > 0)) {
    throw new RangeError(`arcSound: coil needs resonanceHz > 0 and qualityFactor > 0, got ${coil.resonanceHz}, ${coil.qualityFactor}`);
  }
  const g = dbToAmp(gainDb);
  const B = Math.max(1, Math.min(Math.floor(opts.blockSize ?? ARC_BLOCK), blocks.maxBlock));
  const work = new Float64Array(Math.min(B, n));
  const raw = new Float32Array(work.length);
  let cornerHz: number | null = null;
  let pulseCount: number | null = null;
  const rail = driver.scheme !== 'pulse';
  let lp: OnePoleLowpass | null = null;
  let train: ReturnType<typeof pulsesAtGain> | null = null;
  if (rail) {
    cornerHz = coil.resonanceHz / (2 * coil.qualityFactor);
    lp = onePoleLowpass(Math.min(cornerHz, sampleRate / 2), sampleRate);
  } else {
    if (!driver.pulse) throw new RangeError('arcSound: the pulse scheme needs driver.pulse limits');
    let events = opts.pulseEvents;
    if (events === undefined) {
      if (!(source instanceof Float32Array)) throw new RangeError('arcSound: the pulse scheme read block by block needs opts.pulseEvents');
      events = zeroCrossingEvents(source, sampleRate);
    }
    // Pulses shorter than the minimum on-time are dropped, as the planner drops them.
    train = pulsesAtGain(events, g, pulseLimitsFor(driver.pulse, coil.resonanceHz));
    pulseCount = train.count;
  }

  // The model's output before the mean is removed, for samples b0…b0+len−1, into work[0…len−1];
  // `x` is the source's block (rail schemes read it; the pulse train does not).
  let firstPulse = 0;
  const model = (b0: number, len: number, x: Float32Array | null) => {
    const b1 = b0 + len;
    if (rail) {
      const s = x ?? blocks.read(b0, len);
      for (let i = 0; i < len; i++) {
        let u = 1 + g * s[i];
        u = u < 0 ? 0 : u > 2 ? 1 : u / 2;
        work[i] = u * u;
      }
      return;
    }
    work.fill(0, 0, len);
    const t = train!;
    while (firstPulse < t.count && (t.startS[firstPulse] + t.onS[firstPulse]) * sampleRate <= b0) firstPulse++;
    for (let i = firstPulse; i < t.count; i++) {
      const a = t.startS[i] * sampleRate;
      if (a >= b1) break;
      const b = a + t.onS[i] * sampleRate;
      // Area of [a, b) falling in each sample period [k, k + 1).
      for (let k = Math.max(b0, Math.floor(a)); k < n && k < b1 && k < b; k++) {
        const lo = Math.max(a, k);
        const hi = Math.min(b, k + 1);
        if (hi > lo) work[k - b0] += hi - lo;
      }
    }
  };

  const meter = new TruePeakMeter();
  /** Levels of the blocks `make` hands to its `take`, in order. */
  const levelsOf = (make: (take: (x: Float32Array) => void) => void): LevelTriple => {
    meter.reset();
    let peak = 0;
    let s2 = 0;
    make((x) => {
      for (let i = 0; i < x.length; i++) {
        s2 += x[i] * x[i];
        const v = Math.abs(x[i]);
        if (v > peak) peak = v;
      }
      meter.add(x);
    });
    return { samplePeak: peak, truePeak: meter.value(), rms: Math.sqrt(s2 / n) };
  };

  // Pass 1: the source's levels (levelTriple's, block by block) and the mean of the modelled power
  // (or pulse coverage), summed in sample order.
  let sum = 0;
  const src = levelsOf((take) => {
    for (let b0 = 0; b0 < n; b0 += B) {
      const len = Math.min(B, n - b0);
      const x = blocks.read(b0, len);
      take(x);
      model(b0, len, x);
      for (let i = 0; i < len; i++) sum += work[i];
    }
  });
  const mean = sum / n;

  /** Runs the model with the mean removed (and the one-pole for the rail schemes) over the clip, block by block into raw. */
  const each = (use: (raw: Float32Array) => void) => {
    firstPulse = 0;
    let y = 0;
    for (let b0 = 0; b0 < n; b0 += B) {
      const len = Math.min(B, n - b0);
      model(b0, len, null);
      const r = raw.subarray(0, len);
      if (lp) {
        const { alpha, b0: c0 } = lp;
        for (let i = 0; i < len; i++) {
          y = c0 * (work[i] - mean) + alpha * y;
          r[i] = y;
        }
      } else {
        for (let i = 0; i < len; i++) r[i] = work[i] - mean;
      }
      use(r);
    }
  };

  // Pass 2: the preview's levels before scaling.
  const pre = levelsOf((take) => each(take));
  const base = { sampleRate, sampleCount: n, scheme: driver.scheme, gainDb, cornerHz, source: src, pulseCount };
  if (!(pre.samplePeak > SILENCE_FLOOR) || !(src.rms > 0)) {
    const zeros = new Float32Array(Math.min(B, n));
    for (let b0 = 0; b0 < n; b0 += B) sink(zeros.subarray(0, Math.min(B, n - b0)));
    return { ...base, scale: 0, limitedBy: 'silence', output: { samplePeak: 0, truePeak: 0, rms: 0 } };
  }
  const m = opts.peakMargin ?? 0;
  const candidates: [ArcSound['limitedBy'], number][] = [
    ['sample-peak', Math.max(0, src.samplePeak - m) / pre.samplePeak],
    ['true-peak', Math.max(0, src.truePeak - ANNEX2_ABS_TAP_SUM * m) / pre.truePeak],
    ['rms', src.rms / pre.rms],
  ];
  let [limitedBy, scale] = candidates[0];
  for (const [k, sc] of candidates) if (sc < scale) [limitedBy, scale] = [k, sc];
  // A hair under the bound so float32 rounding of the products cannot lift a level above the source's.
  scale *= 1 - 1e-6;
  // Pass 3: the scaled preview, to the sink, with its levels.
  const output = levelsOf((take) =>
    each((r) => {
      for (let i = 0; i < r.length; i++) r[i] = r[i] * scale;
      take(r);
      sink(r);
    }),
  );
  return { ...base, scale, limitedBy, output };
}

/**
 * The arc-sound preview of `source` in one array: {@link arcSoundBlocks} with its blocks collected
 * (for tests and short clips; the preview service streams the blocks to the file instead).
 *
 * @example arcSound(source, 44100, DEMO_DRIVER_LINEAR, { resonanceHz: 328e3, qualityFactor: 377 }, -3).cornerHz // ≈ 435 Hz
 */
export function arcSound(
  source: Float32Array,
  sampleRate: number,
  driver: DriverProfile,
  coil: CoilAtResonance,
  gainDb: number,
  opts: { pulseEvents?: PulseEvents; peakMargin?: number; blockSize?: number } = {},
): ArcSound {
  const samples = new Float32Array(source.length);
  let at = 0;
  const { sampleCount: _n, ...r } = arcSoundBlocks(source, sampleRate, driver, coil, gainDb, opts, (b) => {
    samples.set(b, at);
    at += b.length;
  });
  return { ...r, samples };
}
