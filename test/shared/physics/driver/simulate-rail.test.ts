import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { DEMO_DRIVER_BUCK, DEMO_DRIVER_LINEAR, DEMO_DRIVER_PULSE } from '../../../../shared/demo/drivers.ts';
import { steadyJunctionC } from '../../../../shared/physics/driver/electrothermal.ts';
import { bridgeLossParts, modulatorLossParts, passLossParts, railMoments } from '../../../../shared/physics/driver/losses.ts';
import { frameLossModel, simulateRail } from '../../../../shared/physics/driver/simulate-rail.ts';
import { frameOtherW, frameResistiveAt25W } from '../../../../shared/physics/driver/device-run.ts';
import { ThermalNetwork } from '../../../../shared/physics/thermal/network.ts';
import type { DriverProfile } from '../../../../shared/schemas/driver.ts';

const COIL = { resonanceHz: 300e3, qualityFactor: 30 };
const constantRail = (v: number, n: number, frameS: number, extraV2 = 0) => ({
  frameS,
  meanV: new Float64Array(n).fill(v),
  meanSquareV2: new Float64Array(n).fill(v * v + extraV2),
});
const clone = (p: DriverProfile): DriverProfile => structuredClone(p);
const totalR = (p: DriverProfile, i: number) => ThermalNetwork.fromPath(p.devices[i].thermal).totalRKPerW;

describe('simulateRail: steady states (rail-linear demo)', () => {
  it('settles at T_amb + R_th·P(T) for bridge and pass device (electrothermal steady state)', () => {
    // Steady state of the series path (NXP AN11261) with the linear Rds(on) law solved in closed form.
    // 6000 s ≈ 26 time constants of the slowest sink (≈230 s): transient e^-26 → tolerance 1e-6 K.
    const d = DEMO_DRIVER_LINEAR;
    const sim = simulateRail(d, COIL, constantRail(24, 6000, 1));
    const parts = bridgeLossParts(d.devices[0], 'half-bridge', COIL.resonanceHz, railMoments(3 / 48, 24, 576));
    const want = steadyJunctionC(parts.resistiveAt25W, parts.switchingW + parts.capacitiveW, 0.007, totalR(d, 0), 25);
    expect(Math.abs(sim.devices[0].peakJunctionC - want)).toBeLessThan(1e-6);
    // Pass device in silence: g·V_s²/4 = 36 W on 0.4 + 0.2 + 0.9 K/W → 79 °C.
    expect(Math.abs(sim.devices[1].peakJunctionC - 79)).toBeLessThan(1e-6);
    expect(sim.devices[1].role).toBe('pass');
    expect(sim.devices[0].count).toBe(2);
  });

  it('shows that silence is not cool: the pass device runs hotter at idle than with loud music', () => {
    // Silence puts the rail at V_s/2, the maximum of g·v(V_s − v) (passLossParts); music with the same
    // mean but more spread (E[v²] > E[v]²) dissipates g·Var[v] less. Full-scale sine: 18 W vs 36 W.
    const d = DEMO_DRIVER_LINEAR;
    const silent = simulateRail(d, COIL, constantRail(24, 600, 0.5));
    const loud = simulateRail(d, COIL, constantRail(24, 600, 0.5, 24 * 24 / 2));
    expect(silent.devices[1].meanLossW).toBeCloseTo(36, 9);
    expect(loud.devices[1].meanLossW).toBeCloseTo(18, 9);
    expect(silent.devices[1].peakJunctionC).toBeGreaterThan(loud.devices[1].peakJunctionC + 10);
    // …while the bridge, whose loss grows with E[v²], is the cooler one at idle.
    expect(silent.devices[0].peakJunctionC).toBeLessThan(loud.devices[0].peakJunctionC);
  });

  it('makes the Rds(on) feedback raise the bridge temperature and loss', () => {
    const hot = simulateRail(DEMO_DRIVER_LINEAR, COIL, constantRail(48, 400, 0.5));
    const flat = clone(DEMO_DRIVER_LINEAR);
    flat.devices[0].rdsOnTempCoeffPerK = 0;
    const cold = simulateRail(flat, COIL, constantRail(48, 400, 0.5));
    expect(hot.devices[0].meanLossW).toBeGreaterThan(cold.devices[0].meanLossW * 1.02);
    expect(hot.devices[0].peakJunctionC).toBeGreaterThan(cold.devices[0].peakJunctionC);
  });
});

