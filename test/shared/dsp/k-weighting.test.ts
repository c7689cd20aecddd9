import { describe, expect, it } from 'vitest';
import { biquadFilter } from '../../../shared/dsp/biquad.ts';
import { kWeight, kWeightingCoeffs, kWeightingGainDb } from '../../../shared/dsp/k-weighting.ts';

describe('kWeightingCoeffs', () => {
  it('reproduces ITU-R BS.1770-4 Annex 1 Table 1 (pre-filter) at 48 kHz', () => {
    // ITU-R BS.1770-4 Annex 1, Table 1 (14 decimals printed): match to 1e-13, the table's own precision.
    const { shelf } = kWeightingCoeffs(48000);
    expect(shelf.b0).toBeCloseTo(1.53512485958697, 13);
    expect(shelf.b1).toBeCloseTo(-2.69169618940638, 13);
    expect(shelf.b2).toBeCloseTo(1.19839281085285, 13);
    expect(shelf.a1).toBeCloseTo(-1.69065929318241, 13);
    expect(shelf.a2).toBeCloseTo(0.73248077421585, 13);
  });

  it('reproduces ITU-R BS.1770-4 Annex 1 Table 2 (RLB high-pass) at 48 kHz', () => {
    // ITU-R BS.1770-4 Annex 1, Table 2: numerator exactly 1, −2, 1; denominator to 1e-13.
    const { highPass } = kWeightingCoeffs(48000);
    expect(highPass.b0).toBeCloseTo(1, 14);
    expect(highPass.b1).toBeCloseTo(-2, 14);
    expect(highPass.b2).toBeCloseTo(1, 14);
    expect(highPass.a1).toBeCloseTo(-1.99004745483398, 13);
    expect(highPass.a2).toBeCloseTo(0.99007225036621, 13);
  });

  it('derives the 44.1 kHz filters from the same prototypes', () => {
    // [calc] bilinear transform of the BS.1770-4 prototypes, float64
    // (test/fixtures/loudness/reference_values.py); 10 decimals as printed there.
    const { shelf, highPass } = kWeightingCoeffs(44100);
    expect(shelf.b0).toBeCloseTo(1.5308412301, 9);
    expect(shelf.b1).toBeCloseTo(-2.6509799952, 9);
    expect(shelf.b2).toBeCloseTo(1.1690790799, 9);
    expect(shelf.a1).toBeCloseTo(-1.6636551133, 9);
    expect(shelf.a2).toBeCloseTo(0.7125954281, 9);
    expect(highPass.a1).toBeCloseTo(-1.9891696736, 9);
    expect(highPass.a2).toBeCloseTo(0.9891990358, 9);
    // Numerator keeps the 48 kHz table's passband gain a0(48 kHz)/a0(44.1 kHz) = 0.999560064543 [calc, same script].
    expect(highPass.b0).toBeCloseTo(0.999560064543, 11);
    expect(highPass.b1).toBeCloseTo(-2 * 0.999560064543, 11);
  });

  it('rejects rates at or below twice the shelf corner', () => {
    expect(() => kWeightingCoeffs(3000)).toThrow(RangeError);
    expect(() => kWeightingCoeffs(Number.NaN)).toThrow(RangeError);
  });
});

describe('kWeightingGainDb', () => {
  // [calc] cascade response of the BS.1770-4 Table 1–2 filters at 48 kHz, float64 complex evaluation
  // (test/fixtures/loudness/reference_values.py), 5 decimals: tolerance 1e-5 dB.
  const at48k: [number, number][] = [
    [20, -13.27537],
    [100, -1.1335],
    [997, 0.69101],
    [1000, 0.6977],
    [4000, 3.968],
    [20000, 4.04311],
  ];
  it.each(at48k)('at %d Hz, 48 kHz: %f dB', (f, db) => {
    expect(Math.abs(kWeightingGainDb(f, 48000) - db)).toBeLessThan(1e-5);
  });

  it('puts +0.691 dB at 997 Hz, the offset the loudness formula removes', () => {
    // ITU-R BS.1770-4 Annex 1: the −0.691 constant cancels the K gain at 997 Hz. [calc] 0.69101 dB.
    expect(Math.abs(kWeightingGainDb(997, 48000) - 0.691)).toBeLessThan(2e-4);
  });

  it('gives (nearly) the same response at 44.1 and 96 kHz as at 48 kHz', () => {
    // Same analogue prototypes; the bilinear transform warps frequency differently at each rate.
    // [calc] (reference_values.py) differences from 48 kHz over 20 Hz – 4 kHz: 44.1 kHz ≤ 0.0011 dB,
    // 96 kHz ≤ 0.0044 dB (largest near 1–4 kHz, the shelf). Tolerances 0.0015 and 0.005 dB.
    for (const f of [20, 50, 100, 500, 997, 2000, 4000]) {
      expect(Math.abs(kWeightingGainDb(f, 44100) - kWeightingGainDb(f, 48000))).toBeLessThan(1.5e-3);
      expect(Math.abs(kWeightingGainDb(f, 96000) - kWeightingGainDb(f, 48000))).toBeLessThan(5e-3);
    }
    // …and far tighter at the ends, where the prototypes are flat or the high-pass dominates.
    expect(Math.abs(kWeightingGainDb(20, 96000) - -13.27537)).toBeLessThan(1e-4);
  });
});

describe('kWeight', () => {
  it('passes a steady 997 Hz sine with the +0.691 dB gain', () => {
    // Measured RMS gain after 0.5 s settling, over 1 s (997 whole cycles: RMS exact to ~1e-6).
    const fs = 48000;
    const x = Float32Array.from({ length: 1.5 * fs }, (_, i) => 0.5 * Math.sin((2 * Math.PI * 997 * i) / fs));
    const y = kWeight(x, fs);
    let ex = 0;
    let ey = 0;
    for (let i = fs / 2; i < 1.5 * fs; i++) {
      ex += x[i] * x[i];
      ey += y[i] * y[i];
    }
    expect(Math.abs(10 * Math.log10(ey / ex) - kWeightingGainDb(997, fs))).toBeLessThan(1e-4);
  });

  it('equals the two biquads run one after the other', () => {
    const fs = 44100;
    const x = Float32Array.from({ length: 500 }, (_, i) => ((i * 7919) % 200) / 100 - 1);
    const { shelf, highPass } = kWeightingCoeffs(fs);
    const ref = biquadFilter(highPass, biquadFilter(shelf, x));
    const y = kWeight(x, fs);
    for (let i = 0; i < x.length; i++) expect(Math.abs(y[i] - ref[i])).toBeLessThan(1e-14);
  });

  it('removes DC (the RLB high-pass has a double zero at z = 1)', () => {
    // After 2 s at 48 kHz the 38 Hz high-pass transient (time constant ≈ 4 ms) is far below 1e-9.
    const y = kWeight(new Float32Array(96000).fill(0.5), 48000);
    expect(Math.abs(y[95999])).toBeLessThan(1e-9);
  });
});
