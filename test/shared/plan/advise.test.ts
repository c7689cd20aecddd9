import { describe, expect, it } from 'vitest';
import { DEMO_DRIVERS } from '../../../shared/demo/drivers.ts';
import { MAX_GAIN_DB, adviseGain, overModulationBoundDb } from '../../../shared/plan/advise.ts';
import { type PlanClip, evaluateAtGain, planSettings } from '../../../shared/plan/evaluate.ts';
import type { DriverProfile } from '../../../shared/schemas/driver.ts';
import { ampToDb } from '../../../shared/units.ts';
import { COIL, halfBridgeI2rW, linearDriver, mosfet, planClip, pulseDriver, silence, tone } from './fixtures.ts';

// Invented drivers (fixtures.ts): rail-linear, 48 V, g = 1/16 A/V, α = 0, one Foster cell per device
// (τ = 4 ms) and a massless sink, so each device is one RC with τ' = C₁·ΣR ≤ 60 ms and a 2 s clip
// ends within e^(−33) of the steady state. Tj max 150 °C, margin 25 K: 100 K allowed rise at 25 °C.
const G = 3 / 48;
const A = 0.5;
const RISE_K = 100;
const TONE = planClip('tone', tone(1000, A, 2));
const passCool = mosfet('pass', { rKPerW: 0.5, tauS: 0.004, sinkToAmbientKPerW: 1 });
const bridgeWith = (sinkToAmbientKPerW: number) => mosfet('bridge', { rKPerW: 1, tauS: 0.004, sinkToAmbientKPerW }, { rdsOnOhm: 1 });

/**
 * Gain (dB) at which the bridge's steady junction rise reaches `riseK`: its loss at gain g is
 * (π/2)²·R·g_c²·E[v²] with E[v²] = (V_s²/4)(1 + g²A²/2) for a sine of peak A (whole periods per
 * frame), and the steady rise is loss·ΣR (NXP AN11261). Solved for g by hand.
 */
function bridgeEdgeDb(sumRKPerW: number, riseK: number): number {
  const idleW = halfBridgeI2rW(1, G, 576);
  const u2 = 2 * (riseK / (idleW * sumRKPerW) - 1); // (gA)²
  return ampToDb(Math.sqrt(u2) / A);
}

/** Evaluates at advised and advised + step; returns both. */
function around(clip: PlanClip, d: DriverProfile, advised: number, step: number) {
  const s = planSettings(d);
  return { at: evaluateAtGain(clip, COIL, d, advised, s), above: evaluateAtGain(clip, COIL, d, advised + step, s) };
}

