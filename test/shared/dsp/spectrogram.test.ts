import { createRequire } from 'node:module';
import { describe, expect, it } from 'vitest';
import { bandMeans, displaySpectrogram, welchSpectrogram } from '../../../shared/dsp/spectrogram.ts';
import { welchPsd } from '../../../shared/dsp/welch.ts';
import { uniformNoise } from './uniform-noise.ts';

// fft-js (devDependency): the independent FFT the reference periodograms below are computed with.
const require = createRequire(import.meta.url);
const oracle = require('fft-js') as { fft(x: number[]): [number, number][] };


function sine(n: number, fs: number, hz: number, amp: number, phase = 0): Float32Array {
  const out = new Float32Array(n);
  for (let i = 0; i < n; i++) out[i] = amp * Math.sin((2 * Math.PI * hz * i) / fs + phase);
  return out;
}

/** Row power Σᵣ 10^(db/10)·(eᵣ₊₁ − eᵣ) of one column, FS². */
function columnPower(s: ReturnType<typeof displaySpectrogram>, c: number): number {
  let p = 0;
  for (let r = 0; r < s.rows; r++) p += 10 ** (s.db[c * s.rows + r] / 10) * (s.edgesHz[r + 1] - s.edgesHz[r]);
  return p;
}

function argmaxRow(s: ReturnType<typeof displaySpectrogram>, c: number): number {
  let best = 0;
  for (let r = 1; r < s.rows; r++) if (s.db[c * s.rows + r] > s.db[c * s.rows + best]) best = r;
  return best;
}

describe('bandMeans: mean of the piecewise-linear density over each band', () => {
  it('is exact for a linear density, including bands narrower than a bin and past the last bin', () => {
    // psd_k = k on 10 Hz bins → density f/10 up to 30 Hz, then constant 3
    const psd = Float64Array.of(0, 1, 2, 3);
    const m = bandMeans(psd, 10, Float64Array.of(5, 25, 26, 26.5, 30, 40));
    expect(m[0]).toBeCloseTo(1.5, 12); // mean of f/10 over 5…25
    expect(m[1]).toBeCloseTo(2.55, 12); // narrower than a bin: interpolated, not repeated
    expect(m[2]).toBeCloseTo(2.625, 12);
    expect(m[3]).toBeCloseTo((2.65 + 3) / 2, 12); // mean of f/10 over 26.5…30
    expect(m[4]).toBeCloseTo(3, 12); // beyond the last bin: constant
  });

  it('bands tiling 0…f_last integrate to the trapezoid sum of the bins', () => {
    const psd = Float64Array.of(4, 1, 9, 0.5, 2, 7);
    const edges = Float64Array.of(0, 3.3, 7, 19.9, 20.1, 33, 50);
    const m = bandMeans(psd, 10, edges);
    let total = 0;
    for (let r = 0; r < m.length; r++) total += m[r] * (edges[r + 1] - edges[r]);
    let trap = 0;
    for (let k = 1; k < psd.length; k++) trap += 5 * (psd[k - 1] + psd[k]);
    expect(total).toBeCloseTo(trap, 10);
  });
});

