/**
 * The pulse drive (shared/plan/pulse-train.ts) at its edges: the input checks of pulseLimitsFor,
 * zeroCrossingEvents and pitchLockedEvents word for word; a Schmitt trigger fed samples exactly at
 * ±hysteresis; a pitch track with a 0 Hz hop and a frame-peak grid shorter than the clip (or
 * empty); and pulsesAtGain with each limit met exactly (off-time, duty, minimum on-time), pulses at
 * the clip's end, events of zero demand, and reused `out` buffers.
 *
 * The expected values follow from the definitions in the module's doc comment (on-time law
 * maxOnTimeS·g·level; "less than minOffTimeS", "shorter than minOnTimeS", "on-time ≤ maxDuty ·
 * period" are strict or inclusive as written there). Times in the pulsesAtGain checks are
 * multiples of U = 2⁻¹² s (244 µs, a plausible maximum on-time) so every sum and product is exact
 * in binary floating point and a limit can be met with equality, not just to a tolerance.
 */
import { describe, expect, it } from 'vitest';
import { DEFAULT_MIN_ON_RF_CYCLES, pitchLockedEvents, pulseLimitsFor, pulsesAtGain, zeroCrossingEvents } from '../../../shared/plan/pulse-train.ts';

const FS = 8000;
/** 2⁻¹² s: dyadic, so sums and products of small multiples of it are exact. */
const U = 2 ** -12;

const events = (times: number[], levels: number[], durationS = 1) => ({
  mode: 'zero-crossing' as const,
  timeS: Float64Array.from(times),
  level: Float32Array.from(levels),
  durationS,
});

describe('input checks', () => {
  it('pulseLimitsFor refuses a resonance that is not > 0, naming it and the value', () => {
    const lim = { maxOnTimeS: 1.5e-4, minOffTimeS: 1e-3, maxDuty: 0.08 };
    expect(() => pulseLimitsFor(lim, 0)).toThrow(new RangeError('pulseLimitsFor: resonanceHz must be > 0, got 0'));
    expect(() => pulseLimitsFor(lim, -300e3)).toThrow(new RangeError('pulseLimitsFor: resonanceHz must be > 0, got -300000'));
    expect(() => pulseLimitsFor(lim, Number.NaN)).toThrow(new RangeError('pulseLimitsFor: resonanceHz must be > 0, got NaN'));
    // A valid resonance: 3 cycles at 250 kHz = 12 µs (hand value, DEFAULT_MIN_ON_RF_CYCLES / f0).
    expect(pulseLimitsFor(lim, 250e3).minOnTimeS).toBeCloseTo(DEFAULT_MIN_ON_RF_CYCLES / 250e3, 15);
    expect(pulseLimitsFor(lim, 250e3).minOnTimeS).toBeCloseTo(12e-6, 15);
  });

  it('zeroCrossingEvents refuses a sample rate that is not > 0 and a hysteresis outside (0, 1)', () => {
    const x = Float32Array.of(-0.5, 0.5);
    expect(() => zeroCrossingEvents(x, 0)).toThrow(new RangeError('zeroCrossingEvents: sampleRate must be > 0 Hz, got 0'));
    expect(() => zeroCrossingEvents(x, -FS)).toThrow(new RangeError('zeroCrossingEvents: sampleRate must be > 0 Hz, got -8000'));
    expect(() => zeroCrossingEvents(x, Number.NaN)).toThrow(RangeError);
    // Both ends of the open interval and beyond each.
    for (const h of [0, 1, -0.25, 1.5, Number.NaN]) {
      expect(() => zeroCrossingEvents(x, FS, { hysteresis: h })).toThrow(new RangeError(`zeroCrossingEvents: hysteresis must be in (0, 1), got ${h}`));
    }
    // Inside it, no error: with h = 0.25 the trigger arms at −0.5 and fires at 0.5 (one event);
    // with h = 0.999 neither sample passes a threshold (none).
    expect(zeroCrossingEvents(x, FS, { hysteresis: 0.25 }).timeS.length).toBe(1);
    expect(zeroCrossingEvents(x, FS, { hysteresis: 0.999 }).timeS.length).toBe(0);
  });

  it('pitchLockedEvents refuses a hop or a frame that is not > 0 s, naming both values', () => {
    const f0 = Float32Array.of(100);
    const peak = Float32Array.of(1);
    const msg = (hop: number, frame: number) => new RangeError(`pitchLockedEvents: hopS and frameS must be > 0 s, got ${hop}, ${frame}`);
    expect(() => pitchLockedEvents(f0, 0, peak, 0.01, 1)).toThrow(msg(0, 0.01));
    expect(() => pitchLockedEvents(f0, 0.01, peak, 0, 1)).toThrow(msg(0.01, 0));
    expect(() => pitchLockedEvents(f0, -0.01, peak, 0.01, 1)).toThrow(msg(-0.01, 0.01));
    expect(() => pitchLockedEvents(f0, 0.01, peak, -0.01, 1)).toThrow(msg(0.01, -0.01));
    expect(() => pitchLockedEvents(f0, Number.NaN, peak, 0.01, 1)).toThrow(msg(Number.NaN, 0.01));
    expect(() => pitchLockedEvents(f0, 0, peak, 0, 1)).toThrow(msg(0, 0));
    // Valid: one 10 ms hop at 100 Hz holds exactly one cycle, so one event at 0 (hand value).
    expect(Array.from(pitchLockedEvents(f0, 0.01, peak, 0.01, 1).timeS)).toEqual([0]);
  });
});

