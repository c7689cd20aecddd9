import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import { InputError } from '../../../shared/errors.ts';
import { kWeight, kWeightingCoeffs, kWeightingGainDb } from '../../../shared/dsp/k-weighting.ts';
import {
  defaultChannelWeights,
  kWeightedSubBlockSums,
  kWeightedSubBlockSumsPair,
  measureLoudness,
  subBlockEdges,
} from '../../../shared/dsp/loudness.ts';
import { lcg, musicLike, steppedTone } from './loudness-test-signals.ts';

describe('measureLoudness calibration', () => {
  it('reads a stereo 997 Hz sine at −23 dBFS as −23.000 LUFS at 48 kHz', () => {
    // ITU-R BS.1770-4 Annex 1: the −0.691 offset makes a 997 Hz tone read its level; [calc]
    // −22.99998 (reference_values.py). ±0.001 LU: the block-to-block ripple of a tone that is not
    // periodic in 100 ms stays far below that.
    const x = steppedTone([[10, -23]], 48000, 997);
    const r = measureLoudness([x, x], 48000);
    expect(Math.abs(r.integratedLufs - -23)).toBeLessThan(1e-3);
  });

  it('reads the same tone at 44.1 kHz as −23.001 LUFS', () => {
    // Same prototypes at 44.1 kHz; [calc] −23.00104 (bilinear warping moves the 997 Hz gain by 0.001 dB);
    // ±5e-4 LU as above.
    const x = steppedTone([[10, -23]], 44100, 997);
    const r = measureLoudness([x, x], 44100);
    expect(Math.abs(r.integratedLufs - -23.00104)).toBeLessThan(5e-4);
  });

  it('reads 0 dBFS 997 Hz in one front channel as −3.01 LKFS', () => {
    // ITU-R BS.1770-4 Annex 1 (note on the −0.691 constant): a 0 dBFS tone at 997 Hz into the left,
    // centre or right channel reads −3.01 LKFS. ±0.005 (toBeCloseTo 2 decimals): −3.0103 exactly.
    const x = steppedTone([[3, 0]], 48000, 997);
    const silent = new Float32Array(x.length);
    expect(measureLoudness([x], 48000).integratedLufs).toBeCloseTo(-3.01, 2);
    expect(measureLoudness([silent, x], 48000).integratedLufs).toBeCloseTo(-3.01, 2);
    expect(measureLoudness([silent, silent, x], 48000).integratedLufs).toBeCloseTo(-3.01, 2);
  });

  it('follows the K-weighting gain at other sample rates, including 11025 Hz (100 ms = 1102.5 samples)', () => {
    // Steady stereo tone: L = 20·log10(A) − 3.0103 + 3.0103 + K(f) − 0.691 (BS.1770-4 Annex 1 formula);
    // block ripple and uneven sub-blocks stay below 0.002 LU for a 1 kHz tone.
    for (const fs of [8000, 11025, 44100, 96000]) {
      const x = steppedTone([[4, -20]], fs, 1000);
      const expected = -20 + kWeightingGainDb(1000, fs) - 0.691;
      expect(Math.abs(measureLoudness([x, x], fs).integratedLufs - expected)).toBeLessThan(2e-3);
    }
  });
});

describe('measureLoudness channel weights', () => {
  const tone = steppedTone([[2, 0]], 48000, 997);
  const silent = new Float32Array(tone.length);

  it('uses the BS.1770-4 defaults and order for 5 and 6 channels', () => {
    // BS.1770-4 Annex 1 channel weights: surround 1.41 → −3.01 + 10·log10(1.41) = −1.518 LKFS; LFE excluded.
    expect(defaultChannelWeights(5)).toEqual([1, 1, 1, 1.41, 1.41]);
    expect(defaultChannelWeights(6)).toEqual([1, 1, 1, 0, 1.41, 1.41]);
    const five = measureLoudness([silent, silent, silent, tone, silent], 48000).integratedLufs;
    expect(Math.abs(five - (-3.0103 + 10 * Math.log10(1.41)))).toBeLessThan(0.005);
    const lfe = measureLoudness([silent, silent, silent, tone, silent, silent], 48000);
    expect(lfe.integratedLufs).toBe(-Infinity);
    const rs = measureLoudness([silent, silent, silent, silent, silent, tone], 48000).integratedLufs;
    expect(Math.abs(rs - five)).toBeLessThan(1e-9);
  });

  it('takes explicit weights and refuses ambiguous layouts without them', () => {
    const quad = [tone, tone, silent, silent];
    expect(() => measureLoudness(quad, 48000)).toThrow(InputError);
    const r = measureLoudness(quad, 48000, { channelWeights: [1, 0, 1.41, 1.41] });
    expect(Math.abs(r.integratedLufs - -3.0103)).toBeLessThan(0.005);
    expect(() => measureLoudness([tone], 48000, { channelWeights: [1, 1] })).toThrow(RangeError);
    expect(() => measureLoudness([tone], 48000, { channelWeights: [-1] })).toThrow(RangeError);
  });
});

