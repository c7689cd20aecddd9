/**
 * shared/plan/evaluate.ts at its edges, pulse scheme, on hand-built pulse trains whose clamps can be
 * counted by hand: pulseLimitsFail against the on-time and duty shares (each alone, exactly at the
 * allowance, none allowed, rail schemes and clips without pulse events); the shares evaluateAtGain
 * reports; a tie between failing limits (the first is the worst); the exact wording of the
 * short-pulse warning and its threshold; and a profile without pulse limits.
 */
import { describe, expect, it } from 'vitest';
import { type PlanClip, createScratch, evaluateAtGain, planSettings, pulseLimitsFail, SHORT_PULSE_WARN_SHARE } from '../../../shared/plan/evaluate.ts';
import type { DriverProfile } from '../../../shared/schemas/driver.ts';
import { COIL, linearDriver, mosfet, planClip, pulseDriver, silence } from './fixtures.ts';

// Invented pulse driver (fixtures.ts): 300 V, 10 A pulses, 100 A supply limit; here 100 µs maximum
// on-time, 0.1 ms minimum off-time, duty ≤ 10 %, no minimum on-time.
const bridge = mosfet('bridge', { rKPerW: 0.5, tauS: 0.01, sinkToAmbientKPerW: 1 });
const PD = pulseDriver(bridge, { maxOnTimeS: 100e-6, minOffTimeS: 1e-4, maxDuty: 0.1 });

/** A silent clip of `durationS` (no over-modulation) carrying hand-built zero-crossing events. */
function eventsClip(timesS: number[], levels: number[], durationS: number): PlanClip {
  return {
    ...planClip('events', silence(durationS)),
    pulseEvents: { mode: 'zero-crossing', timeS: Float64Array.from(timesS), level: Float32Array.from(levels), durationS },
  };
}

// Ten events 10 ms apart at level 0.25, at 6 dB (g = 1.995): demanded on-time 100 µs·g·0.25 = 49.9 µs
// (on-time law, shared/plan/pulse-train.ts), inside every limit. Variants, each counted by hand:
// - LONG: event 2 at level 0.75 demands 149.6 µs > 100 µs: one on-time clamp;
// - CLOSE: event 5 0.3 ms after event 4 (gap after its end 250 µs ≥ 100 µs): duty cap 0.1·0.3 ms =
//   30 µs < 49.9 µs: one duty clamp (the next period, 9.7 ms, is wide enough);
// - BOTH: both changes. Every share is then 1/10 or 0.
const DB = 6;
const TIMES = [0, 10, 20, 30, 40, 50, 60, 70, 80, 90].map((ms) => ms / 1e3);
const LEVELS = TIMES.map(() => 0.25);
const long = LEVELS.map((l, i) => (i === 2 ? 0.75 : l));
const close = TIMES.map((t, i) => (i === 5 ? 0.0403 : t));
const PLAIN = eventsClip(TIMES, LEVELS, 0.1);
const LONG = eventsClip(TIMES, long, 0.1);
const CLOSE = eventsClip(close, LEVELS, 0.1);
const BOTH = eventsClip(close, long, 0.1);
const fails = (clip: PlanClip, allowedShare: number, d: DriverProfile = PD) =>
  pulseLimitsFail(clip, COIL, d, DB, planSettings(d, { allowedShare }), createScratch(clip));

describe('pulseLimitsFail', () => {
  it('fails when the on-time share alone, or the duty share alone, is over the allowance', () => {
    // 1/10 = 0.1 > 0.05 in each case.
    expect(fails(LONG, 0.05)).toBe(true);
    expect(fails(CLOSE, 0.05)).toBe(true);
    expect(fails(BOTH, 0.05)).toBe(true);
    expect(fails(PLAIN, 0.05)).toBe(false);
  });

  it('holds a share exactly at the allowance, and a train with no clamps when none is allowed', () => {
    // 1/10 and 0.1 are the same double; a share fails only when it is above the allowance.
    expect(fails(BOTH, 0.1)).toBe(false);
    expect(fails(PLAIN, 0)).toBe(false);
  });

  it('is false for a rail scheme (even one whose profile keeps pulse limits) and for a clip without pulse events', () => {
    const rail = linearDriver(mosfet('bridge', { rKPerW: 1, tauS: 0.004 }), mosfet('pass', { rKPerW: 1, tauS: 0.004 }));
    expect(fails(BOTH, 0, rail)).toBe(false);
    // A pulse block on a rail-scheme profile is valid (schemas/driver.ts asks for it only in the pulse scheme) and unused.
    const railWithPulse = linearDriver(rail.devices[0], rail.devices[1], { pulse: PD.pulse });
    expect(railWithPulse.pulse).toBeDefined();
    expect(fails(BOTH, 0, railWithPulse)).toBe(false);
    expect(fails({ ...BOTH, pulseEvents: undefined }, 0)).toBe(false);
  });

  it('agrees with the on-time and duty checks of the full evaluation', () => {
    for (const clip of [PLAIN, LONG, CLOSE, BOTH]) {
      for (const allowedShare of [0, 0.05, 0.1]) {
        const e = evaluateAtGain(clip, COIL, PD, DB, planSettings(PD, { allowedShare }));
        const pulseOk = e.limits.filter((l) => l.limit === 'on-time' || l.limit === 'duty').every((l) => l.ok);
        expect(fails(clip, allowedShare)).toBe(!pulseOk);
      }
    }
  });
});

