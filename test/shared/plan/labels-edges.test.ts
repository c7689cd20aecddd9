/**
 * The wording of the plan's limits, duty figures, cautions and limiting note at their edges: a
 * switching-speed limit within and past its edge, frequencies either side of 1 MHz, values that
 * are not finite, a duty window of zero length, devices without a heat sink, a silent clip, and
 * the limiter's measured spread. The expected strings are written out by hand.
 */
import { describe, expect, it } from 'vitest';
import { DEMO_DRIVER_LINEAR } from '../../../shared/demo/drivers.ts';
import { magnitudeHistogram } from '../../../shared/dsp/histogram.ts';
import { planCautions } from '../../../shared/plan/cautions.ts';
import { dutyCycleFigures } from '../../../shared/plan/duty-cycle.ts';
import type { LimitName } from '../../../shared/plan/evaluate.ts';
import { LIMIT_LABELS, limitLabel, limitText, limitValueText } from '../../../shared/plan/limit-labels.ts';
import { HEAVY_LIMITING_SHARE, limitingNote } from '../../../shared/plan/quality.ts';
import { ampToDb, dbToAmp } from '../../../shared/units.ts';

describe('limitLabel and limitText: switching speed', () => {
  const within = { limit: 'switching-speed' as const, role: 'bridge' as const, value: 0.123, allowed: 0.2, unit: 'share' as const, frequencyHz: 310e3 };

  it('names the frequency within the edge, in kHz below 1 MHz and MHz from 1 MHz', () => {
    expect(limitLabel(within)).toBe('switching speed (bridge) at 310 kHz');
    expect(limitLabel({ ...within, frequencyHz: 1e6 })).toBe('switching speed (bridge) at 1.00 MHz');
    expect(limitLabel({ ...within, frequencyHz: 999e3 })).toBe('switching speed (bridge) at 999 kHz');
    expect(limitLabel({ ...within, frequencyHz: 3.14e6 })).toBe('switching speed (bridge) at 3.14 MHz');
    expect(limitText(within)).toBe('switching speed (bridge) at 310 kHz: transitions 12.3 % of each cycle (at most 20 %)');
  });

  it('reads as the advice words it only past the edge (value above allowed)', () => {
    expect(limitLabel({ ...within, value: 0.25 })).toBe('bridge switch: too slow for 310 kHz');
    // at the edge itself it still holds
    expect(limitLabel({ ...within, value: 0.2 })).toBe('switching speed (bridge) at 310 kHz');
    // without a value or an allowed figure there is nothing to be past
    expect(limitLabel({ limit: 'switching-speed', role: 'bridge', frequencyHz: 310e3, allowed: 0.2 })).toBe('switching speed (bridge) at 310 kHz');
    expect(limitLabel({ limit: 'switching-speed', role: 'bridge', frequencyHz: 310e3, value: 0.25 })).toBe('switching speed (bridge) at 310 kHz');
  });

  it('falls back to the plain name without a role or a frequency', () => {
    expect(limitLabel({ limit: 'switching-speed', role: null, frequencyHz: 310e3, value: 0.25, allowed: 0.2 })).toBe('switching speed');
    expect(limitLabel({ limit: 'switching-speed', role: 'modulator', value: 0.25, allowed: 0.2 })).toBe('switching speed (modulator)');
  });
});

