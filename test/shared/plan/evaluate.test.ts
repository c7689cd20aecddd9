import { describe, expect, it } from 'vitest';
import { computeFrameStats } from '../../../shared/dsp/frame-stats.ts';
import { ThermalNetwork } from '../../../shared/physics/thermal/network.ts';
import { type PlanClip, createScratch, evaluateAtGain, planSettings, railAtGain } from '../../../shared/plan/evaluate.ts';
import { dbToAmp } from '../../../shared/units.ts';
import { COIL, concat, halfBridgeI2rW, linearDriver, mosfet, planClip, pulseDriver, silence, tone } from './fixtures.ts';

// Invented rail-linear driver (fixtures.ts): 48 V, 3 A at full rail → g = 1/16 A/V. Bridge: 1 Ω
// half-bridge switch, no switching loss, α = 0 (no electrothermal feedback); one Foster cell plus
// case–sink and sink–ambient resistances. Pass device: one cell plus a sink with heat capacity.
const G = 3 / 48;
const VS = 48;
const STEADY = linearDriver(
  mosfet('bridge', { rKPerW: 1, tauS: 0.004, caseToSinkKPerW: 0.5, sinkToAmbientKPerW: 2.5 }, { rdsOnOhm: 1 }),
  mosfet('pass', { rKPerW: 0.5, tauS: 0.004, caseToSinkKPerW: 0.2, sinkToAmbientKPerW: 0.8, sinkHeatCapacityJPerK: 1 }),
);

describe('evaluateAtGain: steady tone → steady loss → Tj = Tamb + P·ΣR', () => {
  // 1 kHz at 8 kHz: every 1 ms frame holds whole periods, so each frame has mean 0 and mean
  // square A²/2 exactly (Σ sin² over 8 equally spaced phases = 4): the rail moments, hence the
  // losses, are the same in every frame. 40 s on 50 ms frames: the slowest mode here (the pass
  // device's sink, τ ≈ 0.8 s) has settled to e^(−50).
  const A = 0.5;
  const clip = planClip('steady', tone(1000, A, 40), { frameS: 0.05 });
  const e = evaluateAtGain(clip, COIL, STEADY, 0, planSettings(STEADY), { traces: true });

  it('reports the textbook losses: pass g·V_s²/4·(1 − g²A²/2), bridge (π/2)²·R·g²·E[v²]', () => {
    // Rail v = (V_s/2)(1 + x): E[v] = 24 V, E[v²] = 576·(1 + A²/2) = 648 V². Pass device (V_s − v)·g·v
    // averaged = g(V_s·E[v] − E[v²]) = 31.5 W (linear regulator dissipation, textbook). Bridge per switch:
    // I_rms = (π/2)·I_s (Erickson & Maksimović §19.1) → 6.2456 W at R = 1 Ω.
    const ev2 = (VS * VS) / 4 * (1 + (A * A) / 2);
    const [bridge, pass] = e.sim.devices;
    // Tolerance 1e-6 relative: the float32 samples make each frame's mean square differ from A²/2 by ~1e-8.
    expect(Math.abs(pass.meanLossW - ((G * VS * VS) / 4) * (1 - (A * A) / 2)) / 31.5).toBeLessThan(1e-6);
    expect(Math.abs(bridge.meanLossW - halfBridgeI2rW(1, G, ev2)) / bridge.meanLossW).toBeLessThan(1e-6);
    // Steady: every frame's loss is the same (float32 traces, so 1e-6 relative).
    for (const d of e.sim.devices) {
      const lo = Math.min(...d.traces!.lossW);
      const hi = Math.max(...d.traces!.lossW);
      expect((hi - lo) / hi).toBeLessThan(1e-6);
    }
  });

  it('settles at Tamb + P·(R_jc + R_cs + R_sa) for each device (steady state of the series path, NXP AN11261)', () => {
    STEADY.devices.forEach((dev, i) => {
      const d = e.sim.devices[i];
      const th = dev.thermal;
      const sumR = th.foster.reduce((s, c) => s + c.rKPerW, 0) + th.caseToSinkKPerW + th.sinkToAmbientKPerW;
      // The network's ΣR is the same sum (Foster → Cauer keeps ΣR exactly).
      expect(ThermalNetwork.fromPath(th).totalRKPerW).toBeCloseTo(sumR, 12);
      // Loss constant and the rise from cold monotone: the peak is the steady value, to e^(−50)·rise.
      expect(Math.abs(d.peakJunctionC - (25 + d.meanLossW * sumR))).toBeLessThan(1e-6);
    });
    // 25 + 6.2456·4 = 49.98 °C; 25 + 31.5·1.5 = 72.25 °C (hand figures).
    expect(e.sim.devices[0].peakJunctionC).toBeCloseTo(49.98, 2);
    expect(e.sim.devices[1].peakJunctionC).toBeCloseTo(72.25, 4);
    // Every limit holds, and each junction check reads the device's peak and Tj max − 25 K.
    expect(e.ok).toBe(true);
    const tj = e.limits.filter((l) => l.limit === 'junction-temperature');
    expect(tj.map((l) => l.role)).toEqual(['bridge', 'pass']);
    expect(tj[0].allowed).toBe(125);
    expect(tj[1].headroom).toBeCloseTo(125 - e.sim.devices[1].peakJunctionC, 12);
  });

  it('shifts every junction by the ambient the settings give', () => {
    const hot = evaluateAtGain(clip, COIL, STEADY, 0, planSettings(STEADY, { ambientC: 40 }));
    // Linear network, α = 0: temperatures move with ambient one for one.
    hot.sim.devices.forEach((d, i) => expect(d.peakJunctionC - e.sim.devices[i].peakJunctionC).toBeCloseTo(15, 6));
  });
});

