/**
 * shared/plan/evaluate.ts at its edges, rail schemes (the pulse scheme is in
 * evaluate-pulse-edges.test.ts): the settings' bounds (an allowed share of 0 is valid, a negative
 * one is not); railAtGain's over-modulation test from either side alone and at exactly full scale,
 * its clamp of the frame mean to 0…V and of the mean square to E[v]² (Jensen) for a DC input, and
 * `count` as the number of frames; the switching-speed checks per role; a limit exactly at its
 * edge; a device the scheme does not use; thermal runaway in the junction check; a clip with no
 * samples at gain 0; and which failing limit is reported as the worst. Expected values are worked
 * by hand in the comments beside each check.
 */
import { describe, expect, it } from 'vitest';
import { computeFrameStats, type FrameStats } from '../../../shared/dsp/frame-stats.ts';
import { type PlanClip, createScratch, evaluateAtGain, planSettings, railAtGain, switchingSpeedChecks } from '../../../shared/plan/evaluate.ts';
import type { DriverProfile } from '../../../shared/schemas/driver.ts';
import { COIL, concat, linearDriver, mosfet, planClip, silence, tone } from './fixtures.ts';

// Invented rail-linear driver (fixtures.ts): 48 V supply, g = 3/48 = 1/16 A/V, 100 A supply limit.
const VS = 48;
const D = linearDriver(mosfet('bridge', { rKPerW: 1, tauS: 0.004 }, { rdsOnOhm: 1 }), mosfet('pass', { rKPerW: 0.5, tauS: 0.004 }));
const rail = (f: FrameStats, gain: number) => railAtGain(f, gain, VS, createScratch({ frames: f } as PlanClip));
const offset = (x: Float32Array, dc: number): Float32Array => Float32Array.from(x, (v) => v + dc);

describe('planSettings at its edges', () => {
  it('takes an allowed share of 0 (none allowed) and a margin of 0 K, and refuses a negative share or margin, naming field and value', () => {
    expect(planSettings(D, { allowedShare: 0, marginK: 0 })).toEqual({ marginK: 0, allowedShare: 0, ambientC: 25 });
    expect(() => planSettings(D, { allowedShare: -0.1 })).toThrow('planSettings: allowedShare must be in 0…1, got -0.1');
    expect(() => planSettings(D, { marginK: -1 })).toThrow('planSettings: marginK must be ≥ 0 K, got -1');
  });
});

describe('railAtGain: when a frame over-modulates', () => {
  // The rail v = (V/2)(1 + g·x) leaves 0…V when g·x > 1 or g·x < −1 (module comment); either alone is enough.
  it('flags a frame whose top alone passes full scale, and one whose bottom alone does', () => {
    // 3 ms of a 0.2 sine (g·0.2 = 0.4: inside), then 3 ms of 0.4·sine + 0.3: at g = 2 the top is
    // 2·0.7 = 1.4 > 1 while the bottom 2·(−0.1) = −0.2 stays inside. Mirrored offset (−0.3): bottom −1.4 only.
    const up = computeFrameStats(concat(tone(1000, 0.2, 0.003), offset(tone(1000, 0.4, 0.003), 0.3)), 8000);
    const down = computeFrameStats(concat(tone(1000, 0.2, 0.003), offset(tone(1000, 0.4, 0.003), -0.3)), 8000);
    expect(up.min[3] * 2).toBeGreaterThan(-1);
    expect(down.max[3] * 2).toBeLessThan(1);
    // Frame 3 starts at 3 ms (1 ms frames).
    expect(rail(up, 2).firstOverModS).toBeCloseTo(0.003, 12);
    expect(rail(down, 2).firstOverModS).toBeCloseTo(0.003, 12);
  });

  it('does not flag a frame that reaches exactly full scale: the rail touches 0 and V and stays inside', () => {
    // ±0.5 are exact in float32, so at g = 2 the extremes are exactly ±1: v spans exactly 0…48 V.
    const x = Float32Array.from({ length: 16 }, (_, i) => (i % 2 ? -0.5 : 0.5));
    const f = computeFrameStats(x, 8000);
    expect(rail(f, 2).firstOverModS).toBeNull();
    // Just past it, it is flagged in the first frame.
    expect(rail(f, 2.001).firstOverModS).toBe(0);
  });

  it('reads only `count` frames: buffer values past the last frame are not a frame', () => {
    // Frame buffers longer than the clip (as reused buffers are): the extra slot holds a value that
    // would over-modulate, but the clip has only `count` frames. 0.3 sine at g = 2: 0.6 < 1, none flagged.
    const f = computeFrameStats(tone(1000, 0.3, 0.002), 8000);
    const grow = <T extends Float32Array | Float64Array>(a: T, v: number): T => {
      const b = new (a.constructor as new (n: number) => T)(a.length + 1);
      b.set(a);
      b[a.length] = v;
      return b;
    };
    const longer: FrameStats = { ...f, mean: grow(f.mean, 0), meanSquare: grow(f.meanSquare, 0.81), min: grow(f.min, -0.9), max: grow(f.max, 0.9) };
    expect(longer.count).toBe(2);
    expect(rail(longer, 2).firstOverModS).toBeNull();
  });
});