describe('displaySpectrogram', () => {
  const fs = 44100;

  it('5 s of a 1 kHz sine: 128 log rows 20 Hz…20 kHz, the 1 kHz row peaks, power A²/2 conserved', () => {
    const a = 0.5;
    const s = displaySpectrogram(sine(fs * 5, fs, 1000, a), fs, { columns: 200 });
    expect(s.columns).toBe(200);
    expect(s.rows).toBe(128);
    expect(s.edgesHz[0]).toBeCloseTo(20, 9);
    expect(s.edgesHz[128]).toBeCloseTo(20000, 9);
    // log spacing: constant ratio 1000^(1/128) between edges
    expect(s.edgesHz[65] / s.edgesHz[64]).toBeCloseTo(1000 ** (1 / 128), 12);
    expect(s.db.length).toBe(200 * 128);
    // span 1102.5 samples per column, frames of 2048 at 50 % overlap → 2 frames per column
    expect(s.framesPerColumn).toBe(2);
    for (const c of [10, 100, 190]) {
      const r = argmaxRow(s, c);
      expect(s.edgesHz[r]).toBeLessThanOrEqual(1000 + 21.6); // within the row or its lobe neighbour
      expect(s.edgesHz[r + 1]).toBeGreaterThanOrEqual(1000 - 21.6);
      // density scaling of Welch (Σ psd·binHz = mean square): the rows hold the tone's A²/2;
      // the piecewise-linear integral of the Hann lobe differs from the bin sum by < 1 %
      expect(Math.abs(columnPower(s, c) / (a * a / 2) - 1)).toBeLessThan(0.01);
    }
    // columns are centred in equal spans
    expect(s.timesS[0]).toBeCloseTo(2.5 / 200, 9);
    expect(s.timesS[199]).toBeCloseTo(5 - 2.5 / 200, 9);
  });

  it('follows a change of pitch in time: 300 Hz then 3 kHz', () => {
    const half = fs * 2;
    const x = new Float32Array(half * 2);
    x.set(sine(half, fs, 300, 0.3));
    x.set(sine(half, fs, 3000, 0.3), half);
    const s = displaySpectrogram(x, fs, { columns: 100 });
    const rowOf = (hz: number) => s.frequenciesHz.findIndex((_, r) => s.edgesHz[r] <= hz && hz < s.edgesHz[r + 1]);
    for (const c of [5, 40]) expect(Math.abs(argmaxRow(s, c) - rowOf(300))).toBeLessThanOrEqual(1);
    for (const c of [60, 95]) expect(Math.abs(argmaxRow(s, c) - rowOf(3000))).toBeLessThanOrEqual(1);
    // in the first half the 3 kHz row is far below the 300 Hz row (Hann side lobes fall 18 dB/octave)
    expect(s.db[20 * s.rows + rowOf(3000)]).toBeLessThan(s.db[20 * s.rows + rowOf(300)] - 60);
  });

  it('white noise reads flat: row means ≈ mean square/(fs/2) within 3 dB above 1 kHz', () => {
    let seed = 99;
    const x = new Float32Array(fs * 2);
    for (let i = 0; i < x.length; i++) {
      seed = (Math.imul(seed, 1664525) + 1013904223) >>> 0;
      x[i] = seed / 2 ** 31 - 1;
    }
    const s = displaySpectrogram(x, fs, { columns: 10, rows: 32 });
    expect(s.framesPerColumn).toBe(8);
    const levelDb = 10 * Math.log10(1 / 3 / (fs / 2)); // uniform on [−1, 1): mean square 1/3
    // rows above 1 kHz span ≥ 11 bins and 8 frames: ≳ 100 degrees of freedom, a scatter of about
    // ±0.6 dB per row; 3 dB is five sigma, while a scaling error of ×2 would show as 3 dB everywhere
    let sum = 0;
    let count = 0;
    let worst = 0;
    for (let c = 0; c < s.columns; c++) {
      for (let r = 0; r < s.rows; r++) {
        if (s.edgesHz[r] < 1000) continue;
        worst = Math.max(worst, Math.abs(s.db[c * s.rows + r] - levelDb));
        sum += s.db[c * s.rows + r];
        count++;
      }
    }
    expect(worst).toBeLessThan(3);
    // the mean of dB values of a χ² variable is biased low by a fraction of a dB; 0.5 dB allows it
    expect(Math.abs(sum / count - levelDb)).toBeLessThan(0.5);
  });

  it('short clips get fewer columns (a quarter frame apart) and long ones at most 8 frames per column', () => {
    const short = displaySpectrogram(sine(3000, fs, 440, 0.1), fs);
    expect(short.columns).toBe(Math.ceil(3000 / 512));
    expect(short.framesPerColumn).toBe(1);
    const one = displaySpectrogram(Float32Array.of(0.5), fs);
    expect(one.columns).toBe(1);
    // 60 s: 2646 samples per column → ceil(2646/1024) = 3 frames of 2048 at 50 % overlap
    const long = displaySpectrogram(new Float32Array(fs * 60), fs);
    expect(long.columns).toBe(1000);
    expect(long.framesPerColumn).toBe(3);
    // 10 s in 10 columns would need 44 frames each: capped at 8 (or the option)
    expect(displaySpectrogram(new Float32Array(fs * 10), fs, { columns: 10 }).framesPerColumn).toBe(8);
    const capped = displaySpectrogram(new Float32Array(fs * 10), fs, { columns: 10, maxFramesPerColumn: 2 });
    expect(capped.framesPerColumn).toBe(2);
    // silence reads the floor
    expect(long.db.every((v) => v === -200)).toBe(true);
  });

  it('every frame of a column counts, paired or alone: 1, 2, 3 and 5 frames read a steady sine alike', () => {
    // Frames go through the FFT two at a time with an odd one alone. A steady sine has the same PSD
    // in every frame, so the column mean must not depend on the count; a frame lost or counted twice
    // would move the level by ≥ 0.97 dB (4/5 or 6/5 of the power). 0.05 dB covers the frames'
    // differing phase against the window (measured < 0.01 dB here).
    const x = sine(fs * 4, fs, 1000, 0.5);
    const levels = [1, 2, 3, 5].map((frames) => {
      const sp = displaySpectrogram(x, fs, { columns: 20, maxFramesPerColumn: frames });
      expect(sp.framesPerColumn).toBe(frames);
      return 10 * Math.log10(columnPower(sp, 10));
    });
    // and the power in the rows is the sine's mean square A²/2 = 0.125 (−9.03 dB; Parseval, welch.ts convention)
    for (const l of levels) expect(Math.abs(l - levels[0])).toBeLessThan(0.05);
    expect(Math.abs(levels[0] - 10 * Math.log10(0.125))).toBeLessThan(0.2);
  });

  it('defaults maxHz to fs/2 below 40 kHz and validates options', () => {
    const s = displaySpectrogram(new Float32Array(8000), 16000, { rows: 10 });
    expect(s.edgesHz[10]).toBe(8000);
    expect(() => displaySpectrogram(new Float32Array(0), fs)).toThrow(/empty/);
    expect(() => displaySpectrogram(new Float32Array(10), fs, { size: 1000 })).toThrow(/opts.size/);
    expect(() => displaySpectrogram(new Float32Array(10), fs, { rows: 0 })).toThrow(/opts.rows/);
    expect(() => displaySpectrogram(new Float32Array(10), fs, { columns: 2.5 })).toThrow(/opts.columns/);
    expect(() => displaySpectrogram(new Float32Array(10), fs, { minHz: 500, maxHz: 100 })).toThrow(/minHz/);
    expect(() => displaySpectrogram(new Float32Array(10), fs, { maxHz: 30000 })).toThrow(/fs\/2/);
    expect(() => displaySpectrogram(new Float32Array(10), -1)).toThrow(/sampleRate/);
  });
});