describe('evaluateAtGain: a tone burst against Zth(t)', () => {
  // Burst of T = 20 ms of 1 kHz at A = 0.5, then silence, on 1 ms frames; α = 0 so the loss is
  // constant over the burst. From cold, the junction rise at the end of the burst is P·Zth(T)
  // (single-pulse transient thermal impedance: NXP AN11261; Infineon AN2008-03).
  const T = 0.02;
  const clip = planClip('burst', concat(tone(1000, 0.5, T), silence(0.08)));
  const P = halfBridgeI2rW(1, G, 648);

  it('rises by P·R(1 − e^(−T/τ)) with the sink at ambient (one Foster cell, AN11261)', () => {
    const d = linearDriver(mosfet('bridge', { rKPerW: 2, tauS: 0.01 }, { rdsOnOhm: 1 }), mosfet('pass', { rKPerW: 0.5, tauS: 0.01 }));
    const e = evaluateAtGain(clip, COIL, d, 0, planSettings(d), { traces: true });
    const tr = e.sim.devices[0].traces!;
    // Frame 19 ends at T; junction traces are end-of-frame values (float32: 1e-4 K on ~35 °C).
    expect(tr.lossW[0]).toBeCloseTo(P, 4);
    expect(tr.lossW[19]).toBeCloseTo(P, 4);
    const zth = 2 * (1 - Math.exp(-T / 0.01)); // 1.7293 K/W
    expect(Math.abs(tr.junctionC[19] - (25 + P * zth))).toBeLessThan(1e-4);
    // After the burst the rail idles at V_s/2: the bridge still carries (π/2)²·R·g²·576 W.
    expect(tr.lossW[20]).toBeCloseTo(halfBridgeI2rW(1, G, 576), 4);
  });

  it('with case–sink and sink–ambient resistances and no sink mass: one RC of R_total and τ = C₁·R_total', () => {
    // One Foster cell is one Cauer cell, C₁ = τ/R₁ (AN11261); with a massless sink the path is a single
    // RC: Zth(t) = R_t(1 − e^(−t/(C₁R_t))) (textbook first-order step response).
    const th = { rKPerW: 1, tauS: 0.005, caseToSinkKPerW: 0.5, sinkToAmbientKPerW: 1.5 };
    const d = linearDriver(mosfet('bridge', th, { rdsOnOhm: 1 }), mosfet('pass', { rKPerW: 0.5, tauS: 0.01 }));
    const e = evaluateAtGain(clip, COIL, d, 0, planSettings(d), { traces: true });
    const rT = 3;
    const zth = rT * (1 - Math.exp(-T / ((th.tauS / th.rKPerW) * rT)));
    expect(ThermalNetwork.fromPath(d.devices[0].thermal).zthKPerW(T)).toBeCloseTo(zth, 10);
    expect(Math.abs(e.sim.devices[0].traces!.junctionC[19] - (25 + P * zth))).toBeLessThan(1e-4);
  });
});

