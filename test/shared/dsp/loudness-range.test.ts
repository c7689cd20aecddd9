/**
 * Loudness range by EBU Tech 3342 (2016). Cases from Tech 3342's test signals: stereo 1 kHz sines,
 * 20 s per level, 48 kHz; required LRA within ±1 LU. [calc] of the Tech 3342 algorithm in float64
 * (test/fixtures/loudness/reference_values.py) gives the nominal value to 4 decimals for all four
 * (the P10 and P95 windows are steady; transition windows fall between them), so we hold the result
 * to ±0.01 LU.
 */
import { describe, expect, it } from 'vitest';
import { loudnessRangeLu, percentileSorted } from '../../../shared/dsp/loudness-range.ts';
import { measureLoudness } from '../../../shared/dsp/loudness.ts';
import { steppedTone } from './loudness-test-signals.ts';

const lra = (levelsDbfs: number[]) => {
  const x = steppedTone(levelsDbfs.map((l) => [20, l] as [number, number]));
  return measureLoudness([x, x], 48000).loudnessRangeLu;
};

describe('EBU Tech 3342 cases', () => {
  it('case 1: −20 then −30 dBFS → LRA 10 LU', () => {
    // EBU Tech 3342 case 1: 10 ±1 LU.
    expect(Math.abs(lra([-20, -30]) - 10)).toBeLessThan(0.01);
  });
  it('case 2: −20 then −15 dBFS → LRA 5 LU', () => {
    // EBU Tech 3342 case 2: 5 ±1 LU.
    expect(Math.abs(lra([-20, -15]) - 5)).toBeLessThan(0.01);
  });
  it('case 3: −40 then −20 dBFS → LRA 20 LU (the −40 part survives the −20 LU relative gate)', () => {
    // EBU Tech 3342 case 3: 20 ±1 LU.
    expect(Math.abs(lra([-40, -20]) - 20)).toBeLessThan(0.01);
  });
  it('case 4: −50, −35, −20, −35, −50 dBFS → LRA 15 LU (the −50 parts fall under the relative gate)', () => {
    // EBU Tech 3342 case 4: 15 ±1 LU.
    expect(Math.abs(lra([-50, -35, -20, -35, -50]) - 15)).toBeLessThan(0.01);
  });
});

describe('loudnessRangeLu on a given series', () => {
  it('applies the percentile rule round((n − 1)·p/100 + 1), counted from 1', () => {
    // EBU Tech 3342 percentile rule: n = 21 values −40 … −20 → P10 at index 3 (−38), P95 at index 20 (−21).
    const levels = Float64Array.from({ length: 21 }, (_, i) => -40 + i);
    expect(percentileSorted(levels, 10)).toBe(-38);
    expect(percentileSorted(levels, 95)).toBe(-21);
    expect(loudnessRangeLu(levels)).toBeCloseTo(17, 12);
    // n = 11 values −40 … −30: P95 at 1-based round(10·0.95 + 1) = round(10.5) = 11 → −30 (halves
    // round up); P10 at round(2) = 2 → −39. LRA 9 LU; a truncating index would give 8.
    const eleven = Float64Array.from({ length: 11 }, (_, i) => -40 + i);
    expect(loudnessRangeLu(eleven)).toBeCloseTo(9, 12);
  });

  it('drops levels at or below −70 LUFS and more than 20 LU under the energy mean', () => {
    // Energy mean of the 12 levels above −70 LUFS: 10·log10((10·10^-2 + 10^-3.9 + 10^-4.5)/12)
    // = −20.78 → relative gate −40.78: −45 is out, −39 stays. Kept, sorted: [−39, −20 ×10];
    // n = 11: P10 at 0-based index round(1.0) = 1 → −20, P95 at round(9.5) = 10 → −20, LRA 0.
    const levels = [...Array(10).fill(-20), -39, -45, -80, -Infinity];
    expect(loudnessRangeLu(levels)).toBe(0);
    const wider = [...Array(10).fill(-20), ...Array(10).fill(-39), -45];
    // Mean −23.17 → gate −43.17, −45 out; n = 20 kept: P10 at index round(1.9) = 2 → −39,
    // P95 at round(18.05) = 18 → −20: LRA 19 LU.
    expect(loudnessRangeLu(wider)).toBeCloseTo(19, 12);
  });

  it('returns 0 when nothing passes the gates', () => {
    expect(loudnessRangeLu([])).toBe(0);
    expect(loudnessRangeLu([-Infinity, -75, -70])).toBe(0);
    expect(Number.isNaN(percentileSorted([], 50))).toBe(true);
  });
});
