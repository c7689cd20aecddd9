import { describe, expect, it } from 'vitest';
import { simulatePulses } from '../../../shared/physics/driver/simulate-pulses.ts';
import { simulateRail } from '../../../shared/physics/driver/simulate-rail.ts';
import { adviseGain } from '../../../shared/plan/advise.ts';
import { evaluateAtGain, planSettings } from '../../../shared/plan/evaluate.ts';
import { MAX_RECOVERY_GAP_S, RECOVERED_WITHIN_K, idleSteadyJunctionC, minSafeGapS, planSet, recoveryGapS } from '../../../shared/plan/set.ts';
import { COIL, linearDriver, mosfet, planClip, pulseDriver, tone } from './fixtures.ts';

// Invented drivers (fixtures.ts). The pulse scheme idles with no loss, so its junctions cool back
// towards ambient in a gap; a rail scheme idles at half the supply and keeps dissipating.
const PULSE_CLIP = planClip('p', tone(200, 0.5, 2), { pulses: true });
/** Pulse driver with a small sink (1 J/K on 3 K/W, τ ≈ 3 s): a 2 s clip at 0 dB warms it by ~15 K. */
const WARMING = pulseDriver(
  mosfet('bridge', { rKPerW: 0.5, tauS: 0.01, caseToSinkKPerW: 0.2, sinkToAmbientKPerW: 3, sinkHeatCapacityJPerK: 1 }, { rdsOnOhm: 2 }),
);
/** Pulse driver with a slow sink (5 J/K on 10 K/W, τ ≈ 50 s): junction temperature binds from cold. */
const SLOW = pulseDriver(
  mosfet('bridge', { rKPerW: 0.5, tauS: 0.01, caseToSinkKPerW: 0.2, sinkToAmbientKPerW: 10, sinkHeatCapacityJPerK: 5 }, { rdsOnOhm: 12 }),
);
/** Rail-linear driver: the pass device idles at g·V_s²/4 = 36 W on 1.5 K/W (54 K above ambient). */
const LINEAR = linearDriver(
  mosfet('bridge', { rKPerW: 1, tauS: 0.004, sinkToAmbientKPerW: 14 }, { rdsOnOhm: 1 }),
  mosfet('pass', { rKPerW: 0.5, tauS: 0.004, sinkToAmbientKPerW: 1 }),
);
const TONE = (amp: number) => planClip(`tone ${amp}`, tone(1000, amp, 1));

describe('planSet: thermal state carries from clip to clip', () => {
  it('starts the next clip warm after a short gap and at ambient after a long one', () => {
    const s = planSettings(WARMING);
    const short = planSet([{ clip: PULSE_CLIP, gapAfterS: 1, gainDb: 0 }, { clip: PULSE_CLIP, gapAfterS: 0, gainDb: 0 }], COIL, WARMING, s);
    const first = short.items[0];
    expect(first.startJunctionC).toEqual([{ role: 'bridge', junctionC: 25 }]);
    expect(first.devices[0].endJunctionC).toBeGreaterThan(35);
    // 1 s of idling (τ_sink ≈ 3 s) leaves most of the sink's heat: the second clip starts well above ambient…
    const start2 = short.items[1].startJunctionC[0].junctionC;
    expect(start2).toBeGreaterThan(30);
    expect(start2).toBeLessThan(first.devices[0].endJunctionC);
    // …and runs hotter than the first did.
    expect(short.items[1].peakJunctionC).toBeGreaterThan(first.peakJunctionC + 3);
    // After 600 s (≈ 200 τ) the state is gone (1e-6 K).
    const long = planSet([{ clip: PULSE_CLIP, gapAfterS: 600, gainDb: 0 }, { clip: PULSE_CLIP, gapAfterS: 0, gainDb: 0 }], COIL, WARMING, s);
    expect(Math.abs(long.items[1].startJunctionC[0].junctionC - 25)).toBeLessThan(1e-6);
    expect(long.items[1].peakJunctionC).toBeCloseTo(long.items[0].peakJunctionC, 6);
  });

  it('advises the warm clip for its starting state', () => {
    const s = planSettings(SLOW);
    const set = planSet([{ clip: PULSE_CLIP, gapAfterS: 0, gainDb: null }, { clip: PULSE_CLIP, gapAfterS: 0, gainDb: null }], COIL, SLOW, s);
    const [a, b] = set.items;
    expect(a.advisedGainDb).toBe(adviseGain(PULSE_CLIP, COIL, SLOW, s).advisedGainDb);
    expect(b.advisedGainDb!).toBeLessThan(a.advisedGainDb! - 1);
    // Played at its own advice, each item holds every limit.
    expect(set.items.map((i) => [i.gainDb, i.ok])).toEqual([
      [a.advisedGainDb, true],
      [b.advisedGainDb, true],
    ]);
    expect(set.firstFailingItem).toBeNull();
    expect(set.gainMode).toBe('per-item');
  });

  it('names the first failing item: the same clip at the same gain fails once it starts warm', () => {
    const s = planSettings(SLOW);
    const g = adviseGain(PULSE_CLIP, COIL, SLOW, s).advisedGainDb!;
    const set = planSet([{ clip: PULSE_CLIP, gapAfterS: 0, gainDb: g }, { clip: PULSE_CLIP, gapAfterS: 0, gainDb: g }], COIL, SLOW, s);
    expect(set.items[0].ok).toBe(true);
    expect(set.items[1].ok).toBe(false);
    expect(set.items[1].failing.map((l) => [l.limit, l.role])).toEqual([['junction-temperature', 'bridge']]);
    expect(set.items[1].peakJunctionC).toBeGreaterThan(125);
    expect(set.firstFailingItem).toBe(1);
  });
});

