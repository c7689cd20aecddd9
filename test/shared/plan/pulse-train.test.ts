import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { pitchLockedEvents, pulsesAtGain, zeroCrossingEvents } from '../../../shared/plan/pulse-train.ts';

const FS = 48000;
const sine = (hz: number, amp: number, seconds: number) =>
  Float32Array.from({ length: Math.round(FS * seconds) }, (_, i) => amp * Math.sin((2 * Math.PI * hz * i) / FS + 0.3));

describe('zeroCrossingEvents', () => {
  it('finds one upward crossing per cycle of a sine at the right times and level', () => {
    // A sine of f Hz crosses zero upward f times a second (definition of frequency).
    const ev = zeroCrossingEvents(sine(100, 0.5, 1), FS);
    expect(ev.timeS.length).toBeGreaterThanOrEqual(99);
    expect(ev.timeS.length).toBeLessThanOrEqual(100);
    for (let i = 1; i < ev.timeS.length; i++) expect(ev.timeS[i] - ev.timeS[i - 1]).toBeCloseTo(0.01, 6);
    // Upward crossings of sin(ωt + 0.3) lie at ωt + 0.3 = 2πk.
    const first = (2 * Math.PI - 0.3) / (2 * Math.PI * 100);
    expect(ev.timeS[0]).toBeCloseTo(first, 5);
    // The cycle peak is the amplitude, within the sampling of the crest (cos(π·100/48000) ≈ 1 − 2e-5).
    for (let i = 0; i < ev.level.length - 1; i++) expect(ev.level[i]).toBeCloseTo(0.5, 3);
  });

  it('makes no events from silence or from noise inside the hysteresis', () => {
    expect(zeroCrossingEvents(new Float32Array(4800), FS).timeS.length).toBe(0);
    const hiss = Float32Array.from({ length: 4800 }, (_, i) => 5e-4 * Math.sin(i * 1.7));
    expect(zeroCrossingEvents(hiss, FS).timeS.length).toBe(0);
  });

  it('equals a per-sample Schmitt trigger on random signals, edges included', () => {
    // Reference: the trigger written one sample at a time from its definition (arm below −h, fire
    // above +h when armed; level = peak |x| from one event's sample up to and with the next's).
    const reference = (x: Float32Array, h: number) => {
      const t: number[] = [];
      const l: number[] = [];
      let armed = false;
      let peak = 0;
      for (let i = 0; i < x.length; i++) {
        peak = Math.max(peak, Math.abs(x[i]));
        if (x[i] < -h) armed = true;
        else if (armed && x[i] > h) {
          armed = false;
          if (t.length > 0) l[l.length - 1] = peak;
          const prev = x[i - 1];
          t.push((i - 1 + (prev < 0 && x[i] !== prev ? -prev / (x[i] - prev) : 0)) / FS);
          l.push(0);
          peak = Math.abs(x[i]);
        }
      }
      if (t.length > 0) l[l.length - 1] = peak;
      return { t, l };
    };
    fc.assert(
      fc.property(
        fc.record({ n: fc.integer({ min: 0, max: 3000 }), hz: fc.double({ min: 20, max: 8000, noNaN: true }), amp: fc.double({ min: 0, max: 1, noNaN: true }), noise: fc.double({ min: 0, max: 0.5, noNaN: true }), seed: fc.integer({ min: 1, max: 2 ** 31 - 2 }) }),
        fc.constantFrom(1e-3, 0.05, 0.3),
        ({ n, hz, amp, noise, seed }, h) => {
        // A tone in noise (a Park–Miller generator, so each case is reproducible from its seed).
        let r = seed;
        const x = Float32Array.from({ length: n }, (_, i) => {
          r = (r * 16807) % 2147483647;
          return amp * Math.sin((2 * Math.PI * hz * i) / FS) + noise * (2 * (r / 2147483647) - 1);
        });
        const got = zeroCrossingEvents(x, FS, { hysteresis: h });
        const want = reference(x, h);
        expect(Array.from(got.timeS)).toEqual(want.t);
        expect(Array.from(got.level)).toEqual(want.l.map((v) => Math.fround(v)));
        },
      ),
      { numRuns: 300 },
    );
    // More events than the first capacity (1024), so the arrays grow.
    const many = sine(3000, 0.9, 1);
    expect(zeroCrossingEvents(many, FS).timeS.length).toBe(reference(many, 1e-3).t.length);
  });
});