describe('limitLabel and limitValueText: other limits', () => {
  it('uses the plain names, with the role when there is one, and the key itself for a name it does not know', () => {
    expect(limitLabel({ limit: 'junction-temperature', role: 'modulator' })).toBe('junction temperature (modulator)');
    expect(limitLabel({ limit: 'supply-current', role: null })).toBe('supply current');
    expect(limitLabel({ limit: 'on-time', role: null })).toBe(LIMIT_LABELS['on-time']);
    expect(limitLabel({ limit: 'some-new-limit' as LimitName, role: null })).toBe('some-new-limit');
  });

  it('names a frequency only for the switching-speed limit: another limit that carries one keeps its plain name', () => {
    expect(limitLabel({ limit: 'junction-temperature', role: 'bridge', frequencyHz: 310e3 })).toBe('junction temperature (bridge)');
    expect(limitLabel({ limit: 'junction-temperature', role: 'bridge', frequencyHz: 310e3, value: 150, allowed: 140 })).toBe('junction temperature (bridge)');
  });

  it('writes a value in its unit, a dash when it is not finite, and a share with its base only when the limit is named', () => {
    expect(limitValueText(Number.POSITIVE_INFINITY, 'C')).toBe('—');
    expect(limitValueText(Number.NaN, 'A')).toBe('—');
    expect(limitValueText(71.25, 'C')).toBe('71.3 °C');
    expect(limitValueText(0.00123, 'share')).toBe('0.123 %');
    expect(limitValueText(0.00123, 'share', 'on-time')).toBe('0.123 % of pulses');
    expect(limitValueText(0.00123, 'share', 'supply-current')).toBe('0.123 %');
  });

  it('gives the allowed share without its base (it is said once, after the value)', () => {
    expect(limitText({ limit: 'on-time', role: null, value: 0.02, allowed: 0.001, unit: 'share' })).toBe(
      'pulses cut to the longest on-time: 2.000 % of pulses, allowed 0.100 %',
    );
    expect(limitText({ limit: 'supply-current', role: null, value: 7.5, allowed: 6, unit: 'A' })).toBe('supply current: 7.50 A, allowed 6.00 A');
  });
});

describe('dutyCycleFigures at its edges', () => {
  it('counts two pulses starting together as a full duty, and keeps the first of equal worst duties', () => {
    // Periods 10 ms and 10 ms with on-times 1 ms and 1 ms: both 10 %, the first one is reported.
    const even = dutyCycleFigures({ startS: Float64Array.of(0, 0.01, 0.02), onS: Float64Array.of(1e-3, 1e-3, 1e-3), count: 3 }, 0.03, 0.2);
    expect(even.worstDuty).toBeCloseTo(0.1, 12);
    expect(even.worstAtS).toBe(0.01);
    expect(even.meanDuty).toBeCloseTo(0.1, 12);
    const together = dutyCycleFigures({ startS: Float64Array.of(0.005, 0.005), onS: Float64Array.of(1e-4, 1e-4), count: 2 }, 0.01, 0.2);
    expect(together.worstDuty).toBe(1);
    expect(together.worstAtS).toBe(0.005);
  });

  it('gives a mean of 0 over a clip of no length, and counts only `count` pulses of the arrays', () => {
    expect(dutyCycleFigures({ startS: new Float64Array(0), onS: new Float64Array(0), count: 0 }, 0, 0.1)).toEqual({
      window: expect.stringMatching(/^one pulse period/),
      meanDuty: 0,
      worstDuty: 0,
      worstAtS: null,
      maxDuty: 0.1,
    });
    // Arrays longer than the train (a reused buffer): the tail is not read.
    const d = dutyCycleFigures({ startS: Float64Array.of(0, 0.01, 0.0101), onS: Float64Array.of(1e-3, 1e-3, 1e-4), count: 2 }, 0.02, 0.2);
    expect(d.meanDuty).toBeCloseTo(0.1, 12);
    expect(d.worstDuty).toBeCloseTo(0.1, 12);
  });
});

