/**
 * planClipReport (shared/plan/report.ts) at the edges the other report tests leave open: the pulse
 * scheme's own figures (supply current during a pulse, RF cycles per pulse, the duty cycle over one
 * pulse period), a plan at the advised gain that reuses the search's evaluation (and so rebuilds the
 * pulse train for the demand), frames longer than a second, a rail profile carrying pulse data,
 * per-device figures (own Tj max, runaway time), devices the scheme does not use, a search from a
 * given thermal state, a clip that is unsafe even on silence (its demand and limiting are those of
 * silence), the idle warnings beside a switch that is too slow, and the refusal naming the slow
 * switch. Expected values are hand values (worked in the comments) or follow from a definition.
 */
import { describe, expect, it } from 'vitest';
import { DEMO_DRIVER_BUCK } from '../../../shared/demo/drivers.ts';
import { adviseGain } from '../../../shared/plan/advise.ts';
import { DUTY_WINDOW } from '../../../shared/plan/duty-cycle.ts';
import { evaluateAtGain, planSettings } from '../../../shared/plan/evaluate.ts';
import { idleWarning } from '../../../shared/plan/idle.ts';
import { pulsesAtGain } from '../../../shared/plan/pulse-train.ts';
import { planClipReport } from '../../../shared/plan/report.ts';
import { COIL, COIL_WITH_CORNER, linearDriver, mosfet, planClip, pulseDriver, silence, tone } from './fixtures.ts';

const A = 0.5;
/** Bridge on 15 K/W (one cell 1 K/W, τ 4 ms, massless sink 14 K/W), R_ds(on) 1 Ω; pass device on 1.5 K/W. */
const WEAK_BRIDGE = mosfet('bridge', { rKPerW: 1, tauS: 0.004, sinkToAmbientKPerW: 14 }, { rdsOnOhm: 1 });
const COOL_PASS = mosfet('pass', { rKPerW: 0.5, tauS: 0.004, sinkToAmbientKPerW: 1 });
/** A pass device that idles far above its limit: g·V_s²/4 = 36 W on 0.5 + 7 K/W settles at 25 + 36·7.5 = 295 °C. */
const HOT_PASS = mosfet('pass', { rKPerW: 0.5, tauS: 0.004, sinkToAmbientKPerW: 7 });
const WEAK = linearDriver(WEAK_BRIDGE, COOL_PASS);
/** 1 s of a 200 Hz tone of peak 0.5 whose upward zero crossings each start a whole cycle within the clip (see below). */
const PULSE_TONE = tone(200, A, 1, 8000, -0.3);
const PULSE = pulseDriver(mosfet('bridge', { rKPerW: 0.5, tauS: 0.01, sinkToAmbientKPerW: 1 }));

/**
 * Per-frame on-time fractions of a pulse train on frames of `frameS`: each pulse's overlap with
 * every frame, by brute force over all frames (the definition of the pulse scheme's demand).
 */
function onFractionPerFrame(train: { startS: Float64Array; onS: Float64Array; count: number }, frames: number, frameS: number): Float64Array {
  const out = new Float64Array(frames);
  for (let i = 0; i < train.count; i++) {
    const a = train.startS[i];
    const b = a + train.onS[i];
    for (let k = 0; k < frames; k++) out[k] += Math.max(0, Math.min(b, (k + 1) * frameS) - Math.max(a, k * frameS)) / frameS;
  }
  return out;
}