describe('simulateRail: exactness and bookkeeping', () => {
  it('balances energy: input = delivered to the coil + dissipated, both schemes', () => {
    // Ledger identity over a varying rail; tolerance 1e-12 relative (summation round-off). The input
    // is also checked against V_s·(mean supply current)·duration.
    const n = 5000;
    const meanV = new Float64Array(n);
    const ms = new Float64Array(n);
    for (const d of [DEMO_DRIVER_LINEAR, DEMO_DRIVER_BUCK]) {
      const vs = d.supplyVoltageV;
      for (let i = 0; i < n; i++) {
        meanV[i] = vs * (0.5 + 0.4 * Math.sin(i / 30));
        ms[i] = meanV[i] ** 2 + (vs * vs * (1 + Math.sin(i / 7))) / 200;
      }
      const sim = simulateRail(d, COIL, { frameS: 1e-3, meanV, meanSquareV2: ms });
      const e = sim.energy;
      expect(Math.abs((e.deliveredJ + e.dissipatedJ) / e.inputJ - 1)).toBeLessThan(1e-12);
      expect(Math.abs(e.inputJ / (vs * sim.supply.meanCurrentA * n * 1e-3) - 1)).toBeLessThan(1e-12);
      const meanLossSum = sim.devices.reduce((a, dv) => a + dv.count * dv.meanLossW, 0) * n * 1e-3;
      expect(Math.abs(meanLossSum / e.dissipatedJ - 1)).toBeLessThan(1e-12);
      expect(e.deliveredJ).toBeGreaterThan(0);
    }
  });

  it('does not depend on the frame length for a held rail (one 10 ms frame = ten 1 ms frames)', () => {
    // Exact zero-order-hold update; with α = 0 the per-frame loss is the same, so states agree to 1e-12.
    const d = clone(DEMO_DRIVER_LINEAR);
    for (const dev of d.devices) dev.rdsOnTempCoeffPerK = 0;
    const a = simulateRail(d, COIL, constantRail(30, 1, 0.01));
    const b = simulateRail(d, COIL, constantRail(30, 10, 0.001));
    a.finalState.forEach((st, i) => st.forEach((v, k) => expect(Math.abs(v - b.finalState[i][k])).toBeLessThan(1e-12 * Math.max(1, v))));
  });

  it('continues from a final state exactly as one long run', () => {
    const rail = constantRail(40, 800, 1e-3, 50);
    const whole = simulateRail(DEMO_DRIVER_BUCK, COIL, rail);
    const half = (from: number) => ({ frameS: 1e-3, meanV: rail.meanV.subarray(from, from + 400), meanSquareV2: rail.meanSquareV2.subarray(from, from + 400) });
    const first = simulateRail(DEMO_DRIVER_BUCK, COIL, half(0));
    const second = simulateRail(DEMO_DRIVER_BUCK, COIL, half(400), { initial: first.finalState });
    second.finalState.forEach((st, i) => st.forEach((v, k) => expect(Math.abs(v - whole.finalState[i][k])).toBeLessThan(1e-11 * Math.max(1, v))));
  });

  it('returns traces consistent with the summary', () => {
    const n = 2000;
    const rail = constantRail(20, n, 1e-3, 30);
    for (let i = 0; i < n; i++) rail.meanV[i] = 20 + 15 * Math.sin(i / 100);
    for (let i = 0; i < n; i++) rail.meanSquareV2[i] = rail.meanV[i] ** 2 + 30;
    const sim = simulateRail(DEMO_DRIVER_LINEAR, COIL, rail, { traces: true });
    for (const [i, dv] of sim.devices.entries()) {
      const tr = dv.traces!;
      expect(tr.junctionC).toHaveLength(n);
      // Float32 storage: tolerance 1e-5 relative.
      expect(Math.abs(Math.max(...tr.junctionC) / dv.peakJunctionC - 1)).toBeLessThan(1e-6);
      expect(Math.abs(tr.junctionC[n - 1] / (25 + sim.finalState[i][0]) - 1)).toBeLessThan(1e-6);
      const meanLoss = tr.lossW.reduce((a, b) => a + b, 0) / n;
      expect(Math.abs(meanLoss / dv.meanLossW - 1)).toBeLessThan(1e-5);
      for (let k = 0; k < n; k += 97) {
        expect(tr.junctionC[k]).toBeGreaterThanOrEqual(tr.caseC[k]);
        expect(tr.caseC[k]).toBeGreaterThanOrEqual(tr.sinkC[k]);
        expect(tr.sinkC[k]).toBeGreaterThanOrEqual(25);
      }
    }
    expect(sim.supply.currentA![10]).toBeCloseTo((3 / 48) * rail.meanV[10], 5);
  });

  it('counts time above the warning temperature, crossing found within one frame', () => {
    // Constant power from rest with α = 0: the crossing time t_c solves T_amb + P·Zth(t_c) = T_warn
    // (bisection on the network's Zth); time above = duration − t_c. Tolerance one frame (0.1 s).
    const d = clone(DEMO_DRIVER_LINEAR);
    d.devices[1].rdsOnTempCoeffPerK = 0;
    const sim = simulateRail(d, COIL, constantRail(24, 3000, 0.1), { warnC: 70 });
    const net = ThermalNetwork.fromPath(d.devices[1].thermal);
    let lo = 0;
    let hi = 300;
    for (let i = 0; i < 100; i++) {
      const mid = (lo + hi) / 2;
      if (25 + 36 * net.zthKPerW(mid) < 70) lo = mid;
      else hi = mid;
    }
    expect(Math.abs(sim.devices[1].timeAboveWarnS - (300 - lo))).toBeLessThan(0.1);
  });
});