describe('zeroCrossingEvents: samples exactly at ±hysteresis', () => {
  it('arms only strictly below −h and fires only strictly above +h (the Schmitt trigger of the doc comment)', () => {
    // h = 0.5; all samples exact in float32. Walk by hand:
    //  i=1  −0.5  not below −0.5: stays disarmed
    //  i=2  0.75  (disarmed, nothing)
    //  i=3  −0.75 below −0.5: armed
    //  i=4  0.5   not above 0.5: stays armed
    //  i=5  −0.75 armed
    //  i=6  0.75  above 0.5: fires. Crossing between x5 = −0.75 and x6 = 0.75 at 5 + 0.75/1.5 = 5.5 samples.
    // One event; its level is the peak |x| from its own sample to the clip's end: 0.75.
    const x = Float32Array.of(0, -0.5, 0.75, -0.75, 0.5, -0.75, 0.75);
    const ev = zeroCrossingEvents(x, FS, { hysteresis: 0.5 });
    expect(ev.mode).toBe('zero-crossing');
    expect(Array.from(ev.timeS)).toEqual([expect.closeTo(5.5 / FS, 15)]);
    expect(Array.from(ev.level)).toEqual([0.75]);
  });

  it('gives the clip length as samples / sample rate', () => {
    // 7 samples at 8 kHz = 0.875 ms (definition of the sample rate).
    expect(zeroCrossingEvents(new Float32Array(7), FS).durationS).toBeCloseTo(0.875e-3, 15);
    expect(zeroCrossingEvents(new Float32Array(48000), 48000).durationS).toBe(1);
  });
});