describe('adviseGain: the binding limit sits within 0.1 dB of its edge', () => {
  it('junction temperature (weak bridge sink): advised ≤ analytic edge < advised + 0.1 dB', () => {
    // Bridge ΣR = 1 + 14 = 15 K/W: edge at 2.0595 dB (hand solution of loss·ΣR = 100 K), far below the
    // over-modulation bound (6.41 dB).
    const d = linearDriver(bridgeWith(14), passCool);
    const a = adviseGain(TONE, COIL, d, planSettings(d));
    const edge = bridgeEdgeDb(15, RISE_K);
    expect(edge).toBeCloseTo(2.0595, 3);
    expect(a.advisedGainDb).toBeCloseTo(2.0, 9);
    // 1e-6 dB for the e^(−33) transient and float32 samples.
    expect(a.advisedGainDb!).toBeLessThanOrEqual(edge + 1e-6);
    expect(edge).toBeLessThan(a.advisedGainDb! + 0.1);
    expect(a.binding).toMatchObject({ limit: 'junction-temperature', role: 'bridge', unit: 'C', allowed: 125 });
    expect(a.binding!.value).toBeGreaterThan(125);
    // The peak lies on the steady plateau after the rise from cold (τ' = 60 ms; which plateau frame
    // holds the largest value is float noise).
    expect(a.binding!.atS).toBeGreaterThan(0.5);
    const { at, above } = around(TONE, d, a.advisedGainDb!, 0.2);
    expect(at.ok).toBe(true);
    expect(above.ok).toBe(false);
    expect(above.worst).toMatchObject({ limit: 'junction-temperature', role: 'bridge' });
    expect(a.atAdvised.gainDb).toBe(a.advisedGainDb);
    expect(a.unsafeOnSilence).toBe(false);
  });

  it('over-modulation (strong sinks): advised ≤ −20·log10(peak) < advised + 0.1 dB', () => {
    const d = linearDriver(bridgeWith(1), passCool);
    const a = adviseGain(TONE, COIL, d, planSettings(d));
    // The tone's highest sample: 1 kHz at 8 kHz has 8 phases 0.3 + kπ/4, highest |sin| at 0.3 + π/2.
    const edge = -ampToDb(Math.fround(A * Math.cos(0.3)));
    expect(edge).toBeCloseTo(6.4175, 3); // −20·log10(0.5·cos 0.3)
    // 0.01 dB: one histogram bin (fractionAbove is exact to a bin).
    expect(a.advisedGainDb!).toBeLessThanOrEqual(edge + 0.01);
    expect(edge).toBeLessThan(a.advisedGainDb! + 0.1);
    expect(a.binding).toMatchObject({ limit: 'over-modulation', role: null, unit: 'share', atS: 0 });
    const { at, above } = around(TONE, d, a.advisedGainDb!, 0.2);
    expect(at.ok).toBe(true);
    expect(above.limits.find((l) => l.limit === 'over-modulation')!.ok).toBe(false);
    expect(above.limits.filter((l) => l.limit === 'junction-temperature').every((l) => l.ok)).toBe(true);
  });

  it('pulse scheme, duty: the on-time demand maxOn·g·level reaches maxDuty·period at the edge', () => {
    // 200 Hz tone → one pulse per 5 ms period; duty cap 0.01·5 ms = 50 µs; demand 150 µs·g·level
    // (on-time law, docs/models.md) → edge g = 1/(3·level), −3.52 dB, far below over-modulation (+6 dB).
    const d = pulseDriver(mosfet('bridge', { rKPerW: 0.5, tauS: 0.01, sinkToAmbientKPerW: 1 }), { maxDuty: 0.01 });
    const clip = planClip('p', tone(200, A, 2), { pulses: true });
    const level = Math.max(...clip.pulseEvents!.level);
    const edge = ampToDb(1 / (3 * level));
    const a = adviseGain(clip, COIL, d, planSettings(d));
    expect(a.advisedGainDb!).toBeLessThanOrEqual(edge + 1e-9);
    expect(edge).toBeLessThan(a.advisedGainDb! + 0.1);
    expect(a.binding).toMatchObject({ limit: 'duty', unit: 'share' });
    const { at, above } = around(clip, d, a.advisedGainDb!, 0.2);
    expect(at.ok).toBe(true);
    expect(at.pulses!.dutyShare).toBe(0);
    // Above the edge every pulse is shortened but the first (no period yet) and the last (its cycle is
    // cut by the clip's end, so its level, the cycle's peak, is lower).
    expect(above.pulses!.dutyClamped).toBe(above.pulses!.count - 2);
    expect(above.limits.find((l) => l.limit === 'duty')!.ok).toBe(false);
  });

  it('pulse scheme, on-time: with a loose duty limit the maximum on-time binds at g·level = 1', () => {
    const d = pulseDriver(mosfet('bridge', { rKPerW: 0.5, tauS: 0.01, sinkToAmbientKPerW: 1 }), { maxDuty: 0.5 });
    const clip = planClip('p', tone(200, A, 1), { pulses: true });
    const edge = -ampToDb(Math.max(...clip.pulseEvents!.level));
    const a = adviseGain(clip, COIL, d, planSettings(d));
    expect(a.advisedGainDb!).toBeLessThanOrEqual(edge + 0.01);
    expect(edge).toBeLessThan(a.advisedGainDb! + 0.1);
    // On-time and over-modulation fail together there; every pulse but the last (its cycle is cut by
    // the clip's end) is clamped, so on-time is the worst.
    expect(a.binding!.limit).toBe('on-time');
    const p = around(clip, d, a.advisedGainDb!, 0.2).above.pulses!;
    expect(p.onTimeClamped).toBe(p.events - 1);
  });

  it('does not stop a tenth short when the over-modulation bound lies just under a tenth (regression)', () => {
    // Peak at −6.1008 dBFS: the bound bisection (to 0.01 dB) lands at 6.0950 dB, whose tenth is 6.0,
    // yet 6.1 dB is safe. Before the fix the advice was 6.0 dB with no binding limit.
    const x = tone(1000, Math.pow(10, -6.1008 / 20), 1, 8000, Math.PI / 2);
    const clip = planClip('edge', x);
    const d = linearDriver(bridgeWith(1), passCool);
    const a = adviseGain(clip, COIL, d, planSettings(d));
    expect(a.overModulationBoundDb).toBeLessThan(6.1);
    expect(a.advisedGainDb).toBeCloseTo(6.1, 9);
    expect(a.binding?.limit).toBe('over-modulation');
    expect(evaluateAtGain(clip, COIL, d, 6.2, planSettings(d)).ok).toBe(false);
  });
});

