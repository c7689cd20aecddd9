import { createRequire } from 'node:module';
import { describe, expect, it } from 'vitest';
import { welchPsd } from '../../../shared/dsp/welch.ts';
import { hannWindow } from '../../../shared/dsp/window.ts';
import { uniformNoise } from './uniform-noise.ts';

function tones(n: number, fs: number, parts: { hz: number; amp: number; phase?: number }[]): Float32Array {
  const out = new Float32Array(n);
  for (let i = 0; i < n; i++) {
    let v = 0;
    for (const p of parts) v += p.amp * Math.sin((2 * Math.PI * p.hz * i) / fs + (p.phase ?? 0));
    out[i] = v;
  }
  return out;
}

const integral = (psd: Float64Array, binHz: number) => psd.reduce((s, v) => s + v, 0) * binHz;
const meanSquare = (x: Float32Array) => x.reduce((s, v) => s + v * v, 0) / x.length;

/** The mean square Welch's scaling must reproduce exactly: Σ_segments Σ_n (w·x)² / (S·Σw²). */
function windowedMeanSquare(x: Float32Array, size: number): number {
  const w = hannWindow(size);
  const sumW2 = w.reduce((s, v) => s + v * v, 0);
  const segs = Math.floor((x.length - size) / (size / 2)) + 1;
  let acc = 0;
  for (let s = 0; s < segs; s++) {
    for (let i = 0; i < size; i++) acc += (w[i] * x[s * (size / 2) + i]) ** 2;
  }
  return acc / (segs * sumW2);
}

describe('welchPsd: Parseval in density form (Welch 1967; Σ psd·binHz = mean square)', () => {
  it('white noise: equals the Hann-weighted mean square to 1e-10 and the plain mean square to 2 %', () => {
    const x = uniformNoise(65536 + 1000, 0.5, 2024);
    const s = welchPsd(x, 44100);
    expect(s.size).toBe(4096);
    expect(s.segments).toBe(Math.floor((x.length - 4096) / 2048) + 1);
    const got = integral(s.psd, s.binHz);
    // exact identity up to float64 rounding
    expect(Math.abs(got - windowedMeanSquare(x, 4096)) / got).toBeLessThan(1e-10);
    // statistical: the Hann weighting uses the samples unevenly; for 66k uniform samples the relative
    // standard error of the mean square is ≈ 0.9/√66000 ≈ 0.4 %, so 2 % is five sigma
    expect(Math.abs(got - meanSquare(x)) / meanSquare(x)).toBeLessThan(0.02);
    // expected mean square of uniform noise on [−0.5, 0.5): 0.5²/3 (textbook: variance of a uniform)
    expect(Math.abs(got - 0.25 / 3) / (0.25 / 3)).toBeLessThan(0.02);
  });

  it('white noise is flat: mean density ≈ mean square / (fs/2) in every decade band', () => {
    const fs = 48000;
    const x = uniformNoise(48000 * 4, 1, 7);
    const s = welchPsd(x, fs, { size: 1024 });
    const level = meanSquare(x) / (fs / 2);
    for (const [lo, hi] of [[100, 1000], [1000, 10000], [10000, 23000]]) {
      let sum = 0;
      let count = 0;
      for (let k = 0; k < s.psd.length; k++) {
        if (s.frequencyHz[k] >= lo && s.frequencyHz[k] < hi) {
          sum += s.psd[k];
          count++;
        }
      }
      // ≥ 19 bins × 374 segments averaged: the mean's relative scatter is below 2 %; allow 6 %
      expect(Math.abs(sum / count / level - 1)).toBeLessThan(0.06);
    }
  });

  it('multi-tone: the integral is Σ A²/2 (mean square of a sum of sines at distinct frequencies) to 1e-4', () => {
    const fs = 44100;
    const parts = [
      { hz: 110, amp: 0.5 },
      { hz: 1234.5, amp: 0.2, phase: 1 },
      { hz: 9000, amp: 0.1, phase: 2 },
    ];
    const x = tones(fs * 2, fs, parts);
    const s = welchPsd(x, fs);
    const expected = parts.reduce((t, p) => t + p.amp ** 2 / 2, 0); // 0.1475
    // tones are ≥ 10 bins apart and far from DC, so the Hann-weighted cross terms are ~1e-7
    expect(Math.abs(integral(s.psd, s.binHz) - expected) / expected).toBeLessThan(1e-4);
  });
});