describe('welchSpectrogram: the spectrogram from Welch\'s own segments', () => {
  it('each column averages the periodograms of the segment pairs centred in it (fft-js oracle, welch.ts scaling)', () => {
    // Small enough to recompute every periodogram with the independent FFT: 64-point segments at
    // 50 % overlap (Welch 1967), periodic Hann w[i] = 0.5 − 0.5·cos(2πi/N) (Harris 1978), density
    // scaling as in welch.ts, rows by bandMeans (tested above).
    const fs = 8000;
    const size = 64;
    const columns = 10;
    const x = uniformNoise(size * columns * 2 + 37, 0.3, 99);
    const { welch, spectrogram: sp } = welchSpectrogram(x, fs, { welchSize: size, columns, rows: 12, minHz: 100 });
    expect(sp.columns).toBe(columns);
    expect(sp.size).toBe(size);
    const hop = size / 2;
    const segments = Math.floor((x.length - size) / hop) + 1; // 40 here: 20 pairs
    expect(welch.segments).toBe(segments);
    const span = x.length / columns;
    const w = Array.from({ length: size }, (_, i) => 0.5 - 0.5 * Math.cos((2 * Math.PI * i) / size));
    const sumW2 = w.reduce((a, v) => a + v * v, 0);
    const bins = size / 2 + 1;
    const acc = Array.from({ length: columns }, () => new Float64Array(bins));
    const count = new Array<number>(columns).fill(0);
    for (let seg = 0; seg < segments; seg++) {
      const pairCentre = (seg - (seg % 2)) * hop + (size + hop) / 2;
      const c = Math.min(columns - 1, Math.floor(pairCentre / span));
      const X = oracle.fft(Array.from({ length: size }, (_, i) => x[seg * hop + i] * w[i]));
      for (let k = 0; k < bins; k++) acc[c][k] += X[k][0] ** 2 + X[k][1] ** 2;
      count[c]++;
    }
    let fewest = Infinity;
    for (let c = 0; c < columns; c++) {
      expect(count[c]).toBeGreaterThan(0);
      fewest = Math.min(fewest, count[c]);
      const psd = acc[c].map((v, k) => ((k === 0 || k === bins - 1 ? 1 : 2) * v) / (count[c] * fs * sumW2));
      const means = bandMeans(psd, fs / size, sp.edgesHz);
      for (let r = 0; r < sp.rows; r++) expect(sp.db[c * sp.rows + r]).toBeCloseTo(10 * Math.log10(means[r]), 4);
      expect(sp.timesS[c]).toBeCloseTo(((c + 0.5) * span) / fs, 12);
    }
    expect(sp.framesPerColumn).toBe(fewest);
  });

  it('gives exactly welchPsd\'s spectrum, and follows a 12 dB step in level in time', () => {
    const fs = 8000;
    const n = 50 * 4096 * 2;
    const x = uniformNoise(n, 0.1, 7);
    for (let i = n / 2; i < n; i++) x[i] *= 4; // +12.04 dB from the middle on
    const { welch, spectrogram: sp } = welchSpectrogram(x, fs, { columns: 50 });
    const ref = welchPsd(x, fs);
    expect(Array.from(welch.psd)).toEqual(Array.from(ref.psd));
    expect(sp.size).toBe(4096); // the Welch segments were shared
    // Parseval per column (welch.ts convention): uniform noise on ±a has mean square a²/3.
    const quiet = 10 * Math.log10(columnPower(sp, 10));
    const loud = 10 * Math.log10(columnPower(sp, 40));
    expect(Math.abs(quiet - 10 * Math.log10(0.01 / 3))).toBeLessThan(0.5);
    expect(Math.abs(loud - quiet - 20 * Math.log10(4))).toBeLessThan(0.5);
  });

  it('a clip too short to fill every column with pairs gets its own frames (displaySpectrogram, 2 per column)', () => {
    const fs = 44100;
    const x = sine(fs * 5, fs, 440, 0.2);
    const { welch, spectrogram } = welchSpectrogram(x, fs);
    expect(spectrogram).toEqual(displaySpectrogram(x, fs, { maxFramesPerColumn: 2 }));
    expect(welch).toEqual(welchPsd(x, fs));
    expect(() => welchSpectrogram(x, fs, { welchSize: 1000 })).toThrow(/opts.welchSize/);
    expect(() => welchSpectrogram(new Float32Array(0), fs)).toThrow(/empty/);
  });
});
