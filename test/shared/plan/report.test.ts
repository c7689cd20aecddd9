import { describe, expect, it } from 'vitest';
import type { WelchSpectrum } from '../../../shared/dsp/welch.ts';
import { adviseGain } from '../../../shared/plan/advise.ts';
import { planSettings } from '../../../shared/plan/evaluate.ts';
import { GAIN_CONVENTION, fullOperationLossW, planClipReport, preEmphasisAdvice } from '../../../shared/plan/report.ts';
import { dbToAmp } from '../../../shared/units.ts';
import { DEMO_DRIVER_BUCK } from '../../../shared/demo/drivers.ts';
import { COIL, COIL_WITH_CORNER, halfBridgeI2rW, linearDriver, mosfet, planClip, pulseDriver, silence, tone } from './fixtures.ts';

// Invented drivers (fixtures.ts), α = 0 so losses are plain I²R and every figure has a hand value.
const G = 3 / 48;
const A = 0.5;
const TONE = planClip('tone', tone(1000, A, 2));
// Bridge: one cell R = 1 K/W, τ = 4 ms, massless sink of 14 K/W → one RC of ΣR = 15 K/W, C₁ = 4 mJ/K.
const WEAK = linearDriver(
  mosfet('bridge', { rKPerW: 1, tauS: 0.004, sinkToAmbientKPerW: 14 }, { rdsOnOhm: 1 }),
  mosfet('pass', { rKPerW: 0.5, tauS: 0.004, sinkToAmbientKPerW: 1 }),
);

describe('fullOperationLossW', () => {
  it('is the bridge at full rail and the pass device at half rail (its worst, g·V_s²/4)', () => {
    const [bridge, pass] = fullOperationLossW(WEAK, COIL, { marginK: 25 });
    // Bridge (π/2)²·R·g²·V_s² (Erickson & Maksimović §19.1 currents); pass g·V_s²/4 = 36 W (textbook).
    // Float32 traces: 1e-6 relative.
    expect(Math.abs(bridge - halfBridgeI2rW(1, G, 48 * 48)) / bridge).toBeLessThan(1e-6);
    expect(Math.abs(pass - 36) / 36).toBeLessThan(1e-6);
  });

  it('is the loss during a pulse for the pulse scheme: (π/2)²·R·I²', () => {
    const d = pulseDriver(mosfet('bridge', { rKPerW: 0.5, tauS: 0.01, sinkToAmbientKPerW: 1 }, { rdsOnOhm: 0.2 }));
    const [bridge] = fullOperationLossW(d, COIL, { marginK: 25 });
    expect(Math.abs(bridge - 0.2 * (Math.PI / 2) ** 2 * 100) / bridge).toBeLessThan(1e-6);
  });
});

