// Synthesis building blocks (shared/demo/synth.ts).
import { describe, expect, it } from 'vitest';
import { addPartials, adsrInto, midiToHz, normalisePeak, panGains, peakAbs, schroederPhases } from '../../../shared/demo/synth.ts';

describe('midiToHz', () => {
  it('A4 = 440 Hz (ISO 16:1975) and middle C = 261.6256 Hz in 12-tone equal temperament', () => {
    expect(midiToHz(69)).toBe(440);
    expect(midiToHz(60)).toBeCloseTo(261.6256, 4); // 440·2^(−9/12), common practice
    expect(midiToHz(81) / midiToHz(69)).toBeCloseTo(2, 12);
  });
});

describe('addPartials', () => {
  it('matches Σ a·e^(−t/τ)·sin(2π f t + φ) computed directly, to 1e-9 over 2 s', () => {
    const fs = 44100, n = 2 * fs;
    const partials = [
      { ratio: 1, amp: 0.5, decayS: 1.2, phaseRad: 0.3 },
      { ratio: 2.756, amp: 0.25, decayS: Infinity, phaseRad: -1 },
      { ratio: 7, amp: 0.1, decayS: 0.2 },
    ];
    const out = new Float32Array(n);
    addPartials(out, n, 311.1, partials, fs);
    let err = 0;
    for (let i = 0; i < n; i++) {
      const t = i / fs;
      let v = 0;
      for (const p of partials) v += p.amp * Math.exp(-t / p.decayS) * Math.sin(2 * Math.PI * 311.1 * p.ratio * t + (p.phaseRad ?? 0));
      err = Math.max(err, Math.abs(out[i] - v));
    }
    // float32 storage of the sum bounds the error at ~0.85·2^-24 ≈ 5e-8 on its own; the recursion adds ~1e-12.
    expect(err).toBeLessThan(1e-7);
  });
  it('skips partials at or above 0.45·fs (no aliasing)', () => {
    const out = new Float32Array(100);
    addPartials(out, 100, 4000, [{ ratio: 1, amp: 1, decayS: Infinity }], 8000); // 4 kHz at 8 kHz: Nyquist
    expect(peakAbs([out])).toBe(0);
  });
});

describe('adsrInto', () => {
  const env = { attackS: 0.01, decayS: 0.1, sustainLevel: 0.5, releaseS: 0.05 };
  const fs = 10000;
  const out = new Float32Array(20000);
  const n = adsrInto(out, 1, env, fs);
  it('lasts hold + release', () => expect(n).toBe(10000 + 500));
  it('rises linearly to 1 over the attack', () => {
    expect(out[49]).toBeCloseTo(0.5, 6);
    expect(out[99]).toBeCloseTo(1, 6);
  });
  it('decays exponentially toward sustain: S + (1 − S)e^(−(t − A)/D)', () => {
    for (const t of [0.05, 0.2, 0.5]) {
      const i = Math.round(t * fs) - 1;
      expect(out[i]).toBeCloseTo(0.5 + 0.5 * Math.exp(-((i + 1 - 100) / fs) / 0.1), 5);
    }
  });
  it('releases linearly to 0', () => {
    const atRelease = out[9999];
    expect(out[10000 + 249]).toBeCloseTo(atRelease / 2, 5);
    expect(out[n - 1]).toBe(0);
  });
});

describe('panGains', () => {
  it('equal power: L² + R² = 1, −3.01 dB each at the centre, hard left and right', () => {
    for (const p of [-1, -0.3, 0, 0.6, 1]) {
      const [l, r] = panGains(p);
      expect(l * l + r * r).toBeCloseTo(1, 12);
    }
    expect(panGains(0)[0]).toBeCloseTo(Math.SQRT1_2, 12);
    expect(panGains(-1)[1]).toBeCloseTo(0, 12);
    expect(panGains(1)[0]).toBeCloseTo(0, 12);
  });
});

describe('schroederPhases', () => {
  it('flat spectrum: φ_n = −π n(n−1)/N (Schroeder 1970)', () => {
    const N = 7;
    schroederPhases(new Array(N).fill(2)).forEach((p, i) => expect(p).toBeCloseTo((-Math.PI * (i + 1) * i) / N, 12));
  });
  it('lowers the crest factor of 20 equal cosine harmonics from √(2N) (16.0 dB) to under 6 dB', () => {
    const N = 20, M = 8192;
    const crestDb = (ph: number[]) => {
      let pk = 0, ss = 0;
      for (let i = 0; i < M; i++) {
        let v = 0;
        for (let k = 0; k < N; k++) v += Math.cos((2 * Math.PI * (k + 1) * i) / M + ph[k]);
        pk = Math.max(pk, Math.abs(v));
        ss += v * v;
      }
      return 20 * Math.log10(pk / Math.sqrt(ss / M));
    };
    expect(crestDb(new Array(N).fill(0))).toBeCloseTo(10 * Math.log10(2 * N), 6); // all peaks align at t = 0
    expect(crestDb(schroederPhases(new Array(N).fill(1)))).toBeLessThan(6);
  });
});

describe('peakAbs / normalisePeak', () => {
  it('finds the largest magnitude of either sign and scales to it', () => {
    const a = Float32Array.of(0.1, -0.8, 0.5), b = Float32Array.of(0.2, 0.3, -0.1);
    expect(peakAbs([a, b])).toBeCloseTo(0.8, 7);
    normalisePeak([a, b], 0.5);
    expect(a[1]).toBeCloseTo(-0.5, 7);
    expect(b[0]).toBeCloseTo(0.125, 7);
  });
});