describe('planCautions: which figures are named as estimated', () => {
  it('lists only the switch figures when resonance and Q are measured and no device has a heat sink', () => {
    const noSinks = { scheme: DEMO_DRIVER_LINEAR.scheme, devices: DEMO_DRIVER_LINEAR.devices.map((d) => ({ ...d, thermal: { ...d.thermal, sinkToAmbientKPerW: 0 } })) };
    const c = planCautions({ resonanceMeasuredHz: 300e3, qualityFactorMeasured: 40, keepOutM: 0.8 }, noSinks);
    expect(c.estimated).toHaveLength(1);
    expect(c.estimated[0]).toMatch(/^switch figures \(on-resistance/);
    expect(c.keepOut).toMatch(/^Keep everyone beyond the keep-out distance \(0\.80 m from the top load\);/);
  });

  it('names only the roles whose device has a heat sink, each once', () => {
    const devices = [
      { ...DEMO_DRIVER_LINEAR.devices[0], thermal: { ...DEMO_DRIVER_LINEAR.devices[0].thermal, sinkToAmbientKPerW: 0 } },
      DEMO_DRIVER_LINEAR.devices[1],
    ];
    const c = planCautions({ resonanceMeasuredHz: 300e3, qualityFactorMeasured: 40, keepOutM: null }, { scheme: 'rail-linear', devices });
    expect(c.estimated.find((l) => l.startsWith('heat sinks'))).toMatch(/^heat sinks \(pass\): /);
    const both = planCautions({ resonanceMeasuredHz: 300e3, qualityFactorMeasured: 40, keepOutM: null }, DEMO_DRIVER_LINEAR);
    expect(both.estimated.find((l) => l.startsWith('heat sinks'))).toMatch(/^heat sinks \(bridge, pass\): /);
  });
});

describe('limitingNote at its edges', () => {
  const FS = 48000;
  const sine = Float32Array.from({ length: 2 * FS }, (_, i) => Math.sin((2 * Math.PI * 997 * i) / FS));
  const hist = magnitudeHistogram(sine);

  it('says nothing for a silent clip, and on a measured share without levels gives the verdict but no gain', () => {
    const silent = magnitudeHistogram(new Float32Array(1000).fill(0));
    const quiet = limitingNote(silent, 40, 0);
    expect(quiet).toMatchObject({ deepShare: 0, heavy: false, gainDbWithoutHeavyLimiting: null, note: null });
    const empty = magnitudeHistogram(new Float32Array(0));
    const measured = limitingNote(empty, 6, 0, 0.05);
    expect(measured.heavy).toBe(true);
    expect(measured.gainDbWithoutHeavyLimiting).toBeNull();
    expect(measured.note).toBe(
      'Heavy limiting: 5.0 % of the samples are cut by more than 1 dB (more than 1.0 %), so the music will sound squashed. This is about sound, not safety.',
    );
  });

  it('gives no estimate at zero linear gain, and no note at exactly the stated share', () => {
    expect(limitingNote(hist, Number.NEGATIVE_INFINITY, 0).deepShare).toBe(0);
    const atShare = limitingNote(hist, 6, 0, HEAVY_LIMITING_SHARE);
    expect(atShare.heavy).toBe(false);
    expect(atShare.note).toBeNull();
    expect(atShare.gainDbWithoutHeavyLimiting).toBeNull();
  });

  it("aims the suggestion at the stated share divided by the limiter's measured spread (arcsine law)", () => {
    // A render that cut twice the estimated share deeply: spread 2, so the suggestion keeps
    // 0.5 % of samples above the deep level instead of 1 %. For a full-scale sine the (1 − s)
    // quantile of |x| is sin((1 − s)·π/2), and the gain g with 10^(1/20)/g at that quantile is
    // 20·log10(10^(1/20)/sin((1 − s)·π/2)); the note floors to 0.1 dB and the histogram resolves
    // the quantile to a fraction of a dB, so within 0.15 dB.
    const est = limitingNote(hist, 6, 0);
    const twice = limitingNote(hist, 6, 0, 2 * est.deepShare);
    const expectDb = (s: number) => ampToDb(dbToAmp(1) / Math.sin(((1 - s) * Math.PI) / 2));
    expect(Math.abs(est.gainDbWithoutHeavyLimiting! - expectDb(HEAVY_LIMITING_SHARE))).toBeLessThan(0.15);
    expect(Math.abs(twice.gainDbWithoutHeavyLimiting! - expectDb(HEAVY_LIMITING_SHARE / 2))).toBeLessThan(0.15);
    expect(expectDb(HEAVY_LIMITING_SHARE) - expectDb(HEAVY_LIMITING_SHARE / 2)).toBeGreaterThan(0.0005);
    // A render that cut fewer than estimated: the spread is never below 1, so the aim is the estimate's.
    const fewer = limitingNote(hist, 6, 0, 0.5 * est.deepShare);
    expect(fewer.gainDbWithoutHeavyLimiting).toBe(est.gainDbWithoutHeavyLimiting);
    expect(fewer.note).toMatch(/ At about \d+\.\d dB it would not be \(estimated from the clip's levels\)\.$/);
  });

  it('never suggests a gain above the one asked about', () => {
    // At +1.05 dB the sine is cut deeper than 1 dB only at its crests (|x| > 10^(−0.05/20) = 0.9943:
    // 7 % of samples, arcsine law), so heavy; the level-based suggestion (~1.0 dB) would sit above
    // 1.05 − 0.1 dB, and the suggestion is capped 0.1 dB below the gain asked about.
    const n = limitingNote(hist, 1.05, 0);
    expect(n.heavy).toBe(true);
    expect(n.gainDbWithoutHeavyLimiting).toBe(0.9);
  });

  it('estimates nothing for a clip without samples (no levels to read), and gives no gain when the aim falls on silence', () => {
    const empty = magnitudeHistogram(new Float32Array(0));
    expect(limitingNote(empty, 6, 0)).toMatchObject({ deepShare: 0, basis: 'estimated', heavy: false, note: null });
    // A silent clip with a measured heavy share: the aim, the (1 − 1 %/spread) quantile, is 0 (every
    // sample is), and no gain brings a level of 0 under the ceiling's deep level: no suggestion.
    const silent = magnitudeHistogram(new Float32Array(1000));
    const n = limitingNote(silent, 6, 0, 0.05);
    expect(n.heavy).toBe(true);
    expect(n.gainDbWithoutHeavyLimiting).toBeNull();
  });

  it("moves the suggestion from one level step to the next as the limiter's spread moves the aimed quantile past it", () => {
    // Three levels, chosen so the quantiles are far apart (hand values): 0.6 % of samples at 1.0,
    // 0.6 % at 0.5, the rest at 0.1. At +12 dB (×3.98) the deep level 10^(1/20)/3.98 = 0.282 lies
    // below 0.5 and 1.0: 1.2 % of samples are cut deeply, heavy (> 1 %). Estimate alone (spread 1):
    // the 99th percentile is 0.5 (98.8 % of samples are ≤ 0.1, 99.4 % ≤ 0.5), so the suggestion is
    // 20·log10(10^(1/20)/0.5) = 7.02 dB → 7.0. A render that cut twice the estimate (spread 2) aims
    // at 0.5 %: the 99.5th percentile is 1.0, 1 dB → 0.9 (floored to 0.1 dB below 20·log10(1.122) =
    // 1.0 minus rounding). A render that cut fewer than estimated (1.1 %, still heavy): the spread
    // stays 1, and so does the suggestion.
    const n = 100_000;
    const x = new Float32Array(n).fill(0.1);
    x.fill(1, 0, 600);
    x.fill(0.5, 600, 1200);
    const hist = magnitudeHistogram(x);
    const est = limitingNote(hist, 12, 0);
    expect(est.deepShare).toBeCloseTo(0.012, 6);
    expect(est.gainDbWithoutHeavyLimiting).toBeCloseTo(ampToDb(dbToAmp(1) / 0.5), 0);
    expect(Math.abs(est.gainDbWithoutHeavyLimiting! - 7.0)).toBeLessThanOrEqual(0.1);
    const twice = limitingNote(hist, 12, 0, 0.024);
    expect(Math.abs(twice.gainDbWithoutHeavyLimiting! - 1.0)).toBeLessThanOrEqual(0.1);
    const fewer = limitingNote(hist, 12, 0, 0.011);
    expect(fewer.heavy).toBe(true);
    expect(fewer.gainDbWithoutHeavyLimiting).toBe(est.gainDbWithoutHeavyLimiting);
  });
});
