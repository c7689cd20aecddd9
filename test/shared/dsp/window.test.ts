import { describe, expect, it } from 'vitest';
import { hannWindow, makeWindow, windowStats, WINDOW_COEFFS } from '../../../shared/dsp/window.ts';

describe('periodic windows', () => {
  it('Hann of length 4 is [0, 0.5, 1, 0.5] (periodic form, Harris 1978)', () => {
    const w = hannWindow(4);
    [0, 0.5, 1, 0.5].forEach((v, i) => expect(w[i]).toBeCloseTo(v, 15));
  });

  it('periodic Hann overlap-adds to exactly 1 at hop N/2 (sin² + cos² = 1: constant overlap-add)', () => {
    const n = 64;
    const w = hannWindow(n);
    for (let i = 0; i < n / 2; i++) expect(w[i] + w[i + n / 2]).toBeCloseTo(1, 14);
  });

  it('Blackman–Harris 4-term: w[0] = a0 − a1 + a2 − a3 = 6e-5 and peak 1 at N/2 (Harris 1978)', () => {
    const w = makeWindow('blackman-harris-4', 1024);
    expect(w[0]).toBeCloseTo(0.35875 - 0.48829 + 0.14128 - 0.01168, 14);
    expect(w[512]).toBeCloseTo(1, 14);
    // symmetric about N/2 (periodic form)
    for (const i of [1, 100, 511]) expect(w[512 - i]).toBeCloseTo(w[512 + i], 14);
  });

  it('writes into a given buffer and validates its arguments', () => {
    const out = new Float64Array(8);
    expect(hannWindow(8, out)).toBe(out);
    expect(() => hannWindow(0)).toThrow(RangeError);
    expect(() => makeWindow('nope' as 'hann', 8)).toThrow(/unknown window kind/);
    expect(() => windowStats([])).toThrow(RangeError);
  });
});

describe('window figures of merit, N = 4096', () => {
  // Harris, Proc. IEEE 66(1), 1978, Table I [recalled]: Hann CG 0.50, ENBW 1.50 bins, scallop loss
  // 1.42 dB; 4-term Blackman–Harris (−92 dB) CG 0.36, ENBW 2.00 bins, scallop loss 0.83 dB.
  // Float64 values [calc] by test/fixtures/spectral/window_reference.py (numpy/scipy, same
  // definitions): the table's two-digit rounding is the coarse check, the script's digits the fine one.
  it('Hann', () => {
    const s = windowStats(hannWindow(4096));
    expect(s.coherentGain).toBeCloseTo(0.5, 12);
    expect(s.enbwBins).toBeCloseTo(1.5, 12);
    expect(s.scallopLossDb).toBeCloseTo(1.423622808437015, 9);
    expect(Math.abs(s.scallopLossDb - 1.42)).toBeLessThan(0.005); // Harris Table I, 2 decimals
    // closed form for the continuous Hann window: half-bin response 8/(3π) → 1.4236 dB
    // (the cos² window's transform at half a bin, Harris 1978); finite-N difference is below 1e-6 dB
    expect(s.scallopLossDb).toBeCloseTo(-20 * Math.log10(8 / (3 * Math.PI)), 5);
    expect(s.sum).toBeCloseTo(2048, 9);
    expect(s.sumSquares).toBeCloseTo(4096 * 0.375, 9);
  });

  it('4-term Blackman–Harris', () => {
    const s = windowStats(makeWindow('blackman-harris-4', 4096));
    expect(s.coherentGain).toBeCloseTo(0.35875, 12);
    expect(s.enbwBins).toBeCloseTo(2.0043529382170475, 10);
    expect(s.scallopLossDb).toBeCloseTo(0.8255722309154733, 9);
    expect(Math.abs(s.enbwBins - 2.0)).toBeLessThan(0.005); // Harris Table I, 2 decimals
    expect(Math.abs(s.scallopLossDb - 0.83)).toBeLessThan(0.005);
    // closed form for a periodic cosine sum: ENBW = (a0² + ½·Σ_{m≥1} aₘ²) / a0²
    const a = WINDOW_COEFFS['blackman-harris-4'];
    const enbw = (a[0] ** 2 + 0.5 * (a[1] ** 2 + a[2] ** 2 + a[3] ** 2)) / a[0] ** 2;
    expect(s.enbwBins).toBeCloseTo(enbw, 12);
  });

  it('rectangular (all ones) reference: CG 1, ENBW 1 bin, scallop 3.92 dB (Harris 1978 Table I [recalled])', () => {
    const s = windowStats(new Float64Array(4096).fill(1));
    expect(s.coherentGain).toBeCloseTo(1, 12);
    expect(s.enbwBins).toBeCloseTo(1, 12);
    // |Σ e^(−jπn/N)|/N → 2/π for large N: −20·log10(2/π) = 3.9224 dB
    expect(s.scallopLossDb).toBeCloseTo(-20 * Math.log10(2 / Math.PI), 5);
  });
});