describe('planClipReport: the pulse scheme’s own figures', () => {
  // 200 Hz tone of peak 0.5 starting at phase −0.3 rad: it rises through zero at (k + 0.3/2π)/200 s
  // = 0.24 ms + k·5 ms, 200 times in 1 s, each followed by its peak within the clip, so every pulse
  // has level 0.5: the sampled peak (40 samples per cycle) is within cos(π/40), 0.31 %, of it. At 0 dB
  // the on-time law gives maxOnTimeS·g·level = 150 µs·1·0.5 = 75 µs per pulse (docs/models.md).
  const clip = planClip('p', PULSE_TONE, { pulses: true });
  const { report, evaluation } = planClipReport(clip, COIL_WITH_CORNER, PULSE, planSettings(PULSE), { gainDb: 0 });

  it('gives the supply current during a pulse as the peak, with no frame window', () => {
    expect(report.supply.peakIs).toBe('pulse-current');
    expect(report.supply.peakWindowS).toBeNull();
  });

  it('reports RF cycles per pulse at f0: 75 µs · 300 kHz = 22.5, none shorter than the ring-up time', () => {
    // Ring-up time Q/(π·f0) = 30/(π·300 kHz) = 31.8 µs (shared/physics/driver/currents.ts) < 75 µs.
    const rf = report.pulseRf!;
    expect(rf).not.toBeNull();
    expect(rf).toEqual(evaluation.sim.pulse);
    expect(rf.count).toBe(200);
    expect(report.pulses!.count).toBe(200);
    expect(Math.abs(rf.rfCyclesMean - 22.5) / 22.5).toBeLessThan(0.005);
    expect(Math.abs(rf.rfCyclesMin - 22.5) / 22.5).toBeLessThan(0.005);
    expect(rf.shorterThanRingUp).toBe(0);
  });

  it('gives the duty cycle over one pulse period: 75 µs per 5 ms = 1.5 %, against the profile’s 10 %', () => {
    const duty = report.dutyCycle!;
    expect(duty).not.toBeNull();
    expect(duty.window).toBe(DUTY_WINDOW);
    expect(duty.maxDuty).toBe(0.1);
    // Mean: Σ on-time / clip length (definition, shared/plan/duty-cycle.ts).
    expect(Math.abs(duty.meanDuty - report.pulses!.totalOnS / 1)).toBeLessThan(1e-12);
    // 200 pulses of 75 µs in 1 s, each 5 ms after the last: within 0.5 % of 1.5 % (sampled peaks).
    expect(Math.abs(duty.meanDuty - 0.015) / 0.015).toBeLessThan(0.005);
    expect(Math.abs(duty.worstDuty - 0.015) / 0.015).toBeLessThan(0.005);
    expect(duty.worstAtS).not.toBeNull();
  });
});

describe('planClipReport: the pulse scheme at the advised gain (the search’s evaluation reused)', () => {
  const clip = planClip('p', PULSE_TONE, { pulses: true });
  const { report, advice, evaluation } = planClipReport(clip, COIL_WITH_CORNER, PULSE, planSettings(PULSE));

  it('returns the search’s own evaluation and still gives the demand and duty of its pulse train', () => {
    expect(report.advisedGainDb).not.toBeNull();
    expect(report.evaluatedGainDb).toBe(report.advisedGainDb);
    expect('atAdvised' in advice && evaluation === advice.atAdvised).toBe(true);
    // Whole-clip window of the demand and the mean duty: both Σ on-time / clip length (definitions).
    const total = report.pulses!.totalOnS;
    expect(total).toBeGreaterThan(0);
    const demand = report.budget[0].demand;
    expect(Math.abs(demand[demand.length - 1] - total / 1)).toBeLessThan(1e-9);
    expect(Math.abs(report.dutyCycle!.meanDuty - total / 1)).toBeLessThan(1e-12);
    // On-time law at gain g: min(150 µs, 150 µs·g·0.5) per 5 ms period, within 1 % (sampled peaks, see above).
    const g = 10 ** (report.evaluatedGainDb / 20);
    const want = Math.min(150e-6, 150e-6 * g * A) / 0.005;
    expect(Math.abs(report.dutyCycle!.meanDuty - want) / want).toBeLessThan(0.01);
    expect(Math.abs(report.dutyCycle!.worstDuty - want) / want).toBeLessThan(0.01);
  });
});

describe('planClipReport: pulse demand on frames longer than a second', () => {
  it('spreads every pulse over the 2 s frames it falls in', () => {
    // Six seconds on three 2 s frames: each frame holds its pulses in full (a pulse is 75 µs), so
    // every frame's on-time fraction is its Σ on-time / 2 s ≈ 1.5 %, and the whole clip's is Σ on / 6 s.
    const clip = planClip('p', tone(200, A, 6), { pulses: true, frameS: 2 });
    expect(clip.frames.count).toBe(3);
    const r = planClipReport(clip, COIL_WITH_CORNER, PULSE, planSettings(PULSE), { gainDb: 0 }).report;
    const train = pulsesAtGain(clip.pulseEvents!, 1, PULSE.pulse!);
    const frames = onFractionPerFrame(train, 3, 2);
    const demand = r.budget[0].demand;
    expect(Math.abs(demand[0] - Math.max(...frames))).toBeLessThan(1e-12);
    expect(Math.abs(demand[demand.length - 1] - r.pulses!.totalOnS / 6)).toBeLessThan(1e-12);
    expect(Math.abs(demand[demand.length - 1] - 0.015) / 0.015).toBeLessThan(0.01);
  });
});

