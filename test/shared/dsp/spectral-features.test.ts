import { describe, expect, it } from 'vitest';
import {
  DEFAULT_BANDS,
  bandEnergyFractions,
  dominantHz,
  rolloffHz,
  spectralCentroidHz,
} from '../../../shared/dsp/spectral-features.ts';
import { welchPsd, type PowerSpectrum } from '../../../shared/dsp/welch.ts';

function tones(n: number, fs: number, parts: { hz: number; amp: number; phase?: number }[], dc = 0): Float32Array {
  const out = new Float32Array(n);
  for (let i = 0; i < n; i++) {
    let v = dc;
    for (const p of parts) v += p.amp * Math.sin((2 * Math.PI * p.hz * i) / fs + (p.phase ?? 0));
    out[i] = v;
  }
  return out;
}

/** A hand-made spectrum: psd values on bins k·binHz. */
function flat(values: number[], binHz: number): PowerSpectrum {
  return {
    psd: Float64Array.from(values),
    frequencyHz: Float64Array.from(values, (_, k) => k * binHz),
    binHz,
  };
}

// Three tones of known power A²/2 (mean square of a sine, textbook): 0.125 + 0.03125 + 0.005 = 0.16125.
const FS = 44100;
const PARTS = [
  { hz: 100, amp: 0.5 },
  { hz: 1000, amp: 0.25, phase: 0.5 },
  { hz: 5000, amp: 0.1, phase: 1.5 },
];
const TOTAL = 0.16125;
const multi = welchPsd(tones(FS * 3, FS, PARTS), FS);

describe('band energy fractions', () => {
  it('multi-tone: each tone lands in its band with fraction A²/2 / Σ A²/2', () => {
    const f = bandEnergyFractions(multi);
    expect(f.map((b) => b.name)).toEqual(DEFAULT_BANDS.map((b) => b.name));
    const get = (name: string) => f.find((b) => b.name === name)!.fraction;
    // bins are 10.8 Hz; the nearest band edge is 60 Hz, 3.7 bins below the 100 Hz tone, where the
    // Hann side lobes (−31 dB first, Harris 1978) leave ~1e-5 of that tone's power; 5e-5 absolute
    // (toBeCloseTo digits 4) covers it, and every other edge is ≥ 14 bins from a tone
    expect(get('bass')).toBeCloseTo(0.125 / TOTAL, 4); // 0.77519
    expect(get('mid')).toBeCloseTo(0.03125 / TOTAL, 4); // 0.19380
    expect(get('presence')).toBeCloseTo(0.005 / TOTAL, 4); // 0.03101
    expect(get('sub-bass')).toBeLessThan(5e-5);
    for (const name of ['low-mid', 'high-mid', 'brilliance']) expect(get(name)).toBeLessThan(1e-6);
    const sum = f.reduce((s, b) => s + b.fraction, 0);
    expect(sum).toBeCloseTo(1, 4);
  });

  it('partial bins count by overlap: flat psd 1, 10 Hz bins, band 20–47 Hz holds 27 of 110 FS²', () => {
    // bins 0…10 (0…100 Hz) carry 10 FS² each; bin 2 [15, 25] gives 5, bins 3, 4 give 10 each,
    // bin 5 [45, 55] gives 2: 27 in all, total 110 (bins 0 and 10 are half-width but carry full power)
    const spec = flat(new Array(11).fill(1), 10);
    const [b] = bandEnergyFractions(spec, [{ name: 'x', lowHz: 20, highHz: 47 }]);
    expect(b.fraction).toBeCloseTo(27 / 110, 12);
    // the DC bin covers [0, 5]: a band 0–2.5 Hz takes half of its power
    const [dc] = bandEnergyFractions(spec, [{ name: 'dc', lowHz: 0, highHz: 2.5 }]);
    expect(dc.fraction).toBeCloseTo(5 / 110, 12);
    // beyond the last bin: nothing; a band covering everything: 1
    const [out, all] = bandEnergyFractions(spec, [
      { name: 'out', lowHz: 200, highHz: 300 },
      { name: 'all', lowHz: 0, highHz: 1e9 },
    ]);
    expect(out.fraction).toBe(0);
    expect(all.fraction).toBeCloseTo(1, 12);
  });

  it('silence gives zeros; an inverted band is an error', () => {
    const silent = flat(new Array(9).fill(0), 5);
    expect(bandEnergyFractions(silent).every((b) => b.fraction === 0)).toBe(true);
    expect(() => bandEnergyFractions(multi, [{ name: 'bad', lowHz: 500, highHz: 100 }])).toThrow(/"bad"/);
  });
});