describe('planClipReport: budget against demand', () => {
  const settings = planSettings(WEAK);
  const { report } = planClipReport(TONE, COIL_WITH_CORNER, WEAK, settings);
  const b = report.budget.find((x) => x.role === 'bridge')!;

  it('budgets min(1, ΔT/(P_full·Zth(T))) with the single-RC Zth of the path', () => {
    // Single-pulse Zth method (NXP AN11261; Infineon AN2008-03); Zth(t) = R_t(1 − e^(−t/(C₁R_t))).
    const fullW = halfBridgeI2rW(1, G, 48 * 48);
    expect(b.allowedRiseK).toBe(100);
    expect(b.lengthsS[0]).toBeCloseTo(0.001, 12);
    expect(b.lengthsS[b.lengthsS.length - 1]).toBeCloseTo(2, 12);
    b.lengthsS.forEach((t, j) => {
      const zth = 15 * (1 - Math.exp(-t / (0.004 * 15)));
      expect(b.budget[j]).toBeCloseTo(Math.min(1, 100 / (fullW * zth)), 5);
    });
  });

  it('gives a steady tone the demand E[v²]/V_s² = (1 + g²A²/2)/4 at every length', () => {
    const g = dbToAmp(report.evaluatedGainDb);
    for (const m of b.demand) expect(m).toBeCloseTo((1 + (g * g * A * A) / 2) / 4, 6);
  });

  it('agrees with the advice: no crossing at the advised gain, a crossing at long bursts 0.2 dB above', () => {
    // Constant loss ∝ E[v²] (α = 0): budget(T) ≥ demand at every T exactly when the steady rise fits,
    // which is the junction limit the advice binds on.
    expect(report.binding).toMatchObject({ limit: 'junction-temperature', role: 'bridge' });
    expect(b.crossing).toBeNull();
    const over = planClipReport(TONE, COIL_WITH_CORNER, WEAK, settings, { gainDb: report.advisedGainDb! + 0.2 }).report;
    const c = over.budget.find((x) => x.role === 'bridge')!.crossing!;
    expect(c).not.toBeNull();
    // Short bursts fit (Zth(T) small); the first crossing is a long one (the RC has τ' = 60 ms).
    expect(c.lengthS).toBeGreaterThan(0.06);
    expect(c.demand).toBeGreaterThan(c.budget);
  });

  it("measures a linear pass device's demand against its own worst loss: 4(E[v]/V_s − E[v²]/V_s²)", () => {
    // Its budget is a fraction of g·V_s²/4 (half rail), so its demand must be its loss g(V_s·E[v] − E[v²])
    // over that same figure (textbook linear-regulator dissipation): 1 − g²A²/2 for a steady tone, 1 on
    // silence. Before the fix the pass curve reused the bridge's E[v²]/V_s² (¼ on silence) and showed no
    // crossing for a pass device that overheats at idle.
    const pass = report.budget.find((x) => x.role === 'pass')!;
    const g = dbToAmp(report.evaluatedGainDb);
    for (const m of pass.demand) expect(m).toBeCloseTo(1 - (g * g * A * A) / 2, 6);
    const hot = linearDriver(WEAK.devices[0], mosfet('pass', { rKPerW: 0.5, tauS: 0.004, sinkToAmbientKPerW: 7 }));
    const r = planClipReport(planClip('q', silence(1)), COIL_WITH_CORNER, hot, planSettings(hot)).report;
    const p = r.budget.find((x) => x.role === 'pass')!;
    expect(r.unsafeOnSilence).toBe(true);
    for (const m of p.demand) expect(m).toBeCloseTo(1, 9);
    // Steady budget 100 K/(36 W·7.5 K/W) = 0.37 < 1: the long bursts cross.
    expect(p.crossing).not.toBeNull();
    expect(p.budget[p.budget.length - 1]).toBeCloseTo(100 / (36 * 7.5), 3);
  });

  it("takes the buck modulator's demand from its own loss model: E[v³], E[v] and constant parts", () => {
    // Demo buck (shared/demo/drivers.ts): V_s = 160 V, g = 4/160 A/V, modulator R = 0.1 Ω, α = 0.008/K,
    // t_r + t_f = 40 ns, C_oss = 200 pF, f_pwm = 150 kHz; limit 150 − 25 = 125 °C → R factor 1.8.
    // Hand values from the buck switch's loss terms (Erickson & Maksimović ch. 2; Mohan et al. eq. 2-6
    // [recalled]): conduction 1.8·R·g²·v³/V_s, switching ½·V_s·g·v·(t_r+t_f)·f, C_oss ½·C·V_s²·f, the last
    // two times (V_s − v)/w within w = V_s·(t_r+t_f)·f = 0.96 V of the supply (no switching at 100 %).
    const d = DEMO_DRIVER_BUCK;
    const g = 4 / 160;
    const loss = (v: number) => {
      const h = Math.min(1, (160 - v) / 0.96);
      return (1.8 * 0.1 * g * g * v ** 3) / 160 + (0.5 * 160 * g * v * 40e-9 * 150e3 + 0.5 * 200e-12 * 160 * 160 * 150e3) * h;
    };
    // Silence puts the rail at V_s/2: 0.36 + 0.96 + 0.384 = 1.704 W. The worst constant point is where
    // the taper starts (the loss rises below it and falls along it): 159.04 V.
    expect(loss(80)).toBeCloseTo(1.704, 12);
    const full = fullOperationLossW(d, COIL, { marginK: 25 });
    expect(Math.abs(full[1] - loss(159.04)) / full[1]).toBeLessThan(1e-12);
    expect(loss(159.04)).toBeGreaterThan(Math.max(loss(158), loss(159.5), loss(160)));
    const r = planClipReport(planClip('q', silence(1)), COIL_WITH_CORNER, d, planSettings(d)).report;
    const mod = r.budget.find((x) => x.role === 'modulator')!;
    expect(mod.fullLossW).toBeCloseTo(full[1], 12);
    // 1.704/5.121 ≈ 0.333, not the E[v²]/V_s² = 0.25 a bridge would show.
    for (const m of mod.demand) expect(Math.abs(m - 1.704 / loss(159.04))).toBeLessThan(1e-9);
    expect(mod.demand[0]).toBeGreaterThan(0.33);
    // The MOSFET bridge's demand stays E[v²]/V_s² = ¼ on silence (its loss is R·k²·g²·E[v²] + switching ∝ E[v²]).
    for (const m of r.budget.find((x) => x.role === 'bridge')!.demand) expect(m).toBeCloseTo(0.25, 9);
  });

  it('uses the on-time fraction as the demand of the pulse scheme', () => {
    const d = pulseDriver(mosfet('bridge', { rKPerW: 0.5, tauS: 0.01, sinkToAmbientKPerW: 1 }), { maxDuty: 0.5 });
    const clip = planClip('p', tone(200, A, 1), { pulses: true });
    const r = planClipReport(clip, COIL_WITH_CORNER, d, planSettings(d), { gainDb: -6 }).report;
    const demand = r.budget[0].demand;
    // Whole-clip window: Σ on-time / duration (the pulses are spread over the frames they cover).
    expect(demand[demand.length - 1]).toBeCloseTo(r.pulses!.totalOnS / 1, 9);
    // 150 µs·g·A per 5 ms period → 0.75 % at −6 dB (on-time law, docs/models.md); 1 % relative tolerance
    // for the cycle before the first upward crossing and the one cut at the end (1 of 200 each).
    const want = (150e-6 * dbToAmp(-6) * A) / 0.005;
    expect(Math.abs(demand[demand.length - 1] - want) / want).toBeLessThan(0.01);
  });
});