describe('planClipReport: rail-scheme figures', () => {
  it('gives the highest frame mean as the supply peak, and no pulse figures even when profile and clip carry pulse data', () => {
    const withPulse = { ...WEAK, pulse: { maxOnTimeS: 150e-6, minOffTimeS: 5e-4, maxDuty: 0.1 } };
    const plain = planClipReport(planClip('t', tone(1000, A, 0.2)), COIL_WITH_CORNER, WEAK, planSettings(WEAK), { gainDb: 0 }).report;
    const both = planClipReport(planClip('t', tone(1000, A, 0.2), { pulses: true }), COIL_WITH_CORNER, withPulse, planSettings(withPulse), { gainDb: 0 }).report;
    const profileOnly = planClipReport(planClip('t', tone(1000, A, 0.2)), COIL_WITH_CORNER, withPulse, planSettings(withPulse), { gainDb: 0 }).report;
    for (const r of [plain, both, profileOnly]) {
      expect(r.supply.peakIs).toBe('frame-mean');
      expect(r.supply.peakWindowS).toBe(0.001);
      expect(r.pulseRf).toBeNull();
      expect(r.dutyCycle).toBeNull();
    }
  });

  it('takes each device’s own Tj max and limit', () => {
    const d = linearDriver(WEAK_BRIDGE, { ...COOL_PASS, tjMaxC: 175 });
    const r = planClipReport(planClip('t', tone(1000, A, 0.2)), COIL_WITH_CORNER, d, planSettings(d), { gainDb: 0 }).report;
    // Limit = Tj max − 25 K margin.
    expect(r.devices.map((x) => [x.role, x.tjMaxC, x.limitC])).toEqual([
      ['bridge', 150, 125],
      ['pass', 175, 150],
    ]);
  });

  it('budgets only the devices the scheme uses', () => {
    // A modulator on a rail-linear profile is valid (schemas/driver.ts) and ignored by the simulation.
    const d = linearDriver(WEAK_BRIDGE, COOL_PASS, { devices: [WEAK_BRIDGE, COOL_PASS, mosfet('modulator', { rKPerW: 1, tauS: 0.004 })] });
    const r = planClipReport(planClip('t', tone(1000, A, 0.2)), COIL_WITH_CORNER, d, planSettings(d), { gainDb: 0 }).report;
    expect(r.devices.map((x) => x.role)).toEqual(['bridge', 'pass']);
    expect(r.budget.map((x) => x.role)).toEqual(['bridge', 'pass']);
  });

  it('gives a device’s runaway time, and null for a device that does not run away', () => {
    // Bridge 1 Ω on one 50 K/W cell (τ 10 ms), no sink: at idle P = (π/2)²·g²·576 V² = 5.55 W, steady
    // rise 277.6 K: its junction passes Tj max 150 °C at −τ·ln(1 − 125/277.6) = 5.98 ms (first-order
    // step response; the same case as evaluate-edges.test.ts), flagged within one 1 ms frame.
    const d = linearDriver(mosfet('bridge', { rKPerW: 50, tauS: 0.01 }, { rdsOnOhm: 1 }), COOL_PASS);
    const r = planClipReport(planClip('q', silence(0.1)), COIL_WITH_CORNER, d, planSettings(d), { gainDb: 0 }).report;
    const p = (Math.PI / 2) ** 2 * (1 / 256) * 576;
    const cross = -0.01 * Math.log(1 - 125 / (50 * p));
    expect(Math.abs(r.devices[0].runawayAtS! - cross)).toBeLessThanOrEqual(0.001);
    expect(r.devices[1].runawayAtS).toBeNull();
  });

  it('gives a device with no full-operation loss demand 0 (not 0/0) and the whole budget', () => {
    // R_ds(on) 0 with ideal switching (below the schema's range, set after validation): the bridge
    // never heats, so its full-operation loss is 0, its demand 0 (not 0/0) and its budget 1
    // (shared/plan/demand.ts: P_full ≤ 0 gives 1).
    const d = { ...WEAK, devices: [{ ...WEAK.devices[0], rdsOnOhm: 0 }, WEAK.devices[1]] };
    const r = planClipReport(planClip('t', tone(1000, A, 0.2)), COIL_WITH_CORNER, d, planSettings(d), { gainDb: 3 }).report;
    const b = r.budget.find((x) => x.role === 'bridge')!;
    expect(b.fullLossW).toBe(0);
    expect(b.demand.every((m) => m === 0)).toBe(true);
    expect(b.budget.every((x) => x === 1)).toBe(true);
  });
});

