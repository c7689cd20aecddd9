/**
 * The exact skip of channelTruePeakLinear / oversampledPeakLinear must give the same number as
 * filtering every output position. The reference below is written independently: it evaluates
 * y[4n + p] = Σ_{k=0}^{11} h_p[k]·x[n − k] (BS.1770-4 Annex 2) at every n = 0 … N + 10, zeros outside.
 * Both sum the taps in the same order (k = 0 … 11), so the results must be identical, not merely
 * close: exact equality is the property under test.
 */
import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import { TRUE_PEAK_PHASES, channelTruePeakLinear, oversampledPeakLinear } from '../../../shared/dsp/true-peak.ts';
import { lcg, musicLike } from './loudness-test-signals.ts';

function bruteForce(x: Float32Array, includeSamples: boolean): number {
  let m = 0;
  for (let n = 0; n < x.length + 11; n++) {
    for (const h of TRUE_PEAK_PHASES) {
      let acc = 0;
      for (let k = 0; k < 12; k++) acc += h[k] * (n - k >= 0 && n - k < x.length ? x[n - k] : 0);
      m = Math.max(m, Math.abs(acc));
    }
  }
  if (includeSamples) for (const v of x) m = Math.max(m, Math.abs(v));
  return m;
}

const check = (x: Float32Array) => {
  expect(channelTruePeakLinear(x)).toBe(bruteForce(x, true));
  expect(oversampledPeakLinear(x)).toBe(bruteForce(x, false));
};

describe('exact skipping in the true-peak kernel', () => {
  it('is identical to brute force on random signals of any length', () => {
    fc.assert(
      fc.property(
        fc.array(fc.float({ min: -1, max: 1, noNaN: true }), { minLength: 0, maxLength: 300 }),
        fc.double({ min: 1e-3, max: 1, noNaN: true }),
        (values, scale) => check(Float32Array.from(values, (v) => v * scale)),
      ),
      { numRuns: 200, seed: 3 },
    );
  });

  it('is identical to brute force on sparse spikes (most runs skippable)', () => {
    const rnd = lcg(9);
    for (let t = 0; t < 20; t++) {
      const x = new Float32Array(2000);
      for (let i = 0; i < x.length; i++) x[i] = (rnd() - 0.5) * 0.01;
      for (let s = 0; s < 5; s++) x[Math.floor(rnd() * x.length)] = rnd() * 2 - 1;
      check(x);
    }
  });

  it('finds worst-case bursts that beat a louder sample elsewhere (the bound must be tight enough)', () => {
    // x[n0 − k] = A·sign(h_p[k]) drives branch p to A·Σ|h_p[k]| (1.43 or 2.02 × A), the largest any
    // 12 samples of amplitude A can give. A lone sample of r·A, r = 1 + 0.999·(Σ|h_p| − 1), elsewhere
    // sets the sample peak just under that: a skip bound smaller than Σ|h_p|·max|x| by more than
    // ~0.05 %, or a window that misses inputs, would skip the burst and return r·A.
    const rnd = lcg(5);
    for (let t = 0; t < 60; t++) {
      const p = t % 4;
      const h = TRUE_PEAK_PHASES[p];
      const sumAbs = h.reduce((s, v) => s + Math.abs(v), 0);
      const x = new Float32Array(40 + Math.floor(rnd() * 200));
      const a = 0.25;
      const n0 = 11 + Math.floor(rnd() * (x.length - 11));
      for (let k = 0; k < 12; k++) x[n0 - k] = a * Math.sign(h[k]);
      const spikeAt = (n0 + 30 + Math.floor(rnd() * 100)) % x.length;
      if (spikeAt > n0 || spikeAt < n0 - 11) x[spikeAt] = a * (1 + (sumAbs - 1) * 0.999);
      check(x);
      // The burst reaches at least A·Σ|h_p| (another branch may respond even more), above the spike.
      expect(channelTruePeakLinear(x)).toBeGreaterThanOrEqual(a * sumAbs * (1 - 1e-12));
    }
  });

  it('is identical to brute force on music-like audio (3 s, 44.1 kHz, two seeds)', () => {
    for (const seed of [1, 2]) check(musicLike(3, 44100, seed, 0.95));
  });
});