describe('welchPsd: a sine', () => {
  it('on a bin centre: peak (A²/2)/(binHz·ENBW) with Hann ENBW 1.5 bins (Harris 1978), in its bin', () => {
    const fs = 48000;
    const size = 4096;
    const k = 200; // 2343.75 Hz
    const a = 0.5;
    const x = tones(fs, fs, [{ hz: (k * fs) / size, amp: a, phase: 0.3 }]);
    const s = welchPsd(x, fs, { size });
    let peak = 0;
    for (let i = 1; i < s.psd.length; i++) if (s.psd[i] > s.psd[peak]) peak = i;
    expect(peak).toBe(k);
    expect(s.frequencyHz[peak]).toBeCloseTo(2343.75, 9);
    // on-bin Hann: exactly three non-zero bins (k, k±1): float32 input rounding only, 1e-6
    const expectedPeak = a ** 2 / 2 / (s.binHz * 1.5);
    expect(Math.abs(s.psd[k] / expectedPeak - 1)).toBeLessThan(1e-6);
    const three = (s.psd[k - 1] + s.psd[k] + s.psd[k + 1]) * s.binHz;
    expect(Math.abs(three / (a ** 2 / 2) - 1)).toBeLessThan(1e-6);
    expect(s.psd[k + 5] / s.psd[k]).toBeLessThan(1e-12);
  });

  it('1 kHz at 48 kHz, size 4096: peak in bin round(1000/11.71875) = 85, power within ±4 bins ≈ A²/2', () => {
    const fs = 48000;
    const a = 0.25;
    const x = tones(fs * 2, fs, [{ hz: 1000, amp: a }]);
    const s = welchPsd(x, fs);
    let peak = 0;
    for (let i = 1; i < s.psd.length; i++) if (s.psd[i] > s.psd[peak]) peak = i;
    expect(peak).toBe(85);
    let p = 0;
    for (let i = peak - 4; i <= peak + 4; i++) p += s.psd[i] * s.binHz;
    // Hann leakage beyond ±4 bins of a tone 1/3 bin off-centre is below 1e-4 of its power
    expect(Math.abs(p / (a ** 2 / 2) - 1)).toBeLessThan(1e-3);
    // scallop: 1/3 bin off-centre the peak bin reads below the on-bin peak, by less than the 1.42 dB
    // half-bin scallop loss of Hann (Harris 1978)
    const ratioDb = 10 * Math.log10(s.psd[peak] / (a ** 2 / 2 / (s.binHz * 1.5)));
    expect(ratioDb).toBeLessThan(0);
    expect(ratioDb).toBeGreaterThan(-1.43);
  });
});

describe('welchPsd: short and bad input', () => {
  it('a signal shorter than one segment is one zero-padded segment and keeps Parseval', () => {
    const x = uniformNoise(1000, 1, 3);
    const s = welchPsd(x, 8000, { size: 4096 });
    expect(s.segments).toBe(1);
    expect(s.size).toBe(4096);
    expect(s.psd.length).toBe(2049);
    const w = hannWindow(1000);
    let num = 0;
    let den = 0;
    for (let i = 0; i < 1000; i++) {
      num += (w[i] * x[i]) ** 2;
      den += w[i] ** 2;
    }
    expect(Math.abs(integral(s.psd, s.binHz) / (num / den) - 1)).toBeLessThan(1e-10);
  });

  it('tiny signals (1–3 samples) use a rectangular window: Σ psd·binHz = mean square', () => {
    const x = Float32Array.of(0.5, -0.25);
    const s = welchPsd(x, 1000, { size: 8 });
    expect(integral(s.psd, s.binHz)).toBeCloseTo((0.25 + 0.0625) / 2, 12);
  });

  it('exactly one segment and a DC signal: all power in bin 0', () => {
    const x = new Float32Array(256).fill(0.5);
    const s = welchPsd(x, 1000, { size: 256 });
    expect(s.segments).toBe(1);
    expect(s.psd[0] * s.binHz).toBeCloseTo(0.25 * (1 / 1.5), 9); // DC sees bins 0 and 1 of the Hann kernel
    expect(integral(s.psd, s.binHz)).toBeCloseTo(0.25, 9);
  });

  it('rejects empty input, bad sizes and sample rates', () => {
    expect(() => welchPsd(new Float32Array(0), 44100)).toThrow(/empty/);
    expect(() => welchPsd(new Float32Array(10), 44100, { size: 1000 })).toThrow(/opts.size/);
    expect(() => welchPsd(new Float32Array(10), 0)).toThrow(/sampleRate/);
    expect(() => welchPsd(new Float32Array(10), Number.NaN)).toThrow(RangeError);
  });
});

// fft-js (devDependency), a separate recursive radix-2 FFT, as the oracle for each segment's DFT.
const oracle = createRequire(import.meta.url)('fft-js') as { fft(x: number[]): [number, number][] };

describe('welchPsd: each bin against periodograms from an independent FFT', () => {
  // Segments are transformed two at a time (forwardPair) with an odd one alone: 5 and 6 segments
  // cover both. Reference: the module comment's formula with the oracle's DFT of every Hann-windowed
  // segment. Tolerance 1e-12 relative to the largest bin: two FFTs of 64 points differ by rounding only.
  for (const segments of [5, 6]) {
    it(`${segments} segments of 64: psd[k] = cₖ·mean|DFT(w·x)|²/(fs·Σw²) in every bin`, () => {
      const size = 64;
      const fs = 8000;
      const x = uniformNoise(size + (segments - 1) * (size / 2) + 7, 0.7, 31 + segments);
      const s = welchPsd(x, fs, { size });
      expect(s.segments).toBe(segments);
      const w = hannWindow(size);
      const sumW2 = w.reduce((a, v) => a + v * v, 0);
      const want = new Float64Array(size / 2 + 1);
      for (let g = 0; g < segments; g++) {
        const X = oracle.fft(Array.from({ length: size }, (_, i) => w[i] * x[g * (size / 2) + i]));
        for (let k = 0; k <= size / 2; k++) want[k] += X[k][0] ** 2 + X[k][1] ** 2;
      }
      for (let k = 0; k <= size / 2; k++) want[k] *= (k === 0 || k === size / 2 ? 1 : 2) / (segments * fs * sumW2);
      const top = Math.max(...want);
      for (let k = 0; k <= size / 2; k++) expect(Math.abs(s.psd[k] - want[k])).toBeLessThan(1e-12 * top);
    });
  }
});