describe('planClipReport: figures and warnings', () => {
  it('reports the advice, the evaluation at the advised gain and JSON-safe figures', () => {
    const settings = planSettings(WEAK);
    const { report, advice, evaluation } = planClipReport(TONE, COIL_WITH_CORNER, WEAK, settings);
    expect(report.advisedGainDb).toBe(adviseGain(TONE, COIL, WEAK, settings).advisedGainDb);
    expect(report.advisedGainDb).toBe(advice.advisedGainDb);
    expect(report.evaluatedGainDb).toBe(report.advisedGainDb);
    expect(evaluation.gainDb).toBe(report.advisedGainDb);
    expect(report.limiterCeilingDbfs).toBeCloseTo(-report.evaluatedGainDb, 12);
    expect(report.gainConvention).toBe(GAIN_CONVENTION);
    expect(report.scheme).toBe('rail-linear');
    expect(report.devices.map((d) => [d.role, d.count, d.tjMaxC, d.limitC])).toEqual([
      ['bridge', 2, 150, 125],
      ['pass', 1, 150, 125],
    ]);
    expect(report.devices[0].peakJunctionC).toBeLessThanOrEqual(125);
    expect(report.supply.limitA).toBe(100);
    // Rail-linear supply current g·E[v] = 1.5 A with a zero-mean tone.
    expect(report.supply.meanCurrentA).toBeCloseTo(1.5, 6);
    expect(report.searchEvaluations).toBe(advice.evaluations);
    // Junction temperature of both devices, over-modulation, supply current, and the bridge's switching speed.
    expect(report.limits).toHaveLength(5);
    expect(report.devices.map((d) => d.transitionShare === null)).toEqual([false, true]);
    expect(report.warnings).toEqual([]);
    const back = JSON.parse(JSON.stringify(report));
    expect(back.binding.limit).toBe('junction-temperature');
    expect(back.devices[1].meanLossW).toBeCloseTo(report.devices[1].meanLossW, 12);
  });

  it('evaluates at a given gain with traces, keeping the advice', () => {
    const { report, evaluation } = planClipReport(TONE, COIL_WITH_CORNER, WEAK, planSettings(WEAK), { gainDb: 4, traces: true });
    expect(report.evaluatedGainDb).toBe(4);
    expect(report.advisedGainDb).toBeCloseTo(2, 9);
    expect(report.limits.find((l) => l.role === 'bridge')!.ok).toBe(false);
    expect(evaluation.sim.devices[0].traces!.junctionC).toHaveLength(TONE.frames.count);
  });

  it('warns in plain words when no gain is safe, telling silence apart', () => {
    const hot = linearDriver(WEAK.devices[0], mosfet('pass', { rKPerW: 0.5, tauS: 0.004, sinkToAmbientKPerW: 7 }));
    const r = planClipReport(planClip('t', tone(1000, A, 0.5)), COIL_WITH_CORNER, hot, planSettings(hot)).report;
    expect(r.advisedGainDb).toBeNull();
    expect(r.unsafeOnSilence).toBe(true);
    expect(r.warnings[0]).toMatch(/^No gain is safe: a device exceeds its limit even on silence/);
    expect(r.evaluatedGainDb).toBe(-Infinity);
    expect(r.limiterCeilingDbfs).toBe(0);

    const weakSupply = pulseDriver(mosfet('bridge', { rKPerW: 0.5, tauS: 0.01, sinkToAmbientKPerW: 1 }), {}, { supplyCurrentLimitA: 8 });
    const p = planClipReport(planClip('p', tone(200, A, 0.5), { pulses: true }), COIL_WITH_CORNER, weakSupply, planSettings(weakSupply)).report;
    expect(p.advisedGainDb).toBeNull();
    expect(p.unsafeOnSilence).toBe(false);
    expect(p.warnings[0]).toMatch(/^No gain down to -60 dB keeps every limit/);
  });

  it('has no pulse figures and no pre-emphasis without a spectrum, for a rail scheme', () => {
    const r = planClipReport(planClip('q', silence(0.2)), COIL_WITH_CORNER, WEAK, planSettings(WEAK)).report;
    expect(r.pulses).toBeNull();
    expect(r.preEmphasis).toBeNull();
    expect(r.modulationCornerHz).toBe(5000);
  });
});