describe('planSet: recoveryGapS', () => {
  it('is the idle time after which every junction is back within 5 K of its idle steady state (ambient for a pulse driver; checked by simulating the gap)', () => {
    const s = planSettings(WARMING);
    const set = planSet([{ clip: PULSE_CLIP, gapAfterS: 0, gainDb: 0 }], COIL, WARMING, s);
    // A pulse driver idles without loss: it settles at ambient.
    expect(set.idleSteadyJunctionC).toEqual([{ role: 'bridge', junctionC: 25 }]);
    expect(set.items[0].recoversToC).toEqual(set.idleSteadyJunctionC);
    const gap = set.items[0].recoveryGapS!;
    expect(gap).toBeGreaterThan(1);
    // Independently: the end state of the clip from cold, then the pulse scheme idling (no pulses).
    const end = evaluateAtGain(PULSE_CLIP, COIL, WARMING, 0, s).sim.finalState;
    const junctionAfter = (t: number) => 25 + simulatePulses(WARMING, COIL, { startS: new Float64Array(0), onS: new Float64Array(0) }, t, { initial: end }).finalState[0][0];
    // Found to one 0.1 s idle frame: recovered at the gap, not 0.1 s earlier (1e-9 K for round-off).
    expect(junctionAfter(gap)).toBeLessThanOrEqual(25 + RECOVERED_WITHIN_K + 1e-9);
    expect(junctionAfter(gap - 0.1)).toBeGreaterThan(25 + RECOVERED_WITHIN_K);
    expect(recoveryGapS(WARMING, COIL, end, [25], 25)).toBeCloseTo(gap, 12);
  });

  it('counts the first idle frame by its end temperature (pulse scheme; regression)', () => {
    // After 6 dB of pulses the junction sits ~6 K above its case and drops that within ~30 ms
    // (τ_jc = 10 ms). With a start 6 K below the end, 0.1 s of idling is enough. The pulse trace holds
    // each frame's maximum, which in frame 0 is the starting temperature: before the fix this gave 0.2 s.
    const end = evaluateAtGain(PULSE_CLIP, COIL, WARMING, 6, planSettings(WARMING)).sim.finalState;
    const startC = 25 + end[0][0] - 6;
    const after = (t: number) => 25 + simulatePulses(WARMING, COIL, { startS: new Float64Array(0), onS: new Float64Array(0) }, t, { initial: end }).finalState[0][0];
    expect(after(0.1)).toBeLessThan(startC + RECOVERED_WITHIN_K);
    expect(recoveryGapS(WARMING, COIL, end, [startC], 25)).toBeCloseTo(0.1, 12);
  });

  it('is 0 when the clip ends within 5 K of its start', () => {
    const end = evaluateAtGain(PULSE_CLIP, COIL, WARMING, -30, planSettings(WARMING)).sim.finalState;
    expect(recoveryGapS(WARMING, COIL, end, [25], 25)).toBe(0);
  });

  it('measures a linear pass device against the temperature it idles at, not against ambient', () => {
    // The pass device idles at half the supply: g·V_s²/4 = 36 W on 1.5 K/W, 25 + 54 = 79 °C. It never
    // comes back within 5 K of ambient, but it does settle at its idle temperature.
    const s = planSettings(LINEAR);
    const idleC = idleSteadyJunctionC(LINEAR, COIL, 25);
    const pass = idleC.find((d) => d.role === 'pass')!;
    expect(pass.junctionC).toBeCloseTo(79, 3);
    // Confirm by idling for an hour at half rail from ambient.
    const n = 3600;
    const hour = simulateRail(LINEAR, COIL, { frameS: 1, meanV: new Float64Array(n).fill(24), meanSquareV2: new Float64Array(n).fill(576) });
    idleC.forEach((d, k) => expect(d.junctionC).toBeCloseTo(25 + hour.finalState[k][0], 6));
    const set = planSet([{ clip: TONE(0.5), gapAfterS: 0, gainDb: 0 }], COIL, LINEAR, s);
    const it0 = set.items[0];
    expect(it0.recoversToC).toEqual(idleC);
    expect(it0.recoveryGapS).not.toBeNull();
    // Independently: idle from the clip's end for that long; every junction is within 5 K of its idle temperature.
    const end = evaluateAtGain(TONE(0.5), COIL, LINEAR, 0, s).sim.finalState;
    const m = Math.round(it0.recoveryGapS! / 0.1);
    const after = simulateRail(LINEAR, COIL, { frameS: 0.1, meanV: new Float64Array(Math.max(1, m)).fill(24), meanSquareV2: new Float64Array(Math.max(1, m)).fill(576) }, { initial: end });
    idleC.forEach((d, k) => expect(25 + (m > 0 ? after.finalState[k][0] : end[k][0])).toBeLessThanOrEqual(d.junctionC + RECOVERED_WITHIN_K + 1e-9));
  });
});

