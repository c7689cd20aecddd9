/**
 * A set (shared/plan/set.ts) at its edges: the idle steady state of a driver whose slowest time
 * constant is its heat sink and whose loss grows with temperature (against the closed-form fixed
 * point), a junction exactly RECOVERED_WITHIN_K above its target, the two reasons no gap can be
 * enough (a thermal limit, and one no cooling helps), an item with no safe gain (planned silent per
 * item and listed with its reason; played at the others' lowest advice in common-gain mode), the first failing item when several fail, the safe-gap search
 * switched off and on, and the common-gain pre-pass that skips it (counted through the evaluations it
 * runs). Expected values are derived by hand or from the module's own documented definitions.
 */
import { describe, expect, it, vi } from 'vitest';
import { adviseGain } from '../../../shared/plan/advise.ts';
import { evaluateAtGain, planSettings } from '../../../shared/plan/evaluate.ts';
import { MAX_RECOVERY_GAP_S, RECOVERED_WITHIN_K, idleSteadyJunctionC, minSafeGapS, planSet, recoveryGapS } from '../../../shared/plan/set.ts';
import { COIL, halfBridgeI2rW, linearDriver, mosfet, planClip, pulseDriver, silence, tone } from './fixtures.ts';

// Count the evaluations a set runs (planSet and adviseGain both call evaluateAtGain); the function
// itself is the real one.
vi.mock(import('../../../shared/plan/evaluate.ts'), async (importOriginal) => {
  const mod = await importOriginal();
  return { ...mod, evaluateAtGain: vi.fn(mod.evaluateAtGain) };
});

// Invented drivers (fixtures.ts).
/** Rail-linear with strong sinks: at a full swing every junction holds; only over-modulation binds. */
const STRONG = linearDriver(
  mosfet('bridge', { rKPerW: 1, tauS: 0.004, sinkToAmbientKPerW: 1 }, { rdsOnOhm: 1 }),
  mosfet('pass', { rKPerW: 0.5, tauS: 0.004, sinkToAmbientKPerW: 1 }),
);
/** Pulse driver with a small sink (1 J/K on 3 K/W), as in set.test.ts. */
const WARMING = pulseDriver(
  mosfet('bridge', { rKPerW: 0.5, tauS: 0.01, caseToSinkKPerW: 0.2, sinkToAmbientKPerW: 3, sinkHeatCapacityJPerK: 1 }, { rdsOnOhm: 2 }),
);
/** Pulse driver with a slow sink (5 J/K on 10 K/W): junction temperature binds from cold (set.test.ts). */
const SLOW = pulseDriver(
  mosfet('bridge', { rKPerW: 0.5, tauS: 0.01, caseToSinkKPerW: 0.2, sinkToAmbientKPerW: 10, sinkHeatCapacityJPerK: 5 }, { rdsOnOhm: 12 }),
);
const PULSE_CLIP = planClip('p', tone(200, 0.5, 2), { pulses: true });
const TONE = (amp: number) => planClip(`tone ${amp}`, tone(1000, amp, 1));
/** A float clip peaking at 2000 (+66 dBFS): it over-modulates even at −60 dB, so no gain is safe. */
const HOT = planClip('hot', tone(1000, 2000, 0.5, 8000, Math.PI / 2));