describe('measureLoudness time grid', () => {
  it('counts only complete 100 ms sub-blocks (BS.1770-4 blocks never pass the end)', () => {
    const x = steppedTone([[1, -20]], 48000, 1000);
    const longer = new Float32Array(x.length + 2400); // + 50 ms of full-scale noise: not a whole sub-block
    longer.set(x);
    for (let i = x.length; i < longer.length; i++) longer[i] = i % 2 ? 1 : -1;
    const a = measureLoudness([x], 48000);
    const b = measureLoudness([longer], 48000);
    expect(b.momentaryLufs.length).toBe(7);
    expect(Array.from(b.momentaryLufs)).toEqual(Array.from(a.momentaryLufs));
    expect(b.integratedLufs).toBe(a.integratedLufs);
  });

  it('indexes windows by their start: window j covers [0.1j, 0.1j + 0.4] s', () => {
    // 1 s of silence then 1 s of tone: windows ending by 1.0 s are silent; window 7 ([0.7, 1.1] s)
    // holds 0.1 s of tone, a quarter of the energy: 10·log10(1/4) = −6.02 dB below the steady level
    // (±0.05 for the filter's onset transient).
    const x = steppedTone([
      [1, -100],
      [1, -20],
    ]);
    x.fill(0, 0, 48000);
    const m = measureLoudness([x], 48000).momentaryLufs;
    for (let j = 0; j <= 6; j++) expect(m[j]).toBe(-Infinity);
    expect(Math.abs(m[7] - (m[16] - 6.0206))).toBeLessThan(0.05);
  });

  it('returns −Infinity and empty series for silence and clips under 400 ms', () => {
    const silence = measureLoudness([new Float32Array(48000 * 4)], 48000);
    expect(silence.integratedLufs).toBe(-Infinity);
    expect(silence.maxMomentaryLufs).toBe(-Infinity);
    expect(silence.loudnessRangeLu).toBe(0);
    const short = measureLoudness([steppedTone([[0.39, -20]])], 48000);
    expect(short.momentaryLufs.length).toBe(0);
    expect(short.shortTermLufs.length).toBe(0);
    expect(short.integratedLufs).toBe(-Infinity);
    expect(short.maxShortTermLufs).toBe(-Infinity);
    expect(short.blockHopS).toBe(0.1);
  });

  it('places sub-block edges at round(k·fs/10)', () => {
    expect(Array.from(subBlockEdges(44100, 10000))).toEqual([0, 4410, 8820]);
    expect(Array.from(subBlockEdges(11025, 3400))).toEqual([0, 1103, 2205, 3308]);
    expect(Array.from(subBlockEdges(48000, 4799))).toEqual([0]);
  });

  it('fused kernel equals K-weighting then summing squares', () => {
    const fs = 44100;
    const x = musicLike(1, fs, 3);
    const edges = subBlockEdges(fs, x.length);
    const sums = kWeightedSubBlockSums(x, kWeightingCoeffs(fs), edges, new Float64Array(edges.length - 1));
    const y = kWeight(x, fs);
    for (let k = 0; k + 1 < edges.length; k++) {
      let e = 0;
      for (let i = edges[k]; i < edges[k + 1]; i++) e += y[i] * y[i];
      // Same filter arithmetic; the sums agree to rounding (1e-12 relative).
      expect(sums[k] / e).toBeCloseTo(1, 12);
    }
  });

  it('two-channel kernel adds exactly what two single-channel calls add', () => {
    // Reference: kWeightedSubBlockSums on each channel. The pair kernel runs the same operations in
    // the same order per channel, so the sums must be identical, not merely close. 11025 Hz gives
    // uneven sub-blocks; the 0.3 s burst then silence drives the state below the 1e-150 flush.
    for (const fs of [11025, 44100]) {
      const a = musicLike(2, fs, 5);
      const b = new Float32Array(a.length);
      const rnd = lcg(8);
      for (let i = 0; i < Math.round(0.3 * fs); i++) b[i] = rnd() * 2 - 1;
      const edges = subBlockEdges(fs, a.length);
      const coeffs = kWeightingCoeffs(fs);
      for (const [x, z] of [[a, b], [b, a]]) {
        const single = [x, z].map((ch) => kWeightedSubBlockSums(ch, coeffs, edges, new Float64Array(edges.length - 1)));
        const pair = [new Float64Array(edges.length - 1), new Float64Array(edges.length - 1)];
        kWeightedSubBlockSumsPair(x, z, coeffs, edges, pair[0], pair[1]);
        expect(Array.from(pair[0])).toEqual(Array.from(single[0]));
        expect(Array.from(pair[1])).toEqual(Array.from(single[1]));
      }
      const burst = kWeightedSubBlockSums(b, coeffs, edges, new Float64Array(edges.length - 1));
      expect(burst[burst.length - 1]).toBe(0); // the state was flushed, not left to decay
    }
  });

  it('filters channels two at a time without changing the channel sum (odd counts, weight 0)', () => {
    // BS.1770-4 Annex 1: a block's energy Σ Gᵢ·zᵢ is linear in the channels, so the momentary energy
    // of [a, b, c] (a pair and a single) is that of [a, b] plus that of [c], to rounding (1e-12
    // relative); a weight-0 channel is skipped, so [a, b, c] weighted [1, 0, 1] is [a, c] exactly.
    const fs = 16000;
    const [a, b, c] = [1, 2, 3].map((seed) => musicLike(4, fs, seed, 0.5));
    const energy = (lufs: number) => Math.pow(10, (lufs + 0.691) / 10);
    const abc = measureLoudness([a, b, c], fs).momentaryLufs;
    const ab = measureLoudness([a, b], fs).momentaryLufs;
    const cOnly = measureLoudness([c], fs).momentaryLufs;
    expect(abc.length).toBe(37);
    for (let j = 0; j < abc.length; j++) {
      expect(energy(abc[j]) / (energy(ab[j]) + energy(cOnly[j]))).toBeCloseTo(1, 12);
    }
    const ac = measureLoudness([a, c], fs);
    const a0c = measureLoudness([a, b, c], fs, { channelWeights: [1, 0, 1] });
    expect(Array.from(a0c.momentaryLufs)).toEqual(Array.from(ac.momentaryLufs));
    expect(a0c.integratedLufs).toBe(ac.integratedLufs);
  });
});