describe('planSet: minSafeGapAfterS', () => {
  it('is the shortest gap after which the next item keeps every limit at its gain: a re-plan with it passes, with 1 s less fails', () => {
    // The slow sink: the same clip at the same gain fails when it starts warm (see above).
    const s = planSettings(SLOW);
    const g = adviseGain(PULSE_CLIP, COIL, SLOW, s).advisedGainDb!;
    const tight = planSet([{ clip: PULSE_CLIP, gapAfterS: 0, gainDb: g }, { clip: PULSE_CLIP, gapAfterS: 0, gainDb: g }], COIL, SLOW, s);
    expect(tight.items[1].ok).toBe(false);
    const gap = tight.items[0].minSafeGapAfterS!;
    expect(gap).toBeGreaterThan(1);
    expect(gap).toBeLessThan(MAX_RECOVERY_GAP_S);
    expect(tight.items[0].minSafeGapNote).toBeNull();
    const replan = (gapS: number) => planSet([{ clip: PULSE_CLIP, gapAfterS: gapS, gainDb: g }, { clip: PULSE_CLIP, gapAfterS: 0, gainDb: g }], COIL, SLOW, s);
    expect(replan(gap).items[1].ok).toBe(true);
    expect(replan(gap - 1).items[1].ok).toBe(false);
    // Found to one idle frame (0.1 s).
    expect(replan(gap - 0.1).items[1].ok).toBe(false);
    // The last item has nothing after it.
    expect(tight.items[1].minSafeGapAfterS).toBeNull();
    expect(tight.items[1].minSafeGapNote).toMatch(/last item/);
  });

  it('is 0 when the next item keeps every limit with no gap', () => {
    const s = planSettings(WARMING);
    const set = planSet([{ clip: PULSE_CLIP, gapAfterS: 0, gainDb: -20 }, { clip: PULSE_CLIP, gapAfterS: 0, gainDb: -20 }], COIL, WARMING, s);
    expect(set.items[0].minSafeGapAfterS).toBe(0);
    expect(set.items[0].minSafeGapNote).toMatch(/no gap needed/);
  });

  it('is null, with the reason, when no gap is enough: the next item fails even from the idle steady state', () => {
    const s = planSettings(SLOW);
    const g = adviseGain(PULSE_CLIP, COIL, SLOW, s).advisedGainDb!;
    const end = evaluateAtGain(PULSE_CLIP, COIL, SLOW, g, s).sim.finalState;
    const r = minSafeGapS(SLOW, COIL, end, PULSE_CLIP, g + 6, s);
    expect(r.gapS).toBeNull();
    expect(r.note).toMatch(/no gap (up to 3600 s is enough|helps)/);
  });
});

describe('planSet: gains', () => {
  it("plays every item at the lowest per-item advice in common-gain mode ('min-advised')", () => {
    const s = planSettings(LINEAR);
    const items = [
      { clip: TONE(0.25), gapAfterS: 2, gainDb: null },
      { clip: TONE(0.5), gapAfterS: 0, gainDb: null },
    ];
    const perItem = planSet(items, COIL, LINEAR, s);
    const advised = perItem.items.map((i) => i.advisedGainDb!);
    // The quieter clip takes about 6 dB more (bridge junction binds: the same drive 6.02 dB higher).
    expect(advised[0] - advised[1]).toBeGreaterThan(5.8);
    const common = planSet(items, COIL, LINEAR, s, { commonGainDb: 'min-advised' });
    expect(common.gainMode).toBe('common');
    expect(common.commonGainDb).toBe(Math.min(...advised));
    expect(common.items.map((i) => i.gainDb)).toEqual([Math.min(...advised), Math.min(...advised)]);
    expect(common.firstFailingItem).toBeNull();
  });

  it('plays a numeric common gain, but an item’s own gain wins', () => {
    const s = planSettings(LINEAR);
    const set = planSet(
      [
        { clip: TONE(0.25), gapAfterS: 0, gainDb: null },
        { clip: TONE(0.5), gapAfterS: 0, gainDb: -3 },
      ],
      COIL,
      LINEAR,
      s,
      { commonGainDb: 1 },
    );
    expect(set.commonGainDb).toBe(1);
    expect(set.items.map((i) => i.gainDb)).toEqual([1, -3]);
  });

  it('rejects an empty set and a bad gap', () => {
    const s = planSettings(LINEAR);
    expect(() => planSet([], COIL, LINEAR, s)).toThrow(/no items/);
    expect(() => planSet([{ clip: TONE(0.5), gapAfterS: -1, gainDb: 0 }], COIL, LINEAR, s)).toThrow(/items\[0\]\.gapAfterS/);
  });
});