describe('idleSteadyJunctionC: a slow sink and a loss that grows with temperature', () => {
  it('reaches the closed-form fixed point T = T_a + ΣR·P(T), not a state part-way up the sink’s rise', () => {
    // Bridge: one cell 1 K/W, case–sink 0.5, sink–ambient 2.5 K/W with 10 J/K: the sink's τ = 3·10 = 30 s
    // is the slowest time constant, far longer than the Foster cell's 4 ms. Rds(on) coefficient α = 0.01/K.
    // Idle: rail at V_s/2, loss a·(1 + α(T − 25)) with a = halfBridgeI2rW(1 Ω, g, V_s²/4) (fixtures.ts).
    // Steady state: ΔT = ΣR·a·(1 + α(T_a + ΔT − 25)) → ΔT = ΣR·a·(1 + α(T_a − 25)) / (1 − α·a·ΣR)
    // (the electrothermal fixed point of shared/physics/driver/electrothermal.ts).
    // Pass device: g·V_s²/4 = 36 W (textbook linear-pass dissipation at half the supply) on 1.5 K/W.
    const d = linearDriver(
      mosfet('bridge', { rKPerW: 1, tauS: 0.004, caseToSinkKPerW: 0.5, sinkToAmbientKPerW: 2.5, sinkHeatCapacityJPerK: 10 }, { rdsOnOhm: 1, rdsOnTempCoeffPerK: 0.01 }),
      mosfet('pass', { rKPerW: 0.5, tauS: 0.004, sinkToAmbientKPerW: 1 }),
    );
    const ambientC = 40;
    const g = 3 / 48;
    const a = halfBridgeI2rW(1, g, 24 * 24);
    const sumR = 4;
    const bridgeRiseK = (sumR * a * (1 + 0.01 * (ambientC - 25))) / (1 - 0.01 * a * sumR);
    expect(bridgeRiseK).toBeGreaterThan(30); // hand value: 4·5.552·1.15/0.778 = 32.8 K
    const idle = idleSteadyJunctionC(d, COIL, ambientC);
    expect(idle.map((x) => x.role)).toEqual(['bridge', 'pass']);
    // 1e-6 K: the run covers 30 sink time constants (e^−23 of the rise even with the feedback's slower
    // τ/(1 − α·a·ΣR) = 38.6 s).
    expect(Math.abs(idle[0].junctionC - (ambientC + bridgeRiseK))).toBeLessThan(1e-6);
    expect(Math.abs(idle[1].junctionC - (ambientC + 36 * 1.5))).toBeLessThan(1e-6);
  });
});

describe('recoveryGapS: the margin is inclusive', () => {
  it('counts a junction exactly RECOVERED_WITHIN_K above its target as recovered (0 s), and one just above it as not', () => {
    // Every node of the device 5 K above ambient: the junction is at 25 + 5 = 30 °C, target 25 °C.
    const nodes = evaluateAtGain(PULSE_CLIP, COIL, WARMING, -Infinity, planSettings(WARMING)).sim.finalState[0].length;
    const at = (riseK: number) => [new Float64Array(nodes).fill(riseK)];
    expect(recoveryGapS(WARMING, COIL, at(RECOVERED_WITHIN_K), [25], 25)).toBe(0);
    const later = recoveryGapS(WARMING, COIL, at(RECOVERED_WITHIN_K + 0.5), [25], 25);
    expect(later).not.toBeNull();
    expect(later!).toBeGreaterThan(0);
  });
});

describe('minSafeGapS: the two reasons no gap is enough', () => {
  it('names the thermal limit when the next item fails junction temperature even from the idle steady state', () => {
    const s = planSettings(SLOW);
    const g = adviseGain(PULSE_CLIP, COIL, SLOW, s).advisedGainDb!;
    const next = Math.round((g + 0.1) * 10) / 10;
    // From cold (where 3600 s of idling takes it: τ_sink ≈ 51 s) the next gain already breaks the bridge's junction limit.
    const fromCold = evaluateAtGain(PULSE_CLIP, COIL, SLOW, next, s);
    expect(fromCold.worst).toMatchObject({ limit: 'junction-temperature', role: 'bridge' });
    const end = evaluateAtGain(PULSE_CLIP, COIL, SLOW, g, s).sim.finalState;
    const r = minSafeGapS(SLOW, COIL, end, PULSE_CLIP, next, s);
    expect(r.gapS).toBeNull();
    expect(r.note).toBe(
      `no gap up to ${MAX_RECOVERY_GAP_S} s is enough: even from the driver's idle steady state the next clip breaks junction temperature (bridge) at its gain; lower its gain`,
    );
  });

  it('says no gap helps when the next item breaks a limit that does not depend on temperature', () => {
    // The 0.5 tone peaks at 0.478: at +8 dB (×2.51) it over-modulates; the strong sinks hold at that swing.
    const s = planSettings(STRONG);
    const clip = TONE(0.5);
    const at8 = evaluateAtGain(clip, COIL, STRONG, 8, s);
    expect(at8.worst!.limit).toBe('over-modulation');
    expect(at8.limits.filter((l) => l.limit === 'junction-temperature').every((l) => l.ok)).toBe(true);
    const end = evaluateAtGain(clip, COIL, STRONG, 0, s).sim.finalState;
    const r = minSafeGapS(STRONG, COIL, end, clip, 8, s);
    expect(r.gapS).toBeNull();
    expect(r.note).toBe('no gap helps: the next clip breaks over-modulated time at its gain whatever the temperature; lower its gain');
  });
});

