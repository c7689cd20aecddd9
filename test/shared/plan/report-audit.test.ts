import { describe, expect, it } from 'vitest';
import type { WelchSpectrum } from '../../../shared/dsp/welch.ts';
import { DEMO_DRIVER_BUCK, DEMO_DRIVER_LINEAR, DEMO_DRIVER_PULSE } from '../../../shared/demo/drivers.ts';
import { planSettings } from '../../../shared/plan/evaluate.ts';
import { pulsesAtGain } from '../../../shared/plan/pulse-train.ts';
import { fullOperationLossW, planClipReport, preEmphasisAdvice } from '../../../shared/plan/report.ts';
import { COIL, COIL_WITH_CORNER, linearDriver, mosfet, planClip, pulseDriver, tone } from './fixtures.ts';

// Edges of the full-operation losses and the pre-emphasis advice, against hand values.

describe('fullOperationLossW: each device at its own worst point, R_ds(on) at the limit temperature', () => {
  it('demo linear: bridge at full rail, pass device at half rail (g·V_s²/4 = 36 W, no R_ds(on) part)', () => {
    // Bridge (half-bridge MOSFET, R 0.08 Ω, α 0.007, limit 150 − 25 = 125 °C → ×1.7): (π/2)²·R·1.7·I² with
    // I = 3 A, plus switching ½·k_pk·V·I·(t_r + t_f)·f0 and C_oss ½·C·V²·f0 at f0 = 300 kHz.
    const [bridge, pass] = fullOperationLossW(DEMO_DRIVER_LINEAR, COIL, { marginK: 25 });
    const cond = (Math.PI / 2) ** 2 * 0.08 * 1.7 * 9;
    expect(bridge).toBeGreaterThan(cond);
    expect(Math.abs(pass - 36)).toBeLessThan(1e-9);
    // A bigger margin cools the limit temperature: less bridge loss, the pass device unchanged.
    const [b50, p50] = fullOperationLossW(DEMO_DRIVER_LINEAR, COIL, { marginK: 50 });
    expect(Math.abs(bridge - b50 - (Math.PI / 2) ** 2 * 0.08 * 0.007 * 25 * 9)).toBeLessThan(1e-9);
    expect(p50).toBe(pass);
  });

  it('demo pulse: the bridge during a pulse; a device the scheme does not use counts 0', () => {
    const [bridge] = fullOperationLossW(DEMO_DRIVER_PULSE, COIL, { marginK: 25 });
    expect(bridge).toBeGreaterThan(0);
    const extra = { ...DEMO_DRIVER_PULSE, devices: [...DEMO_DRIVER_PULSE.devices, { ...DEMO_DRIVER_BUCK.devices[1] }] };
    const both = fullOperationLossW(extra, COIL, { marginK: 25 });
    expect(both[0]).toBe(bridge);
    expect(both[1]).toBe(0);
  });

  it('pulse scheme by hand: conduction at the limit temperature plus hard switching and C_oss at f0', () => {
    // Half-bridge MOSFET (fixtures: 300 V, 10 A during a pulse): R 0.2 Ω, α 0.01/K, limit 150 − 25 →
    // ×2; k_rms = π/2, k_pk = π (Erickson & Maksimović §19.1); t_r + t_f = 50 ns, C_oss 100 pF, f0 300 kHz.
    // Conduction 0.2·2·(π/2)²·100; switching ½·π·300·10·50e-9·3e5; C_oss ½·1e-10·300²·3e5 (Mohan et al.).
    const d = pulseDriver(mosfet('bridge', { rKPerW: 0.5, tauS: 0.01, sinkToAmbientKPerW: 1 }, { rdsOnOhm: 0.2, rdsOnTempCoeffPerK: 0.01, riseTimeS: 30e-9, fallTimeS: 20e-9, outputCapacitanceF: 100e-12 }));
    const hand = 0.2 * 2 * (Math.PI / 2) ** 2 * 100 + 0.5 * Math.PI * 300 * 10 * 50e-9 * 3e5 + 0.5 * 1e-10 * 300 * 300 * 3e5;
    expect(Math.abs(fullOperationLossW(d, COIL, { marginK: 25 })[0] - hand)).toBeLessThan(1e-9 * hand);
  });

  it('a rail device the scheme does not use counts 0 too', () => {
    const extra = { ...DEMO_DRIVER_LINEAR, devices: [...DEMO_DRIVER_LINEAR.devices, { ...DEMO_DRIVER_BUCK.devices[1] }] };
    expect(fullOperationLossW(extra, COIL, { marginK: 25 })[2]).toBe(0);
  });

  it('demo buck: the modulator is worst where its switching starts to stop, not at 100 % duty', () => {
    // At 100 % duty: conduction only, 1.8·R·g²·V_s² = 1.8·0.1·16 = 2.88 W; the worst is 5.121 W at 159.04 V.
    const [, mod] = fullOperationLossW(DEMO_DRIVER_BUCK, COIL, { marginK: 25 });
    expect(mod).toBeGreaterThan(2.88 + 2);
    expect(Math.abs(mod - 5.1213)).toBeLessThan(1e-3);
  });
});