describe('railAtGain: the clamp to the feasible set of a rail in 0…V', () => {
  it('pins the frame mean at 0 or V when g·mean leaves ±1: E[v] = 0, E[v²] = 0, or E[v] = V, E[v²] = V²', () => {
    // DC −0.5 at g = 4: unclamped E[v] = 24·(1 − 2) = −24 V, outside 0…48; the rail sits at 0, so
    // E[v] = 0 and, from 0 ≤ E[v²] ≤ V·E[v], E[v²] = 0. DC +0.5: unclamped E[v] = 24·3 = 72 V; the
    // rail sits at V: E[v] = 48 V and E[v]² = 2304 ≤ E[v²] ≤ V·E[v] = 2304, so E[v²] = 2304 V².
    const low = rail(computeFrameStats(new Float32Array(8).fill(-0.5), 8000), 4);
    expect(low.meanV[0]).toBe(0);
    expect(low.meanSquareV2[0]).toBe(0);
    expect(low.firstOverModS).toBe(0);
    const high = rail(computeFrameStats(new Float32Array(8).fill(0.5), 8000), 4);
    expect(high.meanV[0]).toBe(VS);
    expect(high.meanSquareV2[0]).toBe(VS * VS);
  });

  it('never lets E[v²] fall below E[v]² for a DC input, where the rail is constant and E[v²] = E[v]²', () => {
    // A constant x gives a constant v, so E[v²] = E[v]² exactly; the two are computed by different
    // expressions (railFrameMoments), so rounding lands E[v²] a few ulps on either side. The clamp
    // (Jensen: E[v]² ≤ E[v²]) makes "not below" hold exactly; when these tests were written about a
    // quarter of the cases below came out of railFrameMoments below E[v]² before the clamp.
    for (let i = 1; i < 200; i++) {
      const level = Math.fround(i / 211 - 0.45);
      const f = computeFrameStats(new Float32Array(8).fill(level), 8000);
      for (const g of [0.3, 0.7, 1, 1.3, 1.9]) {
        const r = rail(f, g);
        const ev = r.meanV[0];
        // E[v] = (V/2)(1 + g·x) (gain convention), 1e-12 relative for rounding.
        expect(Math.abs(ev - 24 * (1 + g * level))).toBeLessThan(1e-12 * 48);
        expect(r.meanSquareV2[0]).toBeGreaterThanOrEqual(ev * ev);
        expect((r.meanSquareV2[0] - ev * ev) / (ev * ev)).toBeLessThan(1e-12);
      }
    }
  });
});