describe('planSet: an item with no safe gain', () => {
  const s = planSettings(STRONG);
  const items = [
    { clip: TONE(0.5), gapAfterS: 0, gainDb: null },
    { clip: HOT, gapAfterS: 0, gainDb: null },
  ];

  it('plans it silent (−∞ dB) per item, evaluated as silence from the state it starts in, and lists it with the reason', () => {
    expect(adviseGain(HOT, COIL, STRONG, s).advisedGainDb).toBeNull();
    const set = planSet(items, COIL, STRONG, s);
    const [first, hot] = set.items;
    expect(first.advisedGainDb).not.toBeNull();
    expect(hot.advisedGainDb).toBeNull();
    expect(hot.gainDb).toBe(-Infinity);
    // Silence over-modulates nothing, and the strong sinks hold at idle: the item holds every limit…
    expect(hot.ok).toBe(true);
    expect(hot.failing).toEqual([]);
    expect(set.firstFailingItem).toBeNull();
    // …but it cannot be played, and the set says so: no gain is safe even from cold (HOT over-modulates at any gain).
    expect(set.silentItems).toEqual([{ index: 1, clip: 'hot', evenCold: true, note: expect.stringMatching(/cannot be played on this coil and driver; it is planned silent/) }]);
    // The same as evaluating silence from the first item's end state (gap 0).
    const end = evaluateAtGain(TONE(0.5), COIL, STRONG, first.gainDb, s).sim.finalState;
    const silent = evaluateAtGain(HOT, COIL, STRONG, -Infinity, s, { initial: end });
    hot.devices.forEach((dev, k) => expect(Math.abs(dev.peakJunctionC - silent.sim.devices[k].peakJunctionC)).toBeLessThan(1e-9));
  });

  it("plays it at the common gain in 'min-advised' mode (the lowest advice among the items that have one), where it shows what it breaks", () => {
    const set = planSet(items, COIL, STRONG, s, { commonGainDb: 'min-advised' });
    const alone = adviseGain(TONE(0.5), COIL, STRONG, s).advisedGainDb!;
    expect(set.gainMode).toBe('common');
    expect(set.commonGainDb).toBe(alone);
    expect(set.items.map((i) => i.gainDb)).toEqual([alone, alone]);
    expect(set.items[0].ok).toBe(true);
    expect(set.items[1].ok).toBe(false);
    expect(set.items[1].failing.map((l) => l.limit)).toContain('over-modulation');
    expect(set.firstFailingItem).toBe(1);
    expect(set.silentItems).toEqual([]);
  });

  it("silences the whole set in 'min-advised' mode only when no item has a safe gain, and lists every item", () => {
    const set = planSet([{ clip: HOT, gapAfterS: 0, gainDb: null }, { clip: HOT, gapAfterS: 0, gainDb: null }], COIL, STRONG, s, { commonGainDb: 'min-advised' });
    expect(set.commonGainDb).toBe(-Infinity);
    expect(set.items.map((i) => i.ok)).toEqual([true, true]);
    expect(set.silentItems.map((x) => [x.index, x.evenCold])).toEqual([[0, true], [1, true]]);
  });

  it('says when only the temperature the set leaves an item at rules out every gain (a longer gap would help)', () => {
    // A rail-linear pass device idling at V_s²/4·g on a slow sink (3 K/W, 8 J/K, τ ≈ 24 s): idle
    // alone would settle it above its limit, so after 120 s of the first item (silence at −40 dB)
    // the next starts too hot for any gain, though from cold a 1 s tone has a safe gain.
    const slowHot = linearDriver(
      mosfet('bridge', { rKPerW: 1, tauS: 0.004, sinkToAmbientKPerW: 14 }, { rdsOnOhm: 1 }),
      mosfet('pass', { rKPerW: 0.5, tauS: 0.004, sinkToAmbientKPerW: 3, sinkHeatCapacityJPerK: 8 }),
    );
    const hs = planSettings(slowHot);
    const short = TONE(0.3);
    expect(adviseGain(short, COIL, slowHot, hs).advisedGainDb).not.toBeNull();
    const set = planSet([{ clip: planClip('idle', silence(120)), gapAfterS: 0, gainDb: -40 }, { clip: short, gapAfterS: 0, gainDb: null }], COIL, slowHot, hs);
    expect(set.items[1].advisedGainDb).toBeNull();
    expect(set.items[1].gainDb).toBe(-Infinity);
    expect(set.silentItems).toEqual([{ index: 1, clip: short.name, evenCold: false, note: expect.stringMatching(/though one does from cold: it is planned silent\. Give it a longer gap before it/) }]);
  });
});

