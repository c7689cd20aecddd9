import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import {
  biquadFilter,
  biquadGainDb,
  biquadPowerGain,
  createBiquad,
  type BiquadCoeffs,
} from '../../../shared/dsp/biquad.ts';

/** Direct evaluation |B(e^{-jω})/A(e^{-jω})|² with complex arithmetic (definition of the response). */
function directPowerGain(c: BiquadCoeffs, freqHz: number, fs: number): number {
  const w = (2 * Math.PI * freqHz) / fs;
  const re = (p0: number, p1: number, p2: number) => p0 + p1 * Math.cos(w) + p2 * Math.cos(2 * w);
  const im = (p1: number, p2: number) => -(p1 * Math.sin(w) + p2 * Math.sin(2 * w));
  const nb = re(c.b0, c.b1, c.b2) ** 2 + im(c.b1, c.b2) ** 2;
  const na = re(1, c.a1, c.a2) ** 2 + im(c.a1, c.a2) ** 2;
  return nb / na;
}

/** Direct form I reference: y[n] = b0x[n] + b1x[n−1] + b2x[n−2] − a1y[n−1] − a2y[n−2] (the definition). */
function df1(c: BiquadCoeffs, x: ArrayLike<number>): number[] {
  const y: number[] = [];
  for (let n = 0; n < x.length; n++) {
    const v =
      c.b0 * x[n] +
      c.b1 * (x[n - 1] ?? 0) +
      c.b2 * (x[n - 2] ?? 0) -
      c.a1 * (y[n - 1] ?? 0) -
      c.a2 * (y[n - 2] ?? 0);
    y.push(v);
  }
  return y;
}

/** RBJ Audio EQ Cookbook low-pass at f0 = 1 kHz, Q = 1/√2, fs = 48 kHz (common practice design). */
const lowPass: BiquadCoeffs = (() => {
  const w0 = (2 * Math.PI * 1000) / 48000;
  const alpha = Math.sin(w0) / (2 * Math.SQRT1_2);
  const a0 = 1 + alpha;
  const b1 = (1 - Math.cos(w0)) / a0;
  return { b0: b1 / 2, b1, b2: b1 / 2, a1: (-2 * Math.cos(w0)) / a0, a2: (1 - alpha) / a0 };
})();

describe('biquadFilter', () => {
  it('matches the direct form I difference equation on an impulse and a random signal', () => {
    // Same recursion, different arrangement: agreement to ~1e-15 relative (rounding only).
    const rnd = fc.sample(fc.float({ min: -1, max: 1, noNaN: true }), { numRuns: 200, seed: 7 });
    const x = Float32Array.from(rnd);
    x[0] = 1;
    const y = biquadFilter(lowPass, x);
    const ref = df1(lowPass, x);
    for (let n = 0; n < x.length; n++) expect(y[n]).toBeCloseTo(ref[n], 13);
  });

  it('processes a signal in pieces exactly as in one go (state carries over)', () => {
    const x = Float32Array.from({ length: 100 }, (_, i) => Math.sin(i * 0.3));
    const whole = biquadFilter(lowPass, x);
    const state = { s1: 0, s2: 0 };
    const a = biquadFilter(lowPass, x.subarray(0, 37), undefined, state);
    const b = biquadFilter(lowPass, x.subarray(37), undefined, state);
    const pieces = [...a, ...b];
    // Identical arithmetic in identical order: equal to the last bit; 1e-15 allows for nothing else.
    for (let n = 0; n < x.length; n++) expect(Math.abs(pieces[n] - whole[n])).toBeLessThan(1e-15);
  });

  it('filters in place into a Float64Array and agrees with createBiquad().next', () => {
    const x = Float64Array.from({ length: 50 }, (_, i) => (i % 7) - 3);
    const copy = Float64Array.from(x);
    biquadFilter(lowPass, x, x);
    const f = createBiquad(lowPass);
    for (let n = 0; n < x.length; n++) expect(Math.abs(x[n] - f.next(copy[n]))).toBeLessThan(1e-12);
    f.reset();
    expect(f.next(1)).toBeCloseTo(lowPass.b0, 15);
  });

  it('settles to the DC gain (b0+b1+b2)/(1+a1+a2) for a step', () => {
    // Low-pass DC gain is exactly 1 by design (RBJ cookbook); after 2000 samples the transient
    // (pole radius ≈ 0.91) has decayed below 1e-12.
    const y = biquadFilter(lowPass, new Float32Array(2000).fill(1));
    expect(y[1999]).toBeCloseTo(1, 12);
  });

  it('rejects a short out buffer', () => {
    expect(() => biquadFilter(lowPass, new Float32Array(4), new Float64Array(3))).toThrow(RangeError);
  });
});

describe('biquadGainDb', () => {
  it('gives −3.0103 dB at the corner of a Butterworth (Q = 1/√2) low-pass', () => {
    // |H(f0)| = Q for the RBJ low-pass, so 20·log10(1/√2) = −3.0103 dB (RBJ Audio EQ Cookbook);
    // the bilinear prewarp puts f0 exactly at 1 kHz: agreement to 1e-9 dB.
    expect(biquadGainDb(lowPass, 1000, 48000)).toBeCloseTo(-3.010299957, 9);
    expect(biquadGainDb(lowPass, 0, 48000)).toBeCloseTo(0, 12);
  });

  it('agrees with direct complex evaluation across the band', () => {
    // Two algebraically identical forms: compare at 1e-9 relative away from the band edges where the
    // cos ω form itself loses digits (it is the less accurate of the two there).
    const hp: BiquadCoeffs = { b0: 1, b1: -2, b2: 1, a1: -1.99004745483398, a2: 0.99007225036621 };
    for (const c of [lowPass, hp]) {
      for (const f of [20, 100, 997, 5000, 15000, 23000]) {
        expect(biquadPowerGain(c, f, 48000) / directPowerGain(c, f, 48000)).toBeCloseTo(1, 9);
      }
    }
  });

  it('keeps relative precision at both band edges', () => {
    // (1 − z⁻¹)² has |B|² = 16·sin⁴(ω/2) exactly and (1 + z⁻¹)² has 16·cos⁴(ω/2): 1e-12 relative.
    const hp = { b0: 1, b1: -2, b2: 1, a1: 0, a2: 0 };
    const lp = { b0: 1, b1: 2, b2: 1, a1: 0, a2: 0 };
    for (const f of [0.01, 1, 23999, 23999.99]) {
      const w2 = (Math.PI * f) / 48000;
      expect(biquadPowerGain(hp, f, 48000) / (16 * Math.sin(w2) ** 4)).toBeCloseTo(1, 12);
      expect(biquadPowerGain(lp, f, 48000) / (16 * Math.cos(w2) ** 4)).toBeCloseTo(1, 12);
    }
  });

  it('gives −Infinity at a zero of the response', () => {
    // A (1 − z⁻¹)² numerator has a double zero at DC.
    expect(biquadGainDb({ b0: 1, b1: -2, b2: 1, a1: 0, a2: 0 }, 0, 48000)).toBe(-Infinity);
  });
});