describe('pitchLockedEvents at its edges', () => {
  it('treats a hop of 0 Hz as unvoiced: no pulses, and the phase restarts after it', () => {
    // Hops of 12.5 ms at 100 Hz. Hop 0: events at 0 and 10 ms; 20 ms is past the hop, so 0.75 of a
    // cycle is carried. Hop 1 unvoiced. Hop 2 starts at 25 ms with the phase reset: 25 and 35 ms.
    // A pitch of 0 Hz has no cycles; pitch trackers mark unvoiced frames with 0 or NaN (WORLD's
    // DIO/Harvest write 0, pYIN NaN; recalled), so 0 must act as NaN does.
    const peak = new Float32Array(100).fill(0.5);
    const withZero = pitchLockedEvents(Float32Array.of(100, 0, 100), 0.0125, peak, 0.001, 1);
    const withNaN = pitchLockedEvents(Float32Array.of(100, Number.NaN, 100), 0.0125, peak, 0.001, 1);
    expect(Array.from(withNaN.timeS)).toEqual([0, 0.01, 0.025, 0.035].map((t) => expect.closeTo(t, 12)));
    expect(Array.from(withZero.timeS)).toEqual(Array.from(withNaN.timeS));
    // A voiced hop carries the phase instead: 100 Hz for 37.5 ms gives 0, 10, 20, 30 ms.
    const steady = pitchLockedEvents(Float32Array.of(100, 100, 100), 0.0125, peak, 0.001, 1);
    expect(Array.from(steady.timeS)).toEqual([0, 0.01, 0.02, 0.03].map((t) => expect.closeTo(t, 12)));
    expect(steady.mode).toBe('pitch-locked');
    expect(steady.durationS).toBe(1);
  });

  it('reads the level of the frame an event falls in, the first frame included, and the last frame past the grid', () => {
    // 100 Hz for 20 ms: events at 0 and 10 ms. Frames of 4 ms: 0 ms is in frame 0, 10 ms in frame
    // 2 (10/4 = 2.5).
    const f0 = Float32Array.of(100);
    const full = pitchLockedEvents(f0, 0.02, Float32Array.of(0.25, 0.5, 0.75), 0.004, 1);
    expect(Array.from(full.timeS)).toEqual([0, expect.closeTo(0.01, 12)]);
    expect(Array.from(full.level)).toEqual([0.25, 0.75]);
    // A grid of two frames: the event at 10 ms lies past it and takes the last frame's peak.
    const short = pitchLockedEvents(f0, 0.02, Float32Array.of(0.25, 0.5), 0.004, 1);
    expect(Array.from(short.level)).toEqual([0.25, 0.5]);
    // No frames at all: the level is 0 (no pulse), not undefined or NaN.
    const none = pitchLockedEvents(f0, 0.02, new Float32Array(0), 0.004, 1);
    expect(Array.from(none.level)).toEqual([0, 0]);
  });

  it('cuts a first hop that starts before the clip at 0 s and keeps one pulse per pitch cycle', () => {
    // A track centred on its frames starts half a hop early (plan-clip.ts passes firstS =
    // first centre − hop/2). Steady 100 Hz, hops of 10 ms from −5 ms: hop 0 covers [0, 5) ms (event
    // at 0, half a cycle carried), hop 1 [5, 15) ms (event at 10), hop 2 [15, 25) ms (event at 20).
    // One event per 10 ms cycle by definition of a pitch-locked train; stretching hop 0 to a whole
    // hop would fire a second event at 5 ms.
    const peak = new Float32Array(100).fill(0.5);
    const e = pitchLockedEvents(Float32Array.of(100, 100, 100), 0.01, peak, 0.001, 1, -0.005);
    expect(Array.from(e.timeS)).toEqual([0, 0.01, 0.02].map((t) => expect.closeTo(t, 12)));
    // A hop wholly before the clip makes no pulses, and one wholly after its end none either.
    const early = pitchLockedEvents(Float32Array.of(100, 100, 100), 0.01, peak, 0.001, 0.015, -0.01);
    expect(Array.from(early.timeS)).toEqual([0, 0.01].map((t) => expect.closeTo(t, 12)));
    // A hop that ends before 0 s carries no phase into the next: from −15 ms, hop 0 is [−15, −5) ms
    // (skipped), hop 1 [−5, 5) ms cut to [0, 5) (event at 0), hop 2 [5, 15) ms (event at 10).
    const before = pitchLockedEvents(Float32Array.of(100, 100, 100), 0.01, peak, 0.001, 1, -0.015);
    expect(Array.from(before.timeS)).toEqual([0, 0.01].map((t) => expect.closeTo(t, 12)));
  });
});