describe('evaluateAtGain: silence', () => {
  it('leaves a pulse scheme at ambient: no pulses, no loss', () => {
    const d = pulseDriver(mosfet('bridge', { rKPerW: 0.5, tauS: 0.01, sinkToAmbientKPerW: 1 }));
    const e = evaluateAtGain(planClip('quiet', silence(1), { pulses: true }), COIL, d, 0, planSettings(d, { ambientC: 40 }));
    expect(e.pulses!.count).toBe(0);
    expect(e.sim.devices[0].meanLossW).toBe(0);
    expect(e.sim.devices[0].peakJunctionC).toBe(40);
    expect(e.sim.supply.peakCurrentA).toBe(0);
    expect(e.ok).toBe(true);
  });

  it('leaves a linear rail at its idle dissipation: pass g·V_s²/4, bridge at E[v²] = V_s²/4', () => {
    // Rail idling at V_s/2 (gain convention, docs/models.md): pass (V_s/2)·g·(V_s/2) = 36 W (textbook).
    const clip = planClip('quiet', silence(2), { frameS: 0.01 });
    const e = evaluateAtGain(clip, COIL, STEADY, 6, planSettings(STEADY));
    const [bridge, pass] = e.sim.devices;
    expect(pass.meanLossW).toBeCloseTo((G * VS * VS) / 4, 9);
    expect(bridge.meanLossW).toBeCloseTo(halfBridgeI2rW(1, G, 576), 9);
    // Supply current g·E[v] = 1.5 A every frame.
    expect(e.sim.supply.peakCurrentA).toBeCloseTo(1.5, 12);
    expect(e.overModulationFraction).toBe(0);
  });
});

describe('railAtGain', () => {
  it('gives E[v] = (V/2)(1 + g·mean) and E[v²] = (V²/4)(1 + 2g·mean + g²·meanSquare) inside the range', () => {
    // A DC offset plus a sine, so the mean term is exercised (linearity of expectation).
    const x = Float32Array.from(tone(1000, 0.3, 0.01), (v) => v + 0.1);
    const f = computeFrameStats(x, 8000);
    const r = railAtGain(f, 2, VS, createScratch({ frames: f } as PlanClip));
    for (let k = 0; k < f.count; k++) {
      expect(r.meanV[k]).toBeCloseTo(24 * (1 + 2 * f.mean[k]), 9);
      expect(r.meanSquareV2[k]).toBeCloseTo(576 * (1 + 4 * f.mean[k] + 4 * f.meanSquare[k]), 9);
    }
    // 2·(0.1 + 0.3) = 0.8 < 1: never over-modulated.
    expect(r.firstOverModS).toBeNull();
  });

  it('clamps an over-modulated frame to the feasible set of a rail in 0…V and says when it began', () => {
    // 0 ≤ v ≤ V implies E[v]² ≤ E[v²] ≤ V·E[v] (Jensen; v² ≤ V·v).
    const x = concat(tone(1000, 0.2, 0.005), tone(1000, 0.9, 0.005));
    const f = computeFrameStats(x, 8000);
    const r = railAtGain(f, dbToAmp(12), VS, createScratch({ frames: f } as PlanClip));
    for (let k = 0; k < f.count; k++) {
      expect(r.meanV[k]).toBeGreaterThanOrEqual(0);
      expect(r.meanV[k]).toBeLessThanOrEqual(VS);
      expect(r.meanSquareV2[k]).toBeGreaterThanOrEqual(r.meanV[k] ** 2 * (1 - 1e-12));
      expect(r.meanSquareV2[k]).toBeLessThanOrEqual(VS * r.meanV[k] * (1 + 1e-12));
    }
    // 4·0.2 = 0.8 holds for the first 5 ms; 4·0.9 > 1 from frame 5 on.
    expect(r.firstOverModS).toBeCloseTo(0.005, 12);
  });
});