describe('preEmphasisAdvice', () => {
  /** A one-sided spectrum with power `p[i]` at `f[i]` and a DC bin (ignored by the advice). */
  const spectrum = (f: number[], p: number[]): WelchSpectrum => ({
    frequencyHz: Float64Array.from([0, ...f]),
    psd: Float64Array.from([1e3, ...p]),
    binHz: 1,
    segments: 1,
    size: 2 * f.length,
  });

  it('weights the first-order envelope response by power: 10·log10(ΣP / ΣP·|H|²)', () => {
    // |H(f)|² = 1/(1 + (f/fc)²) (a resonator driven at resonance; corner f0/(2Q)). Equal power at fc/2
    // and 2fc passes 0.8 + 0.2 = 1 of 2 → 3.0103 dB lost (hand value); half the power is above fc.
    const a = preEmphasisAdvice(spectrum([500, 2000], [1, 1]), 1000)!;
    expect(a.envelopeLossDb).toBeCloseTo(10 * Math.log10(2), 12);
    expect(a.energyAboveCornerFraction).toBeCloseTo(0.5, 12);
    expect(a.advised).toBe(true);
    expect(a.shelfGainDb).toBe(3);
    expect(a.cornerHz).toBe(1000);
  });

  it('advises nothing below a 1 dB loss, caps the shelf at 12 dB and needs a corner and some power', () => {
    const low = preEmphasisAdvice(spectrum([100], [1]), 1000)!;
    expect(low.envelopeLossDb).toBeCloseTo(10 * Math.log10(1.01), 12);
    expect(low.advised).toBe(false);
    // 10 fc: 10·log10(101) = 20.04 dB → shelf capped at 12 dB.
    expect(preEmphasisAdvice(spectrum([10000], [1]), 1000)!.shelfGainDb).toBe(12);
    expect(preEmphasisAdvice(spectrum([100], [1]), 0)).toBeNull();
    expect(preEmphasisAdvice(spectrum([100], [0]), 1000)).toBeNull();
    expect(preEmphasisAdvice(spectrum([100], [1]), { lowHz: 2000, highHz: 1000 })).toBeNull();
  });

  it('over a corner range advises only the boost that holds across it: the loss at the high corner', () => {
    // Equal power at 500 Hz and 2 kHz. At fc = 1 kHz the loss is 10·log10(2) = 3.01 dB (above); at
    // fc = 2 kHz, |H|² = 1/(1 + 1/16) = 16/17 and ½: ΣP·|H|² = 1.441 of 2 → 10·log10(2/(16/17 + ½)) = 1.423 dB
    // (hand values).
    const a = preEmphasisAdvice(spectrum([500, 2000], [1, 1]), { lowHz: 1000, highHz: 2000 })!;
    expect(a.envelopeLossRangeDb.atLowCornerDb).toBeCloseTo(10 * Math.log10(2), 12);
    expect(a.envelopeLossRangeDb.atHighCornerDb).toBeCloseTo(10 * Math.log10(2 / (16 / 17 + 0.5)), 12);
    expect(a.envelopeLossDb).toBeCloseTo(10 * Math.log10(2 / (16 / 17 + 0.5)), 12);
    expect(a.advised).toBe(true);
    expect(a.cornerHz).toBe(2000);
    expect(a.cornerRangeHz).toEqual({ lowHz: 1000, highHz: 2000 });
    expect(a.shelfGainDb).toBe(1.4);
    expect(a.basis).toMatch(/holds across the range/);
    expect(a.basis).toMatch(/measured Q would sharpen/);
    // Wider: at fc = 4 kHz the loss is 10·log10(2/(1/1.015625 + 0.8)) = 0.49 dB < 1 dB → nothing advised,
    // though the low end alone would have asked for +3 dB.
    const b = preEmphasisAdvice(spectrum([500, 2000], [1, 1]), { lowHz: 1000, highHz: 4000 })!;
    expect(b.envelopeLossDb).toBeCloseTo(10 * Math.log10(2 / (1 / 1.015625 + 0.8)), 12);
    expect(b.advised).toBe(false);
    // A range of one (measured Q) is the single-corner advice.
    const c = preEmphasisAdvice(spectrum([500, 2000], [1, 1]), { lowHz: 1000, highHz: 1000 })!;
    expect(c.envelopeLossDb).toBeCloseTo(10 * Math.log10(2), 12);
    expect(c.basis).toMatch(/measured Q/);
  });

  it("takes the plan's advice from the coil's corner range when the coil gives one", () => {
    const clip = planClip('t', tone(1000, A, 0.5));
    const spec = spectrum([500, 2000], [1, 1]);
    const coil = { ...COIL_WITH_CORNER, modulationCornerHz: 1000, modulationCornerRangeHz: { lowHz: 1000, highHz: 2000 } };
    const r = planClipReport(clip, coil, WEAK, planSettings(WEAK), { spectrum: spec }).report;
    expect(r.modulationCornerRangeHz).toEqual({ lowHz: 1000, highHz: 2000 });
    expect(r.preEmphasis!.cornerHz).toBe(2000);
    const single = planClipReport(clip, { ...COIL_WITH_CORNER, modulationCornerHz: 1000 }, WEAK, planSettings(WEAK), { spectrum: spec }).report;
    expect(single.modulationCornerRangeHz).toEqual({ lowHz: 1000, highHz: 1000 });
    expect(single.preEmphasis!.cornerHz).toBe(1000);
  });
});