describe('pulsesAtGain with each limit met exactly', () => {
  it('sends a pulse that starts exactly minOffTimeS after the previous one ended ("less than" drops)', () => {
    // Pulse 1: 0 … U. Next event at 5U = U + 4U: an off-time of exactly 4U = minOffTimeS.
    // Duty cap maxDuty·period = 5U/2 > U, so the duty limit does not act.
    const lim = { maxOnTimeS: U, minOffTimeS: 4 * U, maxDuty: 0.5 };
    const p = pulsesAtGain(events([0, 5 * U], [1, 1]), 1, lim);
    expect(p.offTimeDropped).toBe(0);
    expect(p.count).toBe(2);
    expect(Array.from(p.startS.subarray(0, 2))).toEqual([0, 5 * U]);
  });

  it('measures the off-time from the previous pulse end, start + on-time', () => {
    // Pulse 1: 0 … U. Next event at 4U: off-time 3U < 4U, dropped. (From the start, 0, it would
    // be 4U and pass; from start − on-time, −U, 5U.) The third, at 6U, has an off-time of 5U.
    const lim = { maxOnTimeS: U, minOffTimeS: 4 * U, maxDuty: 0.5 };
    const p = pulsesAtGain(events([0, 4 * U, 6 * U], [1, 1, 1]), 1, lim);
    expect(p.offTimeDropped).toBe(1);
    expect(p.count).toBe(2);
    expect(Array.from(p.startS.subarray(0, 2))).toEqual([0, 6 * U]);
    expect(p.totalOnS).toBe(2 * U);
    expect(p.events).toBe(3);
  });

  it('does not count a pulse whose on-time equals the duty cap as shortened', () => {
    // Period 8U, maxDuty 1/8: cap U, the demanded on-time U. Off-time 7U ≥ U.
    const lim = { maxOnTimeS: U, minOffTimeS: U, maxDuty: 1 / 8 };
    const p = pulsesAtGain(events([0, 8 * U], [1, 1]), 1, lim);
    expect(p.dutyClamped).toBe(0);
    expect(Array.from(p.onS.subarray(0, 2))).toEqual([U, U]);
    // Half the period: cap U/2 < U, shortened and counted.
    const q = pulsesAtGain(events([0, 4 * U], [1, 1]), 1, lim);
    expect(q.dutyClamped).toBe(1);
    expect(Array.from(q.onS.subarray(0, 2))).toEqual([U, U / 2]);
  });

  it('keeps a pulse whose on-time equals minOnTimeS ("shorter than" drops)', () => {
    // On-time U·1·0.25 = U/4 = minOnTimeS exactly (0.25 is exact in float32).
    const lim = { maxOnTimeS: U, minOffTimeS: U, maxDuty: 0.5, minOnTimeS: U / 4 };
    const p = pulsesAtGain(events([0], [0.25]), 1, lim);
    expect(p.minOnTimeDropped).toBe(0);
    expect(p.count).toBe(1);
    expect(p.onS[0]).toBe(U / 4);
    // Half the level: U/8 < U/4, dropped.
    expect(pulsesAtGain(events([0], [0.125]), 1, lim).minOnTimeDropped).toBe(1);
  });
});