describe('planClipReport: the search behind the plan', () => {
  const TONE = planClip('tone', tone(1000, A, 0.5));
  const settings = planSettings(WEAK);

  it('at the advised gain returns the search’s own evaluation (no second simulation)', () => {
    const { report, advice, evaluation } = planClipReport(TONE, COIL_WITH_CORNER, WEAK, settings);
    expect(report.advisedGainDb).not.toBeNull();
    expect('atAdvised' in advice && evaluation === advice.atAdvised).toBe(true);
  });

  it('evaluates afresh when traces are asked for, since the search keeps none', () => {
    const { report, evaluation } = planClipReport(TONE, COIL_WITH_CORNER, WEAK, settings, { traces: true });
    expect(report.evaluatedGainDb).toBe(report.advisedGainDb);
    expect(evaluation.sim.devices[0].traces!.junctionC).toHaveLength(TONE.frames.count);
  });

  it('names the binding limit without a switching frequency when it is not the switching speed', () => {
    const { report, advice } = planClipReport(TONE, COIL_WITH_CORNER, WEAK, settings);
    const b = advice.binding!;
    // The weak bridge binds on its junction (report.test.ts); the label is limit-labels.ts's plain name.
    expect(report.binding).toStrictEqual({ limit: 'junction-temperature', label: 'junction temperature (bridge)', role: 'bridge', atS: b.atS, value: b.value, allowed: 125, unit: 'C' });
  });

  it('searches from the given thermal state: a device starting warm takes a lower gain', () => {
    // A short clip, 0.05 s against the bridge path's 60 ms time constant (τ' = C₁·ΣR = 4 mJ/K·15 K/W):
    // starting from the state left by a loud second, the bridge has less headroom than from ambient.
    const short = planClip('s', tone(1000, A, 0.05));
    const warm = evaluateAtGain(planClip('loud', tone(1000, A, 1)), COIL, WEAK, 0, settings).sim.finalState;
    const cold = planClipReport(short, COIL_WITH_CORNER, WEAK, settings).report;
    const { report, evaluation } = planClipReport(short, COIL_WITH_CORNER, WEAK, settings, { initial: warm });
    expect(report.advisedGainDb).toBe(adviseGain(short, COIL, WEAK, settings, { initial: warm }).advisedGainDb);
    expect(report.advisedGainDb!).toBeLessThan(cold.advisedGainDb!);
    // And the figures at that gain, from that state, keep every limit.
    expect(evaluation.ok).toBe(true);
    expect(report.limits.every((l) => l.ok)).toBe(true);
  });
});