describe('evaluateAtGain: the other limits', () => {
  it('measures over-modulation on the histogram: a sine at gain g over-modulates (2/π)·arccos(1/(gA)) of the time', () => {
    // Arcsine law of a sine's magnitude (textbook): P(|A sin| > L) = (2/π)·arccos(L/A). At 8 kHz and
    // 1 kHz only 8 phases occur, so use an incommensurate tone at 48 kHz: tolerance 0.002 absolute
    // (sampling of a 2 s sine plus one histogram bin).
    const clip = planClip('sine', tone(997, 0.5, 2, 48000), { fs: 48000 });
    const e = evaluateAtGain(clip, COIL, STEADY, 20 * Math.log10(2 / 0.8), planSettings(STEADY));
    expect(Math.abs(e.overModulationFraction - (2 / Math.PI) * Math.acos(0.8))).toBeLessThan(0.002);
    expect(e.overModulationTimeS).toBeCloseTo(e.overModulationFraction * 2, 12);
    const om = e.limits.find((l) => l.limit === 'over-modulation')!;
    expect(om.ok).toBe(false);
    expect(e.ok).toBe(false);
    expect(e.worst).toBe(om);
  });

  it('checks the supply current against the supply limit (rail-linear: g·E[v])', () => {
    const d = linearDriver(STEADY.devices[0], STEADY.devices[1], { supplyCurrentLimitA: 1.4 });
    const e = evaluateAtGain(planClip('quiet', silence(0.5)), COIL, d, 0, planSettings(d));
    const sc = e.limits.find((l) => l.limit === 'supply-current')!;
    expect(sc.value).toBeCloseTo(1.5, 12);
    expect(sc.ok).toBe(false);
    expect(sc.headroom).toBeCloseTo(-0.1, 12);
  });

  it('adds the on-time and duty checks for the pulse scheme, and needs pulse events', () => {
    const d = pulseDriver(mosfet('bridge', { rKPerW: 0.5, tauS: 0.01, sinkToAmbientKPerW: 1 }));
    const clip = planClip('t', tone(200, 0.5, 0.5), { pulses: true });
    const e = evaluateAtGain(clip, COIL, d, 0, planSettings(d));
    expect(e.limits.map((l) => l.limit)).toEqual(['junction-temperature', 'over-modulation', 'supply-current', 'on-time', 'duty', 'switching-speed']);
    // 200 Hz: one pulse per cycle, 100 in 0.5 s (zero crossings; the first may fall on the edge).
    expect(e.pulses!.count).toBeGreaterThanOrEqual(99);
    expect(() => evaluateAtGain({ ...clip, pulseEvents: undefined }, COIL, d, 0, planSettings(d))).toThrow(/pulseEvents/);
  });

  it('validates the settings', () => {
    expect(() => planSettings(STEADY, { marginK: -1 })).toThrow(RangeError);
    expect(() => planSettings(STEADY, { allowedShare: 1 })).toThrow(/allowedShare/);
    expect(() => planSettings(STEADY, { ambientC: Number.NaN })).toThrow(/ambientC/);
    expect(planSettings(STEADY)).toEqual({ marginK: 25, allowedShare: 0.001, ambientC: 25 });
  });
});