describe('pulsesAtGain at the clip end and for silent events', () => {
  const lim = { maxOnTimeS: U, minOffTimeS: U, maxDuty: 0.5 };

  it('cuts a pulse at the clip end, and sends none from an event at or past the end', () => {
    // Clip 64U; event at 63.5U demands U, only U/2 is left.
    const cut = pulsesAtGain(events([63.5 * U], [1], 64 * U), 1, lim);
    expect(cut.count).toBe(1);
    expect(cut.onS[0]).toBe(U / 2);
    expect(cut.totalOnS).toBe(U / 2);
    // Events at the end and past it: no time left, no pulse; neither counts as a dropped short
    // pulse (there is nothing to send), but both were considered.
    for (const t of [64 * U, 70 * U]) {
      const none = pulsesAtGain(events([t], [1], 64 * U), 1, lim);
      expect(none.count).toBe(0);
      expect(none.totalOnS).toBe(0);
      expect(none.events).toBe(1);
      const withMin = pulsesAtGain(events([t], [1], 64 * U), 1, { ...lim, minOnTimeS: U / 4 });
      expect(withMin.count).toBe(0);
      expect(withMin.minOnTimeDropped).toBe(0);
    }
  });

  it('skips events with no demanded on-time without counting them as events', () => {
    // Gain 0: nothing demanded, nothing considered ("Events considered (non-zero demanded on-time)").
    const zero = pulsesAtGain(events([0, 8 * U], [1, 1]), 0, lim);
    expect(zero.events).toBe(0);
    expect(zero.count).toBe(0);
    // Silent events (level 0) and a NaN level among loud ones: only the loud ones count.
    const mixed = pulsesAtGain(events([0, 8 * U, 16 * U, 24 * U], [1, 0, Number.NaN, 1]), 1, lim);
    expect(mixed.events).toBe(2);
    expect(mixed.count).toBe(2);
    expect(Array.from(mixed.startS.subarray(0, 2))).toEqual([0, 24 * U]);
    expect(Array.from(mixed.onS.subarray(0, 2))).toEqual([U, U]);
  });

  it('reads as many events as there are times, even when the level buffer is longer', () => {
    // The event count is timeS.length (a level buffer reused from a longer clip has stale entries).
    const ev = { ...events([0], [1]), level: Float32Array.of(1, 1) };
    const p = pulsesAtGain(ev, 1, lim);
    expect(p.events).toBe(1);
    expect(p.count).toBe(1);
    expect(p.totalOnS).toBe(U);
  });
});

describe('pulsesAtGain reusing out buffers', () => {
  const lim = { maxOnTimeS: U, minOffTimeS: U, maxDuty: 0.5 };
  const ev = events([0, 4 * U, 8 * U], [1, 0.5, 0.25]);
  // At gain 1: on-times U, U/2, U/4 (the law maxOnTimeS·g·level); periods 4U, cap 2U: no limit acts.
  const want = { startS: [0, 4 * U, 8 * U], onS: [U, U / 2, U / 4] };

  it('writes into the buffers of an earlier call with the same events (exactly n long)', () => {
    const first = pulsesAtGain(ev, 2, lim);
    expect(first.startS.length).toBe(3);
    const again = pulsesAtGain(ev, 1, lim, first);
    expect(again.startS).toBe(first.startS);
    expect(again.onS).toBe(first.onS);
    expect(Array.from(again.startS.subarray(0, again.count))).toEqual(want.startS);
    expect(Array.from(again.onS.subarray(0, again.count))).toEqual(want.onS);
  });

  it('writes into longer buffers too, and allocates new ones when the given ones are too short', () => {
    const long = pulsesAtGain(events([0, 4 * U, 8 * U, 12 * U, 16 * U], [1, 1, 1, 1, 1]), 1, lim);
    const intoLong = pulsesAtGain(ev, 1, lim, long);
    expect(intoLong.startS).toBe(long.startS);
    expect(intoLong.onS).toBe(long.onS);
    expect(Array.from(intoLong.onS.subarray(0, intoLong.count))).toEqual(want.onS);

    const short = pulsesAtGain(events([0], [1]), 1, lim);
    const fromShort = pulsesAtGain(ev, 1, lim, short);
    expect(fromShort.startS).not.toBe(short.startS);
    expect(fromShort.onS).not.toBe(short.onS);
    expect(fromShort.count).toBe(3);
    expect(Array.from(fromShort.startS.subarray(0, 3))).toEqual(want.startS);
    expect(Array.from(fromShort.onS.subarray(0, 3))).toEqual(want.onS);
  });
});
