/**
 * The heavy-limiting note (shared/plan/quality.ts) on a full-scale sine, whose magnitude
 * distribution is known in closed form (arcsine law: P(|sin| > a) = 1 − (2/π)·asin a).
 */
import { describe, expect, it } from 'vitest';
import { magnitudeHistogram } from '../../../shared/dsp/histogram.ts';
import { HEAVY_LIMITING_DEPTH_DB, HEAVY_LIMITING_SHARE, limitingNote } from '../../../shared/plan/quality.ts';
import { dbToAmp } from '../../../shared/units.ts';

const FS = 48000;
// 997 Hz (prime to the rate) for 2 s: the phases cover the cycle evenly.
const sine = Float32Array.from({ length: 2 * FS }, (_, i) => Math.sin((2 * Math.PI * 997 * i) / FS));
const hist = magnitudeHistogram(sine);
const arcsineAbove = (a: number) => 1 - (2 / Math.PI) * Math.asin(a);

describe('limitingNote', () => {
  it('estimates the share cut by more than 1 dB from the level distribution (arcsine law)', () => {
    // At +6 dB under a 0 dBFS ceiling a sample is cut by more than 1 dB when |x| > 10^(1/20)/10^(6/20).
    const n = limitingNote(hist, 6, 0);
    expect(n.basis).toBe('estimated');
    expect(n.depthDb).toBe(HEAVY_LIMITING_DEPTH_DB);
    // Tolerance: the histogram resolves levels to a fraction of a dB (shared/dsp/histogram.ts), ±0.01 in share here.
    expect(n.deepShare).toBeCloseTo(arcsineAbove(dbToAmp(1 - 6)), 2);
    expect(n.heavy).toBe(true);
    expect(n.note).toMatch(/Heavy limiting: \d+\.\d % of the samples would be cut by more than 1 dB .* sound squashed\. This is about sound, not safety\./);
  });

  it('suggests the gain at which the share falls to the stated limit, and finds that gain not heavy', () => {
    const n = limitingNote(hist, 6, 0);
    // The 99th percentile of |sin| is sin(0.99·π/2) = 0.99988, so the gain is about 20·log10(10^(1/20)/0.99988) = 1.0 dB.
    const expected = 20 * Math.log10(dbToAmp(1) / Math.sin((0.99 * Math.PI) / 2));
    expect(n.gainDbWithoutHeavyLimiting!).toBeGreaterThan(expected - 0.25);
    expect(n.gainDbWithoutHeavyLimiting!).toBeLessThanOrEqual(expected + 1e-9);
    const at = limitingNote(hist, n.gainDbWithoutHeavyLimiting!, 0);
    expect(at.deepShare).toBeLessThanOrEqual(HEAVY_LIMITING_SHARE);
    expect(at.heavy).toBe(false);
    expect(at.note).toBeNull();
  });

  it("takes a render's measured share for the verdict, and aims lower by the limiter's spread", () => {
    const est = limitingNote(hist, 6, 0);
    const measured = limitingNote(hist, 6, 0, Math.min(1, 1.2 * est.deepShare));
    expect(measured.basis).toBe('measured');
    expect(measured.note).toMatch(/samples are cut/);
    expect(measured.gainDbWithoutHeavyLimiting!).toBeLessThanOrEqual(est.gainDbWithoutHeavyLimiting!);
    // A ceiling below full scale lowers the suggestion by as much.
    expect(limitingNote(hist, 6, -3).gainDbWithoutHeavyLimiting!).toBeCloseTo(est.gainDbWithoutHeavyLimiting! - 3, 0);
  });
});