describe('adviseGain: the demo drivers, one per scheme', () => {
  it.each(DEMO_DRIVERS.map((d) => [d.scheme, d] as const))('%s: every limit holds at the advice and one fails 0.1 dB above', (_scheme, d) => {
    // A 220 Hz tone with a 6 dB step, 1.5 s: the search's own claim, on profiles nobody tuned for it.
    const x = tone(220, 0.25, 1.5);
    for (let i = x.length / 2; i < x.length; i++) x[i] *= 2;
    const clip = planClip('step', x, { pulses: d.scheme === 'pulse' });
    const s = planSettings(d);
    const a = adviseGain(clip, COIL, d, s);
    expect(a.advisedGainDb).not.toBeNull();
    expect(evaluateAtGain(clip, COIL, d, a.advisedGainDb!, s).ok).toBe(true);
    const above = evaluateAtGain(clip, COIL, d, Math.round(a.advisedGainDb! * 10 + 1) / 10, s);
    expect(above.ok).toBe(false);
    expect(above.limits.find((l) => l.limit === a.binding!.limit && l.role === a.binding!.role)!.ok).toBe(false);
  });
});

describe('overModulationBoundDb', () => {
  it('follows the arcsine law of a sine: share s over-modulated at g·A·cos(πs/2) = 1', () => {
    // P(|A sin| > L) = (2/π)·arccos(L/A) (textbook). 48 kHz and 997 Hz so the phases fill the cycle;
    // tolerance 0.02 dB (bound resolution 0.01 dB plus the sampled sine).
    const clip = planClip('sine', tone(997, A, 2, 48000), { fs: 48000 });
    for (const s of [0.2, 0.05]) {
      expect(Math.abs(overModulationBoundDb(clip, s) - -ampToDb(A * Math.cos((Math.PI * s) / 2)))).toBeLessThan(0.02);
    }
    // No over-modulation allowed: never above the gain that takes the peak to full scale.
    expect(overModulationBoundDb(clip, 0)).toBeLessThanOrEqual(-ampToDb(clip.histogram.peak) + 1e-12);
    // Silence never over-modulates: the top of the search range.
    expect(overModulationBoundDb(planClip('quiet', silence(0.1)), 0.001)).toBe(MAX_GAIN_DB);
  });
});

