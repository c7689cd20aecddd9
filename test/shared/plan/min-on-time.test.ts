// The minimum pulse on-time (shared/plan/pulse-train.ts pulsesAtGain, pulseLimitsFor; the warning in
// shared/plan/evaluate.ts): pulses the coil cannot ring up are dropped, counted and reported.
import { describe, expect, it } from 'vitest';
import { evaluateAtGain, planSettings, SHORT_PULSE_WARN_SHARE } from '../../../shared/plan/evaluate.ts';
import { DEFAULT_MIN_ON_RF_CYCLES, pulseLimitsFor, pulsesAtGain } from '../../../shared/plan/pulse-train.ts';
import { planClipReport } from '../../../shared/plan/report.ts';
import { parseDriverProfile } from '../../../shared/schemas/driver.ts';
import { COIL, COIL_WITH_CORNER, concat, mosfet, planClip, pulseDriver, tone } from './fixtures.ts';

const events = (times: number[], levels: number[]) => ({
  mode: 'zero-crossing' as const,
  timeS: Float64Array.from(times),
  level: Float32Array.from(levels),
  durationS: 1,
});

describe('minimum on-time', () => {
  it('drops exactly the pulses of a train with known widths that are shorter than the minimum', () => {
    // On-time law maxOnTimeS·g·level at g = 1 with maxOnTimeS = 100 µs: widths 5, 20, 8, 100, 9.99, 10 µs.
    // Events 10 ms apart, so neither the off-time nor the duty limit acts. Minimum 10 µs: the 5, 8
    // and 9.99 µs pulses are dropped, the 10 µs one is kept (the limit is "shorter than").
    const levels = [0.05, 0.2, 0.08, 1, 0.0999, 0.1];
    const times = levels.map((_, i) => 0.01 * (i + 1));
    const t = pulsesAtGain(events(times, levels), 1, { maxOnTimeS: 100e-6, minOffTimeS: 1e-3, maxDuty: 0.5, minOnTimeS: 10e-6 });
    expect(t.minOnTimeDropped).toBe(3);
    expect(t.count).toBe(3);
    expect(Array.from(t.onS.subarray(0, t.count)).map((x) => Math.round(x * 1e8) / 100)).toEqual([20, 100, 10]);
    expect(Array.from(t.startS.subarray(0, t.count))).toEqual([0.02, 0.04, 0.06]);
    expect(t.events).toBe(6);
    expect(t.minOnTimeS).toBe(10e-6);
    // Without a minimum nothing is dropped (the limits' old behaviour).
    expect(pulsesAtGain(events(times, levels), 1, { maxOnTimeS: 100e-6, minOffTimeS: 1e-3, maxDuty: 0.5 }).minOnTimeDropped).toBe(0);
  });

  it('a dropped pulse is not the previous pulse of the next one for the off-time limit', () => {
    // Pulse at 0 (5 µs, dropped), next 0.2 ms later (50 µs): with a 0.5 ms minimum off-time it would
    // have been refused after a kept first pulse; after a dropped one it is sent.
    const t = pulsesAtGain(events([0, 2e-4], [0.05, 0.5]), 1, { maxOnTimeS: 100e-6, minOffTimeS: 5e-4, maxDuty: 1, minOnTimeS: 10e-6 });
    expect(t.minOnTimeDropped).toBe(1);
    expect(t.offTimeDropped).toBe(0);
    expect(t.count).toBe(1);
    expect(t.startS[0]).toBe(2e-4);
  });

  it('defaults to three RF cycles at the resonance unless the profile gives one', () => {
    const lim = { maxOnTimeS: 150e-6, minOffTimeS: 1e-3, maxDuty: 0.08 };
    // 3 cycles at 318 kHz = 9.434 µs (hand value).
    expect(DEFAULT_MIN_ON_RF_CYCLES).toBe(3);
    expect(pulseLimitsFor(lim, 318e3).minOnTimeS).toBeCloseTo(9.434e-6, 9);
    expect(pulseLimitsFor({ ...lim, minOnTimeS: 2e-6 }, 318e3).minOnTimeS).toBe(2e-6);
    expect(pulseLimitsFor({ ...lim, minOnTimeS: 0 }, 318e3).minOnTimeS).toBe(0);
  });

  it('the plan counts the dropped pulses and warns when the clip depends on them', () => {
    // A 200 Hz tone loud for 1 s, then 12 dB down for 1 s. Minimum 40 µs, maximum 150 µs at 0 dB:
    // the loud cycles give ≈ 150·0.5 = 75 µs, the quiet ones ≈ 19 µs, so half the pulses are dropped.
    const base = pulseDriver(mosfet('bridge', { rKPerW: 0.5, tauS: 0.01, sinkToAmbientKPerW: 1 }), { maxDuty: 0.5, minOnTimeS: 40e-6 });
    const clip = planClip('p', concat(tone(200, 0.5, 1), tone(200, 0.125, 1)), { pulses: true });
    const e = evaluateAtGain(clip, COIL, base, 0, planSettings(base));
    const share = e.pulses!.minOnTimeDropped / e.pulses!.events;
    expect(share).toBeGreaterThan(0.45);
    expect(share).toBeLessThan(0.55);
    expect(e.pulses!.minOnTimeShare).toBeCloseTo(share, 12);
    expect(e.pulses!.count + e.pulses!.minOnTimeDropped).toBe(e.pulses!.events);
    expect(share).toBeGreaterThan(SHORT_PULSE_WARN_SHARE);
    expect(e.sim.warnings.join(' ')).toMatch(/pulses: \d+ of \d+ pulses \(\d+\.\d %\) are shorter than the 40\.0 µs minimum on-time.*cannot ring up/);
    const { report } = planClipReport(clip, COIL_WITH_CORNER, base, planSettings(base), { gainDb: 0 });
    expect(report.pulses!.minOnTimeDropped).toBe(e.pulses!.minOnTimeDropped);
    expect(report.warnings.join(' ')).toMatch(/shorter than the 40\.0 µs minimum on-time/);
    // Loud only: at most the last cycle (cut by the clip's end, so its level is lower) is dropped, and no warning.
    const loud = evaluateAtGain(planClip('l', tone(200, 0.5, 1), { pulses: true }), COIL, base, 0, planSettings(base));
    expect(loud.pulses!.minOnTimeDropped).toBeLessThanOrEqual(1);
    expect(loud.sim.warnings.join(' ')).not.toMatch(/minimum on-time/);
  });

  it('a profile without minOnTimeS gets the three-cycle default in the plan; a minimum above the maximum is refused', () => {
    const base = pulseDriver(mosfet('bridge', { rKPerW: 0.5, tauS: 0.01, sinkToAmbientKPerW: 1 }));
    const json = JSON.parse(JSON.stringify(base));
    delete json.pulse.minOnTimeS;
    const d = parseDriverProfile(json);
    const clip = planClip('p', tone(200, 0.5, 1), { pulses: true });
    expect(evaluateAtGain(clip, COIL, d, 0, planSettings(d)).pulses!.minOnTimeS).toBeCloseTo(3 / COIL.resonanceHz, 15);
    json.pulse.minOnTimeS = 2e-4;
    expect(() => parseDriverProfile(json)).toThrow(/pulse\.minOnTimeS .* is longer than pulse\.maxOnTimeS/);
  });
});