describe('planSet: which item fails first, and the safe-gap search', () => {
  const s = planSettings(STRONG);

  it('names the first failing item when several fail', () => {
    // At +12 dB the 0.5 tone (peak 0.478) swings to 1.9 × full scale: both items over-modulate.
    const set = planSet(
      [
        { clip: TONE(0.5), gapAfterS: 0, gainDb: 12 },
        { clip: TONE(0.5), gapAfterS: 0, gainDb: 12 },
        { clip: TONE(0.5), gapAfterS: 0, gainDb: 12 },
      ],
      COIL,
      STRONG,
      s,
    );
    expect(set.items.map((i) => i.ok)).toEqual([false, false, false]);
    expect(set.firstFailingItem).toBe(0);
  });

  it('leaves the safe gaps unsearched with safeGaps: false, and searches them with safeGaps: true', () => {
    // At −20 dB the tone is far from every limit: the next item needs no gap.
    const items = [
      { clip: TONE(0.5), gapAfterS: 0, gainDb: -20 },
      { clip: TONE(0.5), gapAfterS: 0, gainDb: -20 },
    ];
    const off = planSet(items, COIL, STRONG, s, { safeGaps: false });
    expect(off.items[0].minSafeGapAfterS).toBeNull();
    expect(off.items[0].minSafeGapNote).toBeNull();
    expect(off.items[1].minSafeGapNote).toBe('the last item: nothing follows it');
    const on = planSet(items, COIL, STRONG, s, { safeGaps: true });
    expect(on.items[0].minSafeGapAfterS).toBe(0);
    expect(on.items[0].minSafeGapNote).toBe('no gap needed: the next clip keeps every limit even if it starts at once');
  });

  it("runs the 'min-advised' pre-pass without the safe-gap search: its cost is a plain per-item pass plus the common-gain pass", () => {
    // The documented plan (planSet's opts): the pre-pass is planSet(items, { safeGaps: false }); then
    // the set is played at the lowest advice. So its evaluations are exactly those two runs' evaluations.
    const count = vi.mocked(evaluateAtGain);
    const evaluationsOf = (f: () => unknown) => {
      count.mockClear();
      f();
      return count.mock.calls.length;
    };
    const items = [
      { clip: TONE(0.25), gapAfterS: 1, gainDb: null },
      { clip: TONE(0.5), gapAfterS: 0, gainDb: null },
    ];
    let common = 0;
    const prePass = evaluationsOf(() => {
      common = Math.min(...planSet(items, COIL, STRONG, s, { safeGaps: false }).items.map((i) => i.advisedGainDb!));
    });
    const main = evaluationsOf(() => planSet(items, COIL, STRONG, s, { commonGainDb: common }));
    const withGaps = evaluationsOf(() => planSet(items, COIL, STRONG, s));
    // The safe-gap search does cost evaluations, so the comparison below can tell.
    expect(withGaps).toBeGreaterThan(prePass);
    expect(evaluationsOf(() => planSet(items, COIL, STRONG, s, { commonGainDb: 'min-advised' }))).toBe(prePass + main);
  });
});