describe('switchingSpeedChecks', () => {
  it('checks the bridge at the resonance and the modulator at its PWM frequency, share (t_r + t_f)·f against 0.2', () => {
    // Bridge t_r + t_f = 100 + 100 ns at 300 kHz: 0.06; modulator 400 + 600 ns at 100 kHz: 0.1 (hand values).
    const bridge = mosfet('bridge', { rKPerW: 1, tauS: 0.004 }, { riseTimeS: 100e-9, fallTimeS: 100e-9 });
    const modulator = mosfet('modulator', { rKPerW: 1, tauS: 0.004 }, { riseTimeS: 400e-9, fallTimeS: 600e-9 });
    const d = linearDriver(bridge, modulator, { scheme: 'rail-switched', pwmFrequencyHz: 100e3, devices: [bridge, modulator] });
    const c = switchingSpeedChecks(d, COIL.resonanceHz);
    expect(c.map((x) => [x.limit, x.role, x.unit, x.allowed, x.frequencyHz, x.atS, x.ok])).toEqual([
      ['switching-speed', 'bridge', 'share', 0.2, 300e3, null, true],
      ['switching-speed', 'modulator', 'share', 0.2, 100e3, null, true],
    ]);
    expect(c[0].value).toBeCloseTo(0.06, 12);
    expect(c[1].value).toBeCloseTo(0.1, 12);
    expect(c[1].headroom).toBeCloseTo(0.1, 12);
  });

  it('skips a role the profile has no device for (an unvalidated profile) instead of failing on it', () => {
    // The pass device does not switch; the bridge is missing: nothing to check.
    const passOnly = { ...D, devices: [D.devices[1]] } as DriverProfile;
    expect(switchingSpeedChecks(passOnly, COIL.resonanceHz)).toEqual([]);
  });
});

describe('evaluateAtGain: limits at and past their edges', () => {
  it('holds a limit exactly at its edge: no over-modulation with none allowed', () => {
    // Silence: the over-modulated share is 0, and 0 ≤ 0 (the check is value ≤ allowed).
    const e = evaluateAtGain(planClip('quiet', silence(0.05)), COIL, D, 0, planSettings(D, { allowedShare: 0 }));
    const om = e.limits.find((l) => l.limit === 'over-modulation')!;
    expect(om).toMatchObject({ value: 0, allowed: 0, headroom: 0, ok: true });
    expect(e.ok).toBe(true);
    expect(e.worst).toBeNull();
    // The supply current is in amperes: idle rail g·V/2 = 1.5 A against 100 A.
    expect(e.limits.find((l) => l.limit === 'supply-current')).toMatchObject({ unit: 'A', allowed: 100 });
  });

  it('gives no junction check for a device the scheme does not use', () => {
    // A modulator on a rail-linear profile: valid (schemas/driver.ts), ignored by the simulation.
    const d = linearDriver(D.devices[0], D.devices[1], { devices: [...D.devices, mosfet('modulator', { rKPerW: 1, tauS: 0.004 })] });
    const e = evaluateAtGain(planClip('quiet', silence(0.05)), COIL, d, 0, planSettings(d));
    expect(e.limits.filter((l) => l.limit === 'junction-temperature').map((l) => l.role)).toEqual(['bridge', 'pass']);
  });

  it('fails a runaway junction from the moment of runaway, at its peak (here above Tj max) and with headroom allowed − value', () => {
    // Bridge 1 Ω, one Foster cell 50 K/W, τ = 10 ms, no sink, α = 0. Idle rail E[v²] = 576 V²:
    // P = (π/2)²·R·g²·E[v²] = 2.4674·576/256 = 5.5517 W (Erickson & Maksimović §19.1), steady rise
    // 277.6 K. Tj(t) = 25 + 277.6·(1 − e^(−t/τ)) (first-order step response) crosses Tj max 150 °C
    // at t = −τ·ln(1 − 125/277.6) = 5.98 ms and reaches 25 + 277.6·(1 − e^(−10)) = 302.6 °C at 0.1 s.
    const d = linearDriver(mosfet('bridge', { rKPerW: 50, tauS: 0.01 }, { rdsOnOhm: 1 }), mosfet('pass', { rKPerW: 0.5, tauS: 0.004 }));
    const e = evaluateAtGain(planClip('quiet', silence(0.1)), COIL, d, 0, planSettings(d));
    const sim = e.sim.devices[0];
    const p = (Math.PI / 2) ** 2 * (1 / 256) * 576;
    const cross = -0.01 * Math.log(1 - 125 / (50 * p));
    expect(cross).toBeCloseTo(0.00598, 5);
    expect(sim.runaway).not.toBeNull();
    // Runaway is flagged in the frame whose mean fixed point passes Tj max: within one 1 ms frame of the crossing.
    expect(Math.abs(sim.runaway!.atS - cross)).toBeLessThanOrEqual(0.001);
    expect(sim.peakAtS).toBeCloseTo(0.1, 12);
    expect(Math.abs(sim.peakJunctionC - (25 + 50 * p * (1 - Math.exp(-10))))).toBeLessThan(0.01);
    const tj = e.limits.find((l) => l.limit === 'junction-temperature' && l.role === 'bridge')!;
    expect(tj.ok).toBe(false);
    expect(tj.atS).toBe(sim.runaway!.atS);
    expect(tj.value).toBe(sim.peakJunctionC);
    expect(tj.allowed).toBe(125);
    expect(tj.headroom).toBeCloseTo(125 - sim.peakJunctionC, 12);
  });

  it('at gain 0 (−∞ dB) nothing over-modulates, even for a clip with no samples', () => {
    // g = 0: the rail sits at its bias whatever the signal, so the share is 0 without reading the
    // histogram (which has no share to give for an empty clip).
    const e = evaluateAtGain(planClip('empty', new Float32Array(0)), COIL, D, -Infinity, planSettings(D));
    expect(e.overModulationFraction).toBe(0);
    expect(e.limits.find((l) => l.limit === 'over-modulation')!.ok).toBe(true);
  });
});