describe('simulateRail: rail-switched, runaway, warnings, input checks', () => {
  it('draws the buck input current (g·E[v²] + P_mod)/V_s from the supply', () => {
    // Power balance of the buck (Erickson & Maksimović ch. 2): at 80 V the rail takes 2 A but the
    // supply only ≈ 1 A plus the modulator loss over 160 V.
    const sim = simulateRail(DEMO_DRIVER_BUCK, COIL, constantRail(80, 100, 1e-3));
    const pMod = sim.devices[1].meanLossW;
    expect(sim.devices[1].role).toBe('modulator');
    expect(Math.abs(sim.supply.meanCurrentA - (160 + pMod) / 160)).toBeLessThan(1e-12);
    // At 25 °C: D·I²·R = 0.5·4·0.1 = 0.2 W, ½·160·2·40 ns·150 kHz = 0.96 W, ½·200 pF·160²·150 kHz = 0.384 W;
    // the junction is warmer, so the I²R part is a little higher (α = 0.008/K).
    expect(pMod).toBeGreaterThan(0.2 + 0.96 + 0.384);
    expect(pMod).toBeLessThan(0.2 * 1.2 + 0.96 + 0.384);
    expect(sim.devices[0].count).toBe(4);
  });

  it('detects thermal runaway on an absurd sink and dates it where the junction passes Tj max', () => {
    const d = clone(DEMO_DRIVER_LINEAR);
    d.devices[0].thermal.sinkToAmbientKPerW = 1000;
    d.devices[0].rdsOnTempCoeffPerK = 0.01;
    const sim = simulateRail(d, COIL, constantRail(48, 2000, 0.5), { traces: true });
    const b = sim.devices[0];
    expect(b.runaway).not.toBeNull();
    expect(b.peakJunctionC).toBeGreaterThan(150);
    const tr = b.traces!.junctionC;
    const cross = tr.findIndex((t) => t > 150);
    expect(Math.abs(b.runaway!.atS - cross * 0.5)).toBeLessThanOrEqual(0.5);
    expect(sim.warnings.some((w) => w.includes('thermal runaway'))).toBe(true);
    expect(sim.devices[1].runaway).toBeNull();
  });

  it('warns when the frame-mean supply current exceeds the supply limit', () => {
    const d = clone(DEMO_DRIVER_LINEAR);
    d.supplyCurrentLimitA = 2;
    const sim = simulateRail(d, COIL, constantRail(40, 10, 1e-3));
    expect(sim.supply.peakCurrentA).toBeCloseTo(2.5, 12);
    expect(sim.warnings.some((w) => w.startsWith('supply:'))).toBe(true);
  });

  it('builds frame loss models that equal the loss functions', () => {
    fc.assert(
      fc.property(fc.double({ min: 0, max: 1, noNaN: true }), fc.double({ min: 0, max: 1, noNaN: true }), (u, w) => {
        for (const d of [DEMO_DRIVER_LINEAR, DEMO_DRIVER_BUCK]) {
          const vs = d.supplyVoltageV;
          const g = d.fullRailCurrentA / vs;
          const m = u * vs;
          const s = m * m + w * (vs * m - m * m);
          const other = (p: { conductionFixedW: number; switchingW: number; capacitiveW: number }) => p.conductionFixedW + p.switchingW + p.capacitiveW;
          const evalModel = (role: 'bridge' | 'pass' | 'modulator') => {
            const f = frameLossModel(d, role, COIL.resonanceHz);
            return [frameResistiveAt25W(f, m, s), frameOtherW(f, m, s)];
          };
          const pb = bridgeLossParts(d.devices[0], d.topology, COIL.resonanceHz, railMoments(g, m, s));
          const [ra, oa] = evalModel('bridge');
          expect(Math.abs(ra - pb.resistiveAt25W)).toBeLessThan(1e-12 * (1 + pb.resistiveAt25W));
          expect(Math.abs(oa - other(pb))).toBeLessThan(1e-12 * (1 + other(pb)));
          const aux = d.scheme === 'rail-linear' ? passLossParts(vs, g, m, s) : modulatorLossParts(d.devices[1], vs, d.pwmFrequencyHz!, g, m, s);
          const [rx, ox] = evalModel(d.scheme === 'rail-linear' ? 'pass' : 'modulator');
          expect(Math.abs(rx - aux.resistiveAt25W)).toBeLessThan(1e-12 * (1 + aux.resistiveAt25W));
          expect(Math.abs(ox - other(aux))).toBeLessThan(1e-10 * (1 + other(aux)));
        }
      }),
      { numRuns: 200 },
    );
  });

  it('rejects the pulse scheme, rails outside 0…V_s and mismatched arrays', () => {
    expect(() => simulateRail(DEMO_DRIVER_PULSE, COIL, constantRail(10, 3, 1e-3))).toThrow(RangeError);
    expect(() => simulateRail(DEMO_DRIVER_LINEAR, COIL, constantRail(49, 3, 1e-3))).toThrow(/meanV\[0\]/);
    expect(() => simulateRail(DEMO_DRIVER_LINEAR, COIL, { frameS: 1e-3, meanV: new Float64Array(2), meanSquareV2: new Float64Array(3) })).toThrow(RangeError);
    expect(() => simulateRail(DEMO_DRIVER_LINEAR, { resonanceHz: 0, qualityFactor: 10 }, constantRail(10, 3, 1e-3))).toThrow(/resonanceHz/);
  });
});