describe('pitchLockedEvents', () => {
  it('fires at whole cycles of a steady pitch and not while unvoiced', () => {
    const hopS = 0.01;
    const f0 = Float32Array.from({ length: 100 }, (_, j) => (j < 50 ? 215 : NaN));
    const peak = new Float32Array(1000).fill(0.8);
    const ev = pitchLockedEvents(f0, hopS, peak, 0.001, 1);
    // 0.5 s voiced at 215 Hz = 107.5 cycles: events at k/215 s for k = 0…107.
    expect(ev.timeS.length).toBe(108);
    for (let i = 1; i < ev.timeS.length; i++) expect(ev.timeS[i] - ev.timeS[i - 1]).toBeCloseTo(1 / 215, 9);
    expect(ev.timeS[ev.timeS.length - 1]).toBeLessThan(0.5);
    expect(ev.level[3]).toBeCloseTo(0.8, 6);
  });
});

describe('pulsesAtGain', () => {
  const limits = { maxOnTimeS: 2e-4, minOffTimeS: 5e-4, maxDuty: 0.1 };
  const events = (times: number[], levels: number[]) => ({
    mode: 'zero-crossing' as const,
    timeS: Float64Array.from(times),
    level: Float32Array.from(levels),
    durationS: 1,
  });

  it('scales on-time with gain and level, and clamps at the maximum on-time', () => {
    const ev = events([0, 0.01, 0.02], [0.25, 0.5, 1]);
    const p = pulsesAtGain(ev, 1, limits);
    expect(p.count).toBe(3);
    expect(Array.from(p.onS.subarray(0, 3))).toEqual([expect.closeTo(5e-5, 12), expect.closeTo(1e-4, 12), expect.closeTo(2e-4, 12)]);
    const loud = pulsesAtGain(ev, 4, limits);
    expect(loud.onTimeClamped).toBe(2); // demands 4e-4 and 8e-4 s exceed 2e-4 s
    expect(loud.onS[2]).toBeCloseTo(2e-4, 12);
  });

  it('drops pulses that violate the minimum off-time and shortens pulses over the duty limit', () => {
    // Second event 0.3 ms after a 0.2 ms pulse ends 0.1 ms later: off-time 0.1 ms < 0.5 ms → dropped.
    const ev = events([0, 0.0003, 0.0015], [1, 1, 1]);
    const p = pulsesAtGain(ev, 1, limits);
    expect(p.offTimeDropped).toBe(1);
    expect(p.count).toBe(2);
    // Third pulse: period 1.5 ms since the first → duty cap 0.15 ms < 0.2 ms demanded.
    expect(p.dutyClamped).toBe(1);
    expect(p.onS[1]).toBeCloseTo(1.5e-4, 12);
    // Invariant: every kept pulse respects all three limits.
    for (let i = 0; i < p.count; i++) {
      expect(p.onS[i]).toBeLessThanOrEqual(limits.maxOnTimeS * (1 + 1e-12));
      if (i > 0) {
        expect(p.startS[i] - (p.startS[i - 1] + p.onS[i - 1])).toBeGreaterThanOrEqual(limits.minOffTimeS);
        expect(p.onS[i] / (p.startS[i] - p.startS[i - 1])).toBeLessThanOrEqual(limits.maxDuty * (1 + 1e-12));
      }
    }
  });

  it('gives no pulses at zero gain (silence leaves a pulse drive idle)', () => {
    const p = pulsesAtGain(events([0, 0.01], [1, 1]), 0, limits);
    expect(p.count).toBe(0);
    expect(p.totalOnS).toBe(0);
  });
});