describe('evaluateAtGain: the worst limit', () => {
  // A 1 kHz sine of 0.5 at 8 kHz takes 8 phases 0.3 + kπ/4; the smallest |x| is 0.5·sin(0.3) = 0.148.
  // At 20 dB (g = 10) every sample passes full scale (g·0.148 = 1.48 > 1): over-modulated share 1
  // against 0.001 allowed, relative excess (1 − 0.001)/0.001 = 999. Every 1 ms frame holds one whole
  // period, mean 0, so the supply current is g·E[v] = (1/16)·24 = 1.5 A against a 1.4 A limit:
  // relative excess (1.5 − 1.4)/1.4 = 0.071.
  const clip = planClip('sine', tone(1000, 0.5, 0.5));

  it('is the limit most over its edge relative to its allowed value, not in absolute terms', () => {
    // In absolute terms the supply current is further over (0.1 A against 0.999 of a share).
    const d = linearDriver(D.devices[0], D.devices[1], { supplyCurrentLimitA: 1.4 });
    const e = evaluateAtGain(clip, COIL, d, 20, planSettings(d));
    expect(e.overModulationFraction).toBeCloseTo(1, 9);
    const sc = e.limits.find((l) => l.limit === 'supply-current')!;
    expect(sc.ok).toBe(false);
    expect(sc.value).toBeCloseTo(1.5, 9);
    expect(e.worst!.limit).toBe('over-modulation');
  });

  it('is a too-slow switch whenever one fails, even when another limit is much further over its edge', () => {
    // Bridge t_r + t_f = 0.5 + 0.5 µs at 300 kHz: share 0.3 against 0.2, relative excess 0.5 ≪ 999.
    const slow = mosfet('bridge', { rKPerW: 1, tauS: 0.004 }, { rdsOnOhm: 1, riseTimeS: 0.5e-6, fallTimeS: 0.5e-6 });
    const d = linearDriver(slow, D.devices[1]);
    const e = evaluateAtGain(clip, COIL, d, 20, planSettings(d));
    expect(e.limits.find((l) => l.limit === 'over-modulation')!.ok).toBe(false);
    expect(e.worst).toMatchObject({ limit: 'switching-speed', role: 'bridge', unit: 'share', frequencyHz: 300e3 });
    expect(e.worst!.value).toBeCloseTo(0.3, 12);
  });
});