describe('preEmphasisAdvice: corners and counting', () => {
  const spectrum = (f: number[], p: number[]): WelchSpectrum => ({
    frequencyHz: Float64Array.from([0, ...f]),
    psd: Float64Array.from([1e3, ...p]),
    binHz: 1,
    segments: 1,
    size: 2 * f.length,
  });

  it('counts power strictly above the corner, at the high end of the range', () => {
    // Power 1 at 1 kHz (on the corner: not above it) and 3 at 4 kHz: above-fraction 3/4 at fc = 1 kHz.
    const a = preEmphasisAdvice(spectrum([1000, 4000], [1, 3]), 1000)!;
    expect(a.energyAboveCornerFraction).toBeCloseTo(0.75, 12);
    // Range 1…4 kHz: counted at 4 kHz, where nothing lies strictly above.
    const b = preEmphasisAdvice(spectrum([1000, 4000], [1, 3]), { lowHz: 1000, highHz: 4000 })!;
    expect(b.energyAboveCornerFraction).toBe(0);
    // Loss at 4 kHz: |H|² = 16/17 and ½ → 10·log10(4/(16/17 + 1.5)) = 2.14 dB; at 1 kHz: ½ and 1/17 → 10·log10(4/(0.5 + 3/17)).
    expect(b.envelopeLossDb).toBeCloseTo(10 * Math.log10(4 / (16 / 17 + 1.5)), 12);
    expect(b.envelopeLossRangeDb.atLowCornerDb).toBeCloseTo(10 * Math.log10(4 / (0.5 + 3 / 17)), 12);
    expect(b.shelfGainDb).toBe(2.1);
    expect(b.basis).toMatch(/between 1000 and 4000 Hz/);
    expect(b.basis).toMatch(/is restored/);
  });

  it('words a single corner (measured Q) as one', () => {
    const a = preEmphasisAdvice(spectrum([500, 2000], [1, 1]), { lowHz: 1000, highHz: 1000 })!;
    expect(a.basis).toMatch(/^one corner \(measured Q\): the coil's envelope response costs this clip 3\.0 dB$/);
  });

  it('says "considered", not "restored", when nothing is advised; refuses a bad corner', () => {
    const c = preEmphasisAdvice(spectrum([100, 200], [1, 1]), { lowHz: 500, highHz: 5000 })!;
    expect(c.advised).toBe(false);
    expect(c.basis).toMatch(/is considered/);
    expect(preEmphasisAdvice(spectrum([100], [1]), { lowHz: 0, highHz: 100 })).toBeNull();
    expect(preEmphasisAdvice(spectrum([100], [1]), { lowHz: -1, highHz: 100 })).toBeNull();
    expect(preEmphasisAdvice(spectrum([100], [1]), Number.NaN)).toBeNull();
    // Equal ends are fine (a measured Q).
    expect(preEmphasisAdvice(spectrum([100], [1]), { lowHz: 100, highHz: 100 })!.cornerHz).toBe(100);
  });
});

describe('demand series edges', () => {
  it('a device with no loss at all has no demand (not 0/0)', () => {
    // Bridge with R_ds(on) 0 and ideal switching (below the schema's range, set after validation):
    // full-operation loss 0, demand 0 at every length.
    const valid = linearDriver(mosfet('bridge', { rKPerW: 1, tauS: 0.004, sinkToAmbientKPerW: 14 }), mosfet('pass', { rKPerW: 0.5, tauS: 0.004, sinkToAmbientKPerW: 1 }));
    const d = { ...valid, devices: [{ ...valid.devices[0], rdsOnOhm: 0 }, valid.devices[1]] };
    const r = planClipReport(planClip('t', tone(1000, 0.5, 0.5)), COIL_WITH_CORNER, d, planSettings(d), { gainDb: 0 }).report;
    const b = r.budget.find((x) => x.role === 'bridge')!;
    expect(b.fullLossW).toBe(0);
    for (const m of b.demand) expect(m).toBe(0);
    expect(b.crossing).toBeNull();
  });

  it('a rail driver uses its rail loss model even when the profile and the clip also carry pulse data', () => {
    // The schema lets a rail profile keep `pulse` limits; the demand must still be E[v²]/V_s² for its
    // MOSFET bridge (α = 0: (1 + g²A²/2)/4 for a steady tone at gain g, hand value), not a pulse duty.
    const base = linearDriver(mosfet('bridge', { rKPerW: 1, tauS: 0.004, sinkToAmbientKPerW: 14 }), mosfet('pass', { rKPerW: 0.5, tauS: 0.004, sinkToAmbientKPerW: 1 }));
    const d = { ...base, pulse: { maxOnTimeS: 150e-6, minOffTimeS: 5e-4, maxDuty: 0.1 } };
    const clip = planClip('t', tone(1000, 0.5, 1), { pulses: true });
    const r = planClipReport(clip, COIL_WITH_CORNER, d, planSettings(d), { gainDb: 0 }).report;
    for (const m of r.budget.find((x) => x.role === 'bridge')!.demand) expect(Math.abs(m - (1 + 0.25 / 2) / 4)).toBeLessThan(2e-3);
  });

  it('spreads a pulse that crosses a frame boundary over both frames', () => {
    // Pulses start at the tone's upward zero crossings; with this phase they fall near the end of a
    // 1 ms frame and run into the next. Per-frame on-time fractions worked out here from the train:
    // the demand's one-frame window is their maximum, the whole-clip window their mean.
    const d = pulseDriver(mosfet('bridge', { rKPerW: 0.5, tauS: 0.01, sinkToAmbientKPerW: 1 }), { maxDuty: 0.5 });
    const clip = planClip('p', tone(200, 1, 1, 8000, -1.15), { pulses: true });
    const train = pulsesAtGain(clip.pulseEvents!, 1, d.pulse!);
    const f = 0.001;
    const frames = new Float64Array(clip.frames.count);
    let crossing = 0;
    for (let i = 0; i < train.count; i++) {
      const a = train.startS[i];
      const b = a + train.onS[i];
      if (Math.floor(a / f) !== Math.floor(b / f)) crossing++;
      for (let k = 0; k < frames.length; k++) frames[k] += Math.max(0, Math.min(b, (k + 1) * f) - Math.max(a, k * f)) / f;
    }
    expect(crossing).toBeGreaterThan(10);
    const r = planClipReport(clip, COIL_WITH_CORNER, d, planSettings(d), { gainDb: 0 }).report;
    const demand = r.budget[0].demand;
    expect(r.budget[0].lengthsS[0]).toBeCloseTo(0.001, 12);
    expect(Math.abs(demand[0] - Math.max(...frames))).toBeLessThan(1e-9);
    expect(Math.abs(demand[demand.length - 1] - frames.reduce((x, y) => x + y, 0) / frames.length)).toBeLessThan(1e-9);
  });
});