describe('evaluateAtGain: pulse shares and the worst limit', () => {
  it('reports the clamped pulses as shares of the events considered', () => {
    const e = evaluateAtGain(BOTH, COIL, PD, DB, planSettings(PD));
    expect(e.pulses).toMatchObject({ events: 10, count: 10, onTimeClamped: 1, dutyClamped: 1, offTimeDropped: 0, minOnTimeDropped: 0 });
    expect(e.pulses!.onTimeShare).toBeCloseTo(0.1, 15);
    expect(e.pulses!.dutyShare).toBeCloseTo(0.1, 15);
    expect(e.pulses!.minOnTimeShare).toBe(0);
  });

  it('names the first of two limits equally far over their edges as the worst', () => {
    // On-time and duty both 0.1 against 0.001: the same relative excess 99; every other limit holds
    // (silent clip, 10 short pulses, a MOSFET with no transition time).
    const e = evaluateAtGain(BOTH, COIL, PD, DB, planSettings(PD));
    const onTime = e.limits.find((l) => l.limit === 'on-time')!;
    expect(e.limits.filter((l) => !l.ok).map((l) => l.limit)).toEqual(['on-time', 'duty']);
    expect(e.worst).toBe(onTime);
  });

  it('refuses a pulse-scheme profile without pulse limits, naming them', () => {
    const noLimits = { ...PD, pulse: undefined } as DriverProfile;
    expect(() => evaluateAtGain(BOTH, COIL, noLimits, DB, planSettings(PD))).toThrow(
      new RangeError('evaluateAtGain: the pulse scheme needs driver.pulse limits'),
    );
  });
});

describe('evaluateAtGain: the short-pulse warning', () => {
  // 100 events 10 ms apart at 0 dB (g = 1), level 0.5: 50 µs pulses, longer than the tank's ring-up
  // time Q/(π·f0) = 31.8 µs (so the simulation adds no warning of its own), against a 10 µs minimum
  // on-time. A few events at level 0.05 demand 5 µs and are dropped.
  const d = pulseDriver(bridge, { maxOnTimeS: 100e-6, minOffTimeS: 1e-4, maxDuty: 0.1, minOnTimeS: 10e-6 });
  const times = Array.from({ length: 100 }, (_, i) => 0.001 + 0.01 * i);
  const clip = (dropped: number[]) => eventsClip(times, times.map((_, i) => (dropped.includes(i) ? 0.05 : 0.5)), 1);

  it('is silent at exactly 1 % of the pulses dropped (the threshold is "more than")', () => {
    // 1 of 100 = 0.01 = SHORT_PULSE_WARN_SHARE (the same double).
    const e = evaluateAtGain(clip([40]), COIL, d, 0, planSettings(d));
    expect(e.pulses!.minOnTimeDropped).toBe(1);
    expect(e.pulses!.minOnTimeShare).toBe(SHORT_PULSE_WARN_SHARE);
    expect(e.sim.warnings).toEqual([]);
  });

  it('past it, says how many, their share, the minimum in µs and in RF cycles, and what helps', () => {
    // 2 of 100 = 2.0 %; 10 µs at 300 kHz = 3.0 RF cycles; 300 kHz (hand values).
    const e = evaluateAtGain(clip([10, 60]), COIL, d, 0, planSettings(d));
    expect(e.sim.warnings).toEqual([
      'pulses: 2 of 100 pulses (2.0 %) are shorter than the 10.0 µs minimum on-time (3.0 RF cycles at 300 kHz) and were dropped: ' +
        "the coil cannot ring up in them, so the clip's quiet passages will be missing from the arcs. A higher gain lengthens them; " +
        'lower pulse.minOnTimeS only if the coil is known to ring up faster.',
    ]);
  });
});
