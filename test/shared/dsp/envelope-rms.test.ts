import { describe, expect, it } from 'vitest';
import { rmsEnvelope } from '../../../shared/dsp/envelope.ts';
import { computeFrameStats } from '../../../shared/dsp/frame-stats.ts';

function sine(n: number, f: number, amp: number, fs: number): Float32Array {
  const x = new Float32Array(n);
  for (let i = 0; i < n; i++) x[i] = amp * Math.sin((2 * Math.PI * f * i) / fs);
  return x;
}

describe('rmsEnvelope', () => {
  it('reads A/√2 for a sine when the window holds whole periods', () => {
    // 1 kHz at 44.1 kHz: a 10 ms window (10 frames of 44.1 samples = 441 samples) is exactly ten
    // periods, so the window mean of sin² is exactly 1/2 (textbook: RMS of a sine is A/√2).
    const fs = 44100;
    const A = 0.5;
    const env = rmsEnvelope(computeFrameStats(sine(fs, 1000, A, fs), fs));
    expect(env.length).toBe(1000);
    let worst = 0;
    for (let k = 5; k < 995; k++) worst = Math.max(worst, Math.abs(env[k] / (A / Math.SQRT2) - 1));
    // 1e-7 relative: float32 sample rounding (≤ 6e-8 relative per sample).
    expect(worst).toBeLessThan(1e-7);
  });

  it('stays within the analytic ripple bound when the window does not hold whole periods', () => {
    // Over N samples, mean(sin²(ωn + φ)) = 1/2 − mean(cos(2ωn + 2φ))/2 and
    // |Σ cos(2ωn + 2φ)| ≤ 1/|sin ω| (geometric series), so |RMS²/(A²/2) − 1| ≤ 1/(N·|sin ω|).
    const fs = 44100;
    const f = 997;
    const A = 0.8;
    const env = rmsEnvelope(computeFrameStats(sine(fs, f, A, fs), fs));
    const bound = 1 / (441 * Math.sin((2 * Math.PI * f) / fs));
    let worst = 0;
    for (let k = 5; k < 995; k++) worst = Math.max(worst, Math.abs(env[k] ** 2 / (A * A / 2) - 1));
    expect(worst).toBeLessThan(bound);
    // The bound is not vacuous here: the ripple is really there, at most ~1.6 %.
    expect(worst).toBeGreaterThan(1e-4);
    expect(bound).toBeLessThan(0.02);
  });

  it('windows centred by default and trailing on request', () => {
    // Silence, then a constant 0.5 from 100 ms on, 48 kHz, 1 ms frames, 10 ms window.
    const fs = 48000;
    const x = new Float32Array(fs / 5);
    x.fill(0.5, fs / 10);
    const st = computeFrameStats(x, fs);
    const centred = rmsEnvelope(st);
    const trailing = rmsEnvelope(st, { align: 'trailing' });
    // Centred: frame k averages frames k−5 … k+4: first non-zero at 96, full at 105.
    expect(centred[95]).toBe(0);
    expect(centred[96]).toBeCloseTo(0.5 * Math.sqrt(0.1), 14);
    expect(centred[104]).toBeLessThan(0.5);
    expect(centred[105]).toBeCloseTo(0.5, 14);
    // Trailing: frame k averages frames k−9 … k: first non-zero at 100, full at 109.
    expect(trailing[99]).toBe(0);
    expect(trailing[100]).toBeCloseTo(0.5 * Math.sqrt(0.1), 14);
    expect(trailing[108]).toBeLessThan(0.5);
    expect(trailing[109]).toBeCloseTo(0.5, 14);
    // At the clip's ends windows are cut, not zero-padded: a constant stays constant.
    expect(centred[199]).toBeCloseTo(0.5, 14);
  });

  it('rounds the window to whole frames and accepts wider windows', () => {
    const fs = 48000;
    const st = computeFrameStats(sine(fs, 50, 1, fs), fs);
    // 400 ms window: 20 periods of 50 Hz, so RMS is 1/√2 wherever the window is whole.
    const env = rmsEnvelope(st, { windowS: 0.4 });
    for (const k of [200, 500, 799]) expect(env[k]).toBeCloseTo(Math.SQRT1_2, 7);
    // 0.4 ms rounds to a single 1 ms frame: 1 ms of 50 Hz is not a whole period, so it differs.
    const one = rmsEnvelope(st, { windowS: 0.0004 });
    expect(one[3]).toBeCloseTo(Math.sqrt(st.meanSquare[3]), 14);
  });

  it('keeps quiet passages exact after loud ones (no rounding residue)', () => {
    // 1 s at full scale, then 1 s at −120 dBFS (1e-6): sliding sums must not leave loud residue.
    const fs = 48000;
    const x = new Float32Array(2 * fs);
    x.set(sine(fs, 1000, 1, fs));
    x.set(sine(fs, 1000, 1e-6, fs), fs);
    const env = rmsEnvelope(computeFrameStats(x, fs));
    for (let k = 1030; k < 2000; k++) {
      // 1e-6 relative: float32 rounding of the 1e-6 sine. A plain running sum would carry the
      // rounding of ~1000 loud slides (window energy 480·0.5 = 240, ulp 3e-14) into this window's
      // energy (480·5e-13 = 2.4e-10): tried, it errs by 8.6e-5 relative, which this catches.
      expect(Math.abs(env[k] / (1e-6 * Math.SQRT1_2) - 1)).toBeLessThan(1e-6);
    }
  });

  it('scales with gain and writes into a caller buffer', () => {
    const fs = 48000;
    const x = sine(fs / 10, 440, 0.3, fs);
    const st = computeFrameStats(x, fs);
    const st2 = computeFrameStats(x.map((v) => 2 * v), fs);
    const out = new Float64Array(200);
    const a = rmsEnvelope(st, { out });
    expect(a.buffer).toBe(out.buffer);
    const b = rmsEnvelope(st2);
    for (const k of [0, 37, 99]) expect(b[k]).toBeCloseTo(2 * a[k], 14);
    expect(() => rmsEnvelope(st, { windowS: 0 })).toThrow(/windowS/);
  });
});