describe('measureLoudness properties', () => {
  it('a gain of g dB moves integrated, momentary and short-term loudness by g LU', () => {
    // Linearity of the BS.1770-4 formula and of both gates. Tolerance 1e-6 LU: rounding the scaled
    // samples to float32 (2^-24 relative) moves a mean square by at most ~1.2e-7 → 5e-7 dB.
    const fs = 16000;
    const base = musicLike(4, fs, 11, 0.5);
    const ref = measureLoudness([base], fs);
    fc.assert(
      fc.property(fc.double({ min: -30, max: 5, noNaN: true }), (g) => {
        const k = Math.pow(10, g / 20);
        const r = measureLoudness([Float32Array.from(base, (v) => v * k)], fs);
        expect(Math.abs(r.integratedLufs - ref.integratedLufs - g)).toBeLessThan(1e-6);
        expect(Math.abs(r.maxMomentaryLufs - ref.maxMomentaryLufs - g)).toBeLessThan(1e-6);
        expect(Math.abs(r.shortTermLufs[5] - ref.shortTermLufs[5] - g)).toBeLessThan(1e-6);
        expect(Math.abs(r.loudnessRangeLu - ref.loudnessRangeLu)).toBeLessThan(1e-6);
      }),
      { numRuns: 25, seed: 42 },
    );
  });
});

describe('measureLoudness validation', () => {
  it('names the problem', () => {
    const x = new Float32Array(48000);
    expect(() => measureLoudness([], 48000)).toThrow(RangeError);
    expect(() => measureLoudness([x, new Float32Array(10)], 48000)).toThrow(/channels\[1\] has 10 samples/);
    expect(() => measureLoudness([new Float64Array(10) as unknown as Float32Array], 48000)).toThrow(TypeError);
    expect(() => measureLoudness([x], 0)).toThrow(RangeError);
    expect(() => measureLoudness([x], 4000)).toThrow(InputError);
  });
});