describe('spectral centroid', () => {
  it('multi-tone: Σ f·P / Σ P = (100·0.125 + 1000·0.03125 + 5000·0.005)/0.16125 = 426.36 Hz', () => {
    const expected = (100 * 0.125 + 1000 * 0.03125 + 5000 * 0.005) / TOTAL;
    // each tone's Hann lobe is nearly symmetric about it on the bin grid: allow 0.5 Hz (0.05 bin)
    expect(Math.abs(spectralCentroidHz(multi)! - expected)).toBeLessThan(0.5);
  });

  it('hand-made spectrum and silence', () => {
    expect(spectralCentroidHz(flat([0, 1, 0, 3, 0], 100))).toBeCloseTo((100 + 900) / 4, 12);
    expect(spectralCentroidHz(flat([0, 0, 0], 100))).toBeNull();
  });

  it('white noise: centroid ≈ fs/4 (flat density on 0…fs/2), within 2 %', () => {
    let s = 12345;
    const x = new Float32Array(FS * 2);
    for (let i = 0; i < x.length; i++) {
      s = (Math.imul(s, 1664525) + 1013904223) >>> 0;
      x[i] = s / 2 ** 31 - 1;
    }
    const spec = welchPsd(x, FS);
    // 21 averaged segments: the density scatters by ~22 % per bin but the centroid averages 2049 bins
    expect(Math.abs(spectralCentroidHz(spec)! / (FS / 4) - 1)).toBeLessThan(0.02);
    // roll-off of a flat density: fraction·fs/2 (Peeters 2004 definition [recalled])
    expect(Math.abs(rolloffHz(spec, 0.95)! / (0.95 * FS / 2) - 1)).toBeLessThan(0.02);
    expect(Math.abs(rolloffHz(spec, 0.5)! / (FS / 4) - 1)).toBeLessThan(0.03);
  });
});

describe('roll-off', () => {
  it('interpolates inside the crossing bin: flat psd 1, 10 Hz bins, half the power at 50 Hz', () => {
    const spec = flat(new Array(11).fill(1), 10); // total 110: bin 0 (10 FS² on 0…5 Hz) + 4 bins = 50 at 45 Hz
    expect(rolloffHz(spec, 0.5)).toBeCloseTo(50, 10); // bin 5 [45, 55] needs 5 of its 10
    expect(rolloffHz(spec, 1)).toBeCloseTo(100, 10);
    expect(rolloffHz(spec, 10 / 110)).toBeCloseTo(5, 10);
  });

  it('multi-tone: 95 % of the power lies below the 1 kHz tone’s upper lobe edge', () => {
    // 0.95·0.16125 = 0.15319; the 100 Hz tone gives 0.125, so the crossing is inside the 1 kHz lobe
    // (Hann main lobe ±2 bins = ±21.5 Hz)
    const r = rolloffHz(multi)!;
    expect(r).toBeGreaterThan(1000 - 2 * multi.binHz);
    expect(r).toBeLessThan(1000 + 2 * multi.binHz);
  });

  it('validates the fraction and returns null for silence', () => {
    expect(() => rolloffHz(multi, 0)).toThrow(/fraction/);
    expect(() => rolloffHz(multi, 1.5)).toThrow(RangeError);
    expect(rolloffHz(flat([0, 0, 0], 1))).toBeNull();
  });
});

describe('dominant frequency (quadratic interpolation on log power, Smith, SASP)', () => {
  it('finds the strongest tone of the multi-tone to 0.025 bin', () => {
    // the refinement's bias with a Hann window is ≤ 0.016 bin (measured across a bin): 0.025 bin margin
    expect(Math.abs(dominantHz(multi)! - 100)).toBeLessThan(0.025 * multi.binHz);
  });

  it('off-bin tones across one bin, with a DC offset that must be ignored', () => {
    const binHz = FS / 4096;
    for (const frac of [0.1, 0.3, 0.5, 0.77]) {
      const hz = (300 + frac) * binHz;
      const spec = welchPsd(tones(FS, FS, [{ hz, amp: 0.2 }], 0.3), FS);
      const d = dominantHz(spec)!;
      expect(Math.abs(d - hz) / binHz).toBeLessThan(0.025);
      // unrefined bin centre would be off by up to half a bin: the refinement must beat it
      expect(Math.abs(d - hz)).toBeLessThanOrEqual(Math.abs(Math.round(hz / binHz) * binHz - hz) + 1e-9);
    }
  });

  it('edge cases: silence → null; peak in the last bin → its centre', () => {
    expect(dominantHz(flat([5, 0, 0, 0], 10))).toBeNull();
    expect(dominantHz(flat([0, 1, 2, 9], 10))).toBe(30);
    expect(dominantHz(flat([0, 1, 4, 1, 0], 10))).toBeCloseTo(20, 12); // symmetric neighbours
  });
});