describe('adviseGain: limits that are not monotone in gain', () => {
  it('a linear pass device runs hottest with the rail idling at half the supply', () => {
    const d = linearDriver(bridgeWith(1), passCool);
    const s = planSettings(d);
    // Pass loss g_c·V_s²/4·(1 − g²A²/2) falls with gain (textbook): its peak Tj falls, the bridge's rises.
    const at = (db: number) => evaluateAtGain(TONE, COIL, d, db, s).sim.devices;
    const gains = [-Infinity, -12, -6, 0, 6];
    const pass = gains.map((g) => at(g)[1].peakJunctionC);
    const bridge = gains.map((g) => at(g)[0].peakJunctionC);
    for (let i = 1; i < gains.length; i++) {
      expect(pass[i]).toBeLessThan(pass[i - 1] + 1e-9);
      expect(bridge[i]).toBeGreaterThan(bridge[i - 1] - 1e-9);
    }
    // Idle: 36 W on 1.5 K/W → 79 °C (hand figure).
    expect(pass[0]).toBeCloseTo(79, 6);
    expect(pass[4]).toBeLessThan(pass[0] - 15);
  });

  it('finds the largest safe gain when the pass device fails at low gain and the bridge at high gain', () => {
    // Pass ΣR = 3.4 K/W: fails below 20·log10(0.6050/A) = 1.656 dB; bridge ΣR = 12.8 K/W: fails above
    // 5.129 dB (hand solutions of loss·ΣR = 100 K). Safe window ≈ 3.5 dB wide, under the bound 6.41 dB.
    const d = linearDriver(bridgeWith(11.8), mosfet('pass', { rKPerW: 0.5, tauS: 0.004, sinkToAmbientKPerW: 2.9 }));
    const s = planSettings(d);
    const passEdge = ampToDb(Math.sqrt(2 * (1 - RISE_K / (36 * 3.4))) / A);
    expect(passEdge).toBeCloseTo(1.656, 2);
    const bridgeEdge = bridgeEdgeDb(12.8, RISE_K);
    expect(bridgeEdge).toBeCloseTo(5.129, 2);
    const a = adviseGain(TONE, COIL, d, s);
    expect(a.advisedGainDb!).toBeLessThanOrEqual(bridgeEdge + 1e-6);
    expect(bridgeEdge).toBeLessThan(a.advisedGainDb! + 0.1);
    expect(a.binding).toMatchObject({ limit: 'junction-temperature', role: 'bridge' });
    // Below the window the pass device fails; inside it everything holds.
    const low = evaluateAtGain(TONE, COIL, d, passEdge - 0.2, s);
    expect(low.ok).toBe(false);
    expect(low.worst).toMatchObject({ limit: 'junction-temperature', role: 'pass' });
    expect(evaluateAtGain(TONE, COIL, d, passEdge + 0.2, s).ok).toBe(true);
  });

  it('says a driver that overheats on silence is unsafe, with no advised gain', () => {
    // Pass ΣR = 7.5 K/W: 36 W idle → 270 K rise; even at the loudest unclipped gain its loss is
    // 36·(1 − 0.478²·2.09²/2) ≈ 16.3 W → 122 K > 100 K. No gain can be safe.
    const d = linearDriver(bridgeWith(1), mosfet('pass', { rKPerW: 0.5, tauS: 0.004, sinkToAmbientKPerW: 7 }));
    const clip = planClip('tone', tone(1000, A, 1));
    const a = adviseGain(clip, COIL, d, planSettings(d));
    expect(a.advisedGainDb).toBeNull();
    expect(a.unsafeOnSilence).toBe(true);
    expect(a.binding).toMatchObject({ limit: 'junction-temperature', role: 'pass' });
    // The evaluation returned is the silent one: rail at half supply.
    expect(a.atAdvised.sim.devices[1].meanLossW).toBeCloseTo(36, 9);
  });

  it('tells apart "nothing safe, but silence is": a pulse supply that cannot give the pulse current', () => {
    // Pulse current 10 A against an 8 A supply: any pulse fails the supply limit, silence makes none.
    const d = pulseDriver(mosfet('bridge', { rKPerW: 0.5, tauS: 0.01, sinkToAmbientKPerW: 1 }), {}, { supplyCurrentLimitA: 8 });
    const a = adviseGain(planClip('p', tone(200, A, 0.5), { pulses: true }), COIL, d, planSettings(d));
    expect(a.advisedGainDb).toBeNull();
    expect(a.unsafeOnSilence).toBe(false);
    expect(a.binding).toMatchObject({ limit: 'supply-current', value: 10, allowed: 8 });
  });
});
