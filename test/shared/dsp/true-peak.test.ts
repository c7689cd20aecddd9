/**
 * True peak by ITU-R BS.1770-4 Annex 2, checked with the EBU Tech 3341 (2016) minimum-requirement
 * cases 15–19 (sines at fs/4, fs/6, fs/8 with chosen phases, 48 kHz, 10 ms fades), required
 * +0.2/−0.4 dB of the nominal value. We also hold the filter output to ±0.002 dB of the [calc]
 * values of the Annex 2 FIR in float64 (test/fixtures/loudness/reference_values.py).
 */
import { describe, expect, it } from 'vitest';
import { ampToDb } from '../../../shared/units.ts';
import {
  TRUE_PEAK_PHASES,
  channelTruePeakLinear,
  measureTruePeak,
  oversampledPeakLinear,
  samplePeakLinear,
} from '../../../shared/dsp/true-peak.ts';
import { fadedSine, lcg, musicLike } from './loudness-test-signals.ts';

type Case = [id: number, cyclesPerSample: number, amp: number, phaseDeg: number, nominal: number, filterDb: number, samplesDb: number];
// [calc] filter-alone and sample-peak levels (dB) from reference_values.py.
const cases: Case[] = [
  [15, 1 / 4, 0.5, 0, -6, -6.2171, -6.0206],
  [16, 1 / 4, 0.5, 45, -6, -5.9759, -9.0309],
  [17, 1 / 6, 0.5, 60, -6, -6.3133, -7.27],
  [18, 1 / 8, 0.5, 67.5, -6, -6.0265, -6.7083],
  [19, 1 / 4, 1.41, 45, 3, 3.0291, -0.0259],
];

describe('EBU Tech 3341 true-peak cases 15–19', () => {
  it.each(cases)('case %d', (_id, cps, amp, ph, nominal, filterDb, samplesDb) => {
    const x = fadedSine(cps, amp, ph);
    const tp = measureTruePeak([x, x], 48000);
    // EBU Tech 3341: nominal +0.2 / −0.4 dB.
    expect(tp.truePeakDbtp).toBeLessThanOrEqual(nominal + 0.2);
    expect(tp.truePeakDbtp).toBeGreaterThanOrEqual(nominal - 0.4);
    // Our documented rule: max(sample peak, filter output), each against [calc].
    expect(Math.abs(ampToDb(oversampledPeakLinear(x)) - filterDb)).toBeLessThan(2e-3);
    expect(Math.abs(ampToDb(samplePeakLinear(x)) - samplesDb)).toBeLessThan(2e-3);
    expect(Math.abs(tp.truePeakDbtp - Math.max(filterDb, samplesDb))).toBeLessThan(2e-3);
    expect(tp.perChannelLinear).toHaveLength(2);
  });
});

describe('the Annex 2 filter', () => {
  it('has the published symmetry and passes DC with gain ≈ 1 in every branch', () => {
    // BS.1770-4 Annex 2: branch 2 = branch 1 reversed, branch 3 = branch 0 reversed. Σ taps is the
    // DC gain of each branch: 1.00159 and 0.97302 (sums of the published taps), i.e. within 0.03.
    expect([...TRUE_PEAK_PHASES[2]].reverse()).toEqual([...TRUE_PEAK_PHASES[1]]);
    expect([...TRUE_PEAK_PHASES[3]].reverse()).toEqual([...TRUE_PEAK_PHASES[0]]);
    for (const h of TRUE_PEAK_PHASES) expect(Math.abs(h.reduce((s, v) => s + v, 0) - 1)).toBeLessThan(0.03);
  });

  it('catches an inter-sample peak the samples miss by 3 dB', () => {
    // fs/4 sine at 45°: samples at ±A/√2 (−3.01 dB), the waveform reaches A. 4× oversampling
    // under-reads by at most 20·log10(cos(π/16)) = −0.17 dB at fs/4 (common practice bound).
    const x = fadedSine(1 / 4, 0.25, 45);
    expect(ampToDb(samplePeakLinear(x) / 0.25)).toBeCloseTo(-3.0103, 3);
    expect(ampToDb(channelTruePeakLinear(x) / 0.25)).toBeGreaterThan(-0.17);
  });

  it('sees the overshoot of a clip that ends on a peak (filter runs past the end)', () => {
    // One full-scale sample at the very end: its impulse response peaks at the 0.972 centre tap,
    // 6 input periods later, so the flushed tail must be filtered. Σ|h| bound ⇒ ≤ 1.
    const x = new Float32Array(100);
    x[99] = 1;
    expect(oversampledPeakLinear(x)).toBeCloseTo(0.97216796875, 12);
    expect(channelTruePeakLinear(x)).toBe(1);
  });

  it('handles silence, empty and very short clips', () => {
    const silent = measureTruePeak([new Float32Array(1000)], 48000);
    expect(silent.truePeakLinear).toBe(0);
    expect(silent.truePeakDbtp).toBe(-Infinity);
    expect(channelTruePeakLinear(new Float32Array(0))).toBe(0);
    expect(channelTruePeakLinear(Float32Array.of(-0.5))).toBe(0.5);
  });

  it('reads views at any offset, and ignores NaN samples, as the plain float pass does', () => {
    // Pass 1 reads the samples' bit patterns through an Int32Array view of the same memory, so a view
    // at an odd element offset must give exactly what a copy gives. A NaN sample makes its own
    // filter outputs NaN, which never count, and must not count as a sample peak: with the loud
    // burst elsewhere, the result equals that of the same clip with the NaN replaced by 0
    // (reference: the NaN-free clip; exact, both evaluate the same finite outputs above 0.2).
    const x = musicLike(1, 48000, 4, 0.5);
    for (const offset of [1, 3, 5, 17]) {
      x.fill(1, 0, offset); // full scale just before the view: it must not be read
      const view = x.subarray(offset, x.length - 2);
      expect(channelTruePeakLinear(view)).toBe(channelTruePeakLinear(view.slice()));
      expect(channelTruePeakLinear(view)).toBeLessThan(0.6);
    }
    const rnd = lcg(3);
    const quiet = Float32Array.from({ length: 3001 }, () => (rnd() - 0.5) * 0.1);
    quiet[500] = 0.9;
    const withNaN = quiet.slice();
    withNaN[2000] = Number.NaN;
    quiet[2000] = 0;
    expect(channelTruePeakLinear(withNaN)).toBe(channelTruePeakLinear(quiet));
    expect(oversampledPeakLinear(withNaN)).toBe(oversampledPeakLinear(quiet));
    expect(channelTruePeakLinear(new Float32Array(40).fill(Number.NaN))).toBe(0);
  });

  it('validates its arguments', () => {
    expect(() => measureTruePeak([], 48000)).toThrow(RangeError);
    expect(() => measureTruePeak([new Float32Array(3), new Float32Array(4)], 48000)).toThrow(RangeError);
    expect(() => measureTruePeak([new Float32Array(3)], Number.NaN)).toThrow(RangeError);
  });
});