describe('planClipReport: unsafe even on silence', () => {
  const hot = linearDriver(WEAK_BRIDGE, HOT_PASS);
  const { report } = planClipReport(planClip('t', tone(100, A, 0.3)), COIL_WITH_CORNER, hot, planSettings(hot));

  it('gives the demand of silence: the bridge at E[v²]/V_s² = ¼ (rail at its bias), the pass device at 1', () => {
    // Silence puts the rail at V_s/2: the MOSFET bridge's loss ∝ E[v²] is ¼ of its full-rail loss, the
    // pass device dissipates its worst, g·V_s²/4 (textbook linear-regulator dissipation).
    expect(report.evaluatedGainDb).toBe(-Infinity);
    for (const m of report.budget.find((x) => x.role === 'bridge')!.demand) expect(m).toBeCloseTo(0.25, 9);
    for (const m of report.budget.find((x) => x.role === 'pass')!.demand) expect(m).toBeCloseTo(1, 9);
  });

  it('notes no limiting: at zero gain no sample reaches the ceiling', () => {
    expect(report.limiting.deepShare).toBe(0);
    expect(report.limiting.heavy).toBe(false);
    expect(report.limiting.note).toBeNull();
  });

  it('warns of the device that idles above its limit, after the refusal', () => {
    expect(report.warnings[0]).toMatch(/^No gain is safe: a device exceeds its limit even on silence/);
    const pass = report.idle.find((f) => f.role === 'pass')!;
    // 36 W on 7.5 K/W: 295 °C against 150 − 25 = 125 °C (hand values above).
    expect(report.warnings).toContain(idleWarning(pass));
    expect(idleWarning(pass)).toMatch(/^pass device: idling \(supply on, no music: rail at 24\.0 V, 36\.00 W\) it settles at 295 °C, above its 125 °C limit/);
    expect(report.warnings.filter((w) => /idling/.test(w))).toHaveLength(1);
  });
});

describe('planClipReport: a switch too slow for its frequency', () => {
  it('refuses every gain naming the bridge, and leaves out its idle warning (the bound’s) but not the pass device’s', () => {
    // t_r + t_f = 1 µs at f0 = 300 kHz: a transition share of 0.3 > 0.2 (shared/physics/driver/transition.ts).
    const slow = mosfet('bridge', { rKPerW: 1, tauS: 0.004, sinkToAmbientKPerW: 14 }, { riseTimeS: 0.5e-6, fallTimeS: 0.5e-6 });
    const d = linearDriver(slow, HOT_PASS);
    const r = planClipReport(planClip('t', tone(1000, A, 0.2)), COIL_WITH_CORNER, d, planSettings(d)).report;
    expect(r.devices[0].tooSlow).toBe(true);
    expect(r.devices[1].tooSlow).toBe(false);
    expect(r.warnings[0]).toBe('No gain is safe: bridge switch: too slow for 300 kHz (see below); no gain changes that.');
    expect(r.binding).toMatchObject({ limit: 'switching-speed', role: 'bridge', frequencyHz: 300e3 });
    // Both devices idle above their limit: the slow bridge at half rail (24 V, 1.5 A) takes the
    // linear-element bound ¼·V·Î = ¼·24·π·1.5 = 28.27 W (transition.ts; Î = π·I_s, Erickson &
    // Maksimović §19.1) plus conduction (π/2)²·0.1 Ω·1.5² = 0.56 W, on 15 K/W: 25 + 15·28.83 = 457 °C.
    // Only the pass device is warned of.
    const [bridge, pass] = r.idle;
    expect(bridge.steadyJunctionC).toBeCloseTo(25 + 15 * (0.25 * 24 * Math.PI * 1.5 + 0.1 * (Math.PI / 2) ** 2 * 2.25), 6);
    expect(bridge.steadyJunctionC).toBeGreaterThan(bridge.limitC);
    expect(idleWarning(bridge)).not.toBe('');
    expect(r.warnings).not.toContain(idleWarning(bridge));
    expect(r.warnings).toContain(idleWarning(pass));
    expect(r.warnings.filter((w) => /idling/.test(w))).toEqual([idleWarning(pass)]);
  });

  it('names the modulator when it is the slow switch', () => {
    // Demo buck, PWM at 150 kHz: t_r + t_f = 2 µs gives a share of 0.3 > 0.2.
    const d = { ...DEMO_DRIVER_BUCK, devices: DEMO_DRIVER_BUCK.devices.map((x) => (x.role === 'modulator' ? { ...x, riseTimeS: 1e-6, fallTimeS: 1e-6 } : x)) };
    const r = planClipReport(planClip('t', tone(1000, A, 0.2)), COIL_WITH_CORNER, d, planSettings(d)).report;
    expect(r.warnings[0]).toBe('No gain is safe: modulator switch: too slow for 150 kHz (see below); no gain changes that.');
  });
});
