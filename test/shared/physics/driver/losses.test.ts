import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import {
  bridgeLossParts,
  buckSupplyCurrentA,
  modulatorLossParts,
  modulatorSwitchingShare,
  modulatorTaperV,
  passLossParts,
  railMoments,
  railThirdMomentBoundV3,
  totalLossW,
} from '../../../../shared/physics/driver/losses.ts';
import type { DriverDevice } from '../../../../shared/schemas/driver.ts';

const MOSFET: DriverDevice = {
  role: 'bridge',
  kind: 'mosfet',
  rdsOnOhm: 0.08,
  rdsOnTempCoeffPerK: 0.007,
  vceSatV: null,
  riseTimeS: 25e-9,
  fallTimeS: 20e-9,
  outputCapacitanceF: 180e-12,
  tjMaxC: 150,
  thermal: { foster: [{ rKPerW: 1, tauS: 0.01 }], caseToSinkKPerW: 0, sinkToAmbientKPerW: 1, sinkHeatCapacityJPerK: 0 },
};
const IGBT: DriverDevice = { ...MOSFET, kind: 'igbt', rdsOnOhm: null, vceSatV: 1.9, riseTimeS: 40e-9, fallTimeS: 90e-9 };

describe('bridgeLossParts', () => {
  it('reproduces a hand calculation for a MOSFET half-bridge at 48 V, 3 A, 300 kHz', () => {
    // Hand calculation with the application-note formulas (Graovac et al., Infineon 2006 [recalled];
    // Mohan et al. eq. 2-6 [recalled]): I_rms = (π/2)·3 = 4.712 A → 4.712²·0.08 = 1.7765 W;
    // ½·(π·3 A)·48 V·45 ns·300 kHz = 3.0536 W; ½·180 pF·48²·300 kHz = 0.06221 W.
    // Tolerance 5e-5 W: rounding of the hand figures.
    const p = bridgeLossParts(MOSFET, 'half-bridge', 300e3, railMoments(3 / 48, 48, 48 * 48));
    expect(Math.abs(p.resistiveAt25W - 1.7765)).toBeLessThan(5e-5);
    expect(Math.abs(p.switchingW - 3.0536)).toBeLessThan(5e-5);
    expect(Math.abs(p.capacitiveW - 0.06221)).toBeLessThan(5e-6);
    expect(p.conductionFixedW).toBe(0);
    // At 100 °C the I²R part rises by 1 + 0.007·75 = 1.525 (linear Rds(on) law).
    expect(Math.abs(totalLossW(p, 0.007, 100) - (1.7765 * 1.525 + 3.0536 + 0.06221))).toBeLessThan(1e-4);
  });

  it('reproduces a hand calculation for an IGBT full bridge at 320 V, 12 A, 120 kHz', () => {
    // V_CE(sat)·I_avg = 1.9 V·6 A = 11.4 W; ½·(π/2·12 A)·320 V·130 ns·120 kHz = 47.05 W;
    // ½·150 pF·320²·120 kHz = 0.9216 W. Tolerance 0.005 W (hand rounding).
    const p = bridgeLossParts({ ...IGBT, outputCapacitanceF: 150e-12 }, 'full-bridge', 120e3, railMoments(12 / 320, 320, 320 * 320));
    expect(Math.abs(p.conductionFixedW - 11.4)).toBeLessThan(1e-9);
    expect(Math.abs(p.switchingW - 47.05)).toBeLessThan(0.005);
    expect(Math.abs(p.capacitiveW - 0.9216)).toBeLessThan(1e-4);
    expect(p.resistiveAt25W).toBe(0);
  });

  it('never falls as the rail voltage rises (any device, topology, f0, temperature)', () => {
    // Property: every term grows with V (I = g·V): Î², V·I, V², I are all increasing in V ≥ 0.
    const dev = fc.record({
      kind: fc.constantFrom<'mosfet' | 'igbt'>('mosfet', 'igbt'),
      r: fc.double({ min: 0.001, max: 2, noNaN: true }),
      vce: fc.double({ min: 0.5, max: 4, noNaN: true }),
      t: fc.double({ min: 0, max: 2e-7, noNaN: true }),
      c: fc.double({ min: 0, max: 2e-9, noNaN: true }),
    });
    fc.assert(
      fc.property(
        dev,
        fc.constantFrom<'half-bridge' | 'full-bridge' | 'single-switch'>('half-bridge', 'full-bridge', 'single-switch'),
        fc.double({ min: 1e4, max: 2e6, noNaN: true }),
        fc.double({ min: 0, max: 1, noNaN: true }),
        fc.double({ min: 0, max: 1, noNaN: true }),
        fc.double({ min: -20, max: 150, noNaN: true }),
        (d, topo, f0, u1, u2, tj) => {
          const device: DriverDevice = { ...MOSFET, kind: d.kind, rdsOnOhm: d.kind === 'mosfet' ? d.r : null, vceSatV: d.vce, riseTimeS: d.t, fallTimeS: d.t, outputCapacitanceF: d.c };
          const vs = 160;
          const g = 4 / vs;
          const [lo, hi] = [Math.min(u1, u2) * vs, Math.max(u1, u2) * vs];
          const at = (v: number) => totalLossW(bridgeLossParts(device, topo, f0, railMoments(g, v, v * v)), 0.007, tj);
          expect(at(hi)).toBeGreaterThanOrEqual(at(lo) * (1 - 1e-12));
        },
      ),
      { numRuns: 200 },
    );
  });
});

describe('passLossParts', () => {
  it('balances energy against a sample-level rail within a frame: V_s·E[I] = E[v·I] + P_pass', () => {
    // Direct sample-by-sample (V_s − v)·g·v versus g(V_s·E[v] − E[v²]) from the two moments only.
    // Tolerance 1e-12 relative (summation round-off over 48 000 samples).
    const vs = 48;
    const g = 3 / vs;
    const n = 48_000;
    let m = 0;
    let s = 0;
    let direct = 0;
    let input = 0;
    let delivered = 0;
    for (let i = 0; i < n; i++) {
      const v = Math.min(vs, Math.max(0, 24 + 20 * Math.sin(i / 7) + 6 * Math.sin(i / 1.3)));
      m += v / n;
      s += (v * v) / n;
      direct += ((vs - v) * g * v) / n;
      input += (vs * g * v) / n;
      delivered += (v * g * v) / n;
    }
    const p = passLossParts(vs, g, m, s).conductionFixedW;
    expect(Math.abs(p / direct - 1)).toBeLessThan(1e-12);
    expect(Math.abs((delivered + p) / input - 1)).toBeLessThan(1e-12);
  });

  it('is largest at half the supply: g·V_s²/4 (silence is the hottest case)', () => {
    // d/dv [g·v(V_s − v)] = 0 at v = V_s/2 (common practice for linear regulators; exact here).
    const vs = 48;
    const g = 3 / vs;
    const max = passLossParts(vs, g, vs / 2, (vs * vs) / 4).conductionFixedW;
    expect(Math.abs(max - 36)).toBeLessThan(1e-12);
    fc.assert(
      fc.property(fc.double({ min: 0, max: 1, noNaN: true }), fc.double({ min: 0, max: 1, noNaN: true }), (u, w) => {
        const mean = u * vs;
        const ms = mean * mean + w * (vs * mean - mean * mean); // any feasible E[v²] for that mean
        expect(passLossParts(vs, g, mean, ms).conductionFixedW).toBeLessThanOrEqual(max * (1 + 1e-12));
      }),
      { numRuns: 300 },
    );
  });
});

describe('railThirdMomentBoundV3', () => {
  it('bounds E[v³] of any distribution on [0, V_max] and is exact for a constant and for its extremal two-point law', () => {
    // Chebyshev–Markov–Krein bound (Karlin & Studden 1966): proved by v³ ≤ q(v) on [0, V_max].
    const vmax = 100;
    fc.assert(
      fc.property(fc.array(fc.tuple(fc.double({ min: 0, max: 1, noNaN: true }), fc.double({ min: 0.01, max: 1, noNaN: true })), { minLength: 1, maxLength: 8 }), (pts) => {
        const wsum = pts.reduce((a, [, w]) => a + w, 0);
        let m = 0;
        let s = 0;
        let m3 = 0;
        for (const [u, w] of pts) {
          const v = u * vmax;
          m += (w * v) / wsum;
          s += (w * v * v) / wsum;
          m3 += (w * v * v * v) / wsum;
        }
        expect(railThirdMomentBoundV3(m, s, vmax)).toBeGreaterThanOrEqual(m3 - 1e-9 * vmax ** 3);
      }),
      { numRuns: 300 },
    );
    expect(Math.abs(railThirdMomentBoundV3(37, 37 * 37, vmax) - 37 ** 3)).toBeLessThan(1e-9);
    // Two-point law: 0.6 at y = 20, 0.4 at V_max: attains the bound.
    const m = 0.6 * 20 + 0.4 * vmax;
    const s = 0.6 * 400 + 0.4 * vmax ** 2;
    expect(Math.abs(railThirdMomentBoundV3(m, s, vmax) / (0.6 * 8000 + 0.4 * vmax ** 3) - 1)).toBeLessThan(1e-12);
  });

  it('is 10 % above the true E[v³] of a fully modulated sine rail (11/32 vs 5/16 of V_max³)', () => {
    // Hand calculation: v = V(1 + sin)/2 → E[v] = V/2, E[v²] = 3V²/8, E[v³] = 5V³/16; y = V/4 → bound 11V³/32.
    expect(Math.abs(railThirdMomentBoundV3(0.5, 0.375, 1) - 11 / 32)).toBeLessThan(1e-14);
  });
});

describe('modulatorLossParts', () => {
  it('balances energy over a synthesised PWM period with clamped inductive transitions', () => {
    // Buck switch at 160 V, D = 0.5 (rail 80 V), I = 2 A, 150 kHz, R = 0.1 Ω, t_r = t_f = 40 ns. The
    // waveform: turn-on = current rise at full voltage then voltage fall at full current (t_r/2 each),
    // turn-off the reverse (Mohan et al. eq. 2-6 [recalled]). Input ∫V_s·i_sw = output ∫(V_s − v_sw)·i_sw
    // + switch loss ∫v_sw·i_sw, and that loss = D·I²·R + ½·V_s·I·(t_r + t_f)·f (the model).
    // Tolerance 0.2 %: the on-state drop I·R (0.2 V of 160 V) is not in the ½·V·I·t term.
    const vs = 160;
    const f = 150e3;
    const dev: DriverDevice = { ...MOSFET, role: 'modulator', rdsOnOhm: 0.1, riseTimeS: 40e-9, fallTimeS: 40e-9, outputCapacitanceF: 0 };
    const g = 2 / 80;
    const I = 2;
    const T = 1 / f;
    const tOn = 0.5 * T;
    const tr = 40e-9;
    const n = 400_000;
    let eIn = 0;
    let eOut = 0;
    let eSw = 0;
    const vOn = I * 0.1;
    for (let k = 0; k < n; k++) {
      const t = ((k + 0.5) / n) * T;
      let v: number;
      let i: number;
      if (t < tr / 2) [v, i] = [vs, (I * t) / (tr / 2)];
      else if (t < tr) [v, i] = [vs - ((vs - vOn) * (t - tr / 2)) / (tr / 2), I];
      else if (t < tOn) [v, i] = [vOn, I];
      else if (t < tOn + tr / 2) [v, i] = [vOn + ((vs - vOn) * (t - tOn)) / (tr / 2), I];
      else if (t < tOn + tr) [v, i] = [vs, I * (1 - (t - tOn - tr / 2) / (tr / 2))];
      else [v, i] = [vs, 0];
      const dt = T / n;
      eIn += vs * i * dt;
      eOut += (vs - v) * i * dt;
      eSw += v * i * dt;
    }
    expect(Math.abs((eOut + eSw) / eIn - 1)).toBeLessThan(1e-10); // summation round-off, 4e5 terms
    const p = modulatorLossParts(dev, vs, f, g, 80, 6400);
    const model = (p.resistiveAt25W + p.switchingW) * T;
    expect(Math.abs(model / eSw - 1)).toBeLessThan(2e-3);
    // Supply current by power balance: (g·E[v²] + P)/V_s; here rail power 160 W.
    expect(Math.abs(buckSupplyCurrentA(vs, g, 6400, p.resistiveAt25W + p.switchingW) - (160 + eSw * f) / vs)).toBeLessThan(1e-3);
  });

  it('adds the C_oss term only while switching, and an IGBT pays V_CE·E[D·I]', () => {
    const dev: DriverDevice = { ...MOSFET, role: 'modulator', outputCapacitanceF: 200e-12 };
    expect(modulatorLossParts(dev, 160, 150e3, 0.025, 0, 0).capacitiveW).toBe(0);
    expect(Math.abs(modulatorLossParts(dev, 160, 150e3, 0.025, 80, 6400).capacitiveW - 0.384)).toBeLessThan(1e-12);
    // IGBT: D·I·V_CE = 0.5·2 A·1.9 V = 1.9 W at a constant 80 V rail (hand calculation).
    const ig = modulatorLossParts({ ...IGBT, role: 'modulator' }, 160, 150e3, 0.025, 80, 6400);
    expect(Math.abs(ig.conductionFixedW - 1.9)).toBeLessThan(1e-12);
  });

  it('stops switching at 100 % duty, falling to zero without a step as the duty approaches it', () => {
    // Demo-like buck: 160 V, 150 kHz, t_r + t_f = 40 ns → taper width 160·40e-9·150e3 = 0.96 V
    // (hand calculation). At D = 1 the switch stays on: conduction only, D·I²·R = 4²·0.1 = 1.6 W.
    const dev: DriverDevice = { ...MOSFET, role: 'modulator', rdsOnOhm: 0.1, riseTimeS: 20e-9, fallTimeS: 20e-9, outputCapacitanceF: 200e-12 };
    const g = 0.025;
    expect(Math.abs(modulatorTaperV(dev, 160, 150e3) - 0.96)).toBeLessThan(1e-12);
    const full = modulatorLossParts(dev, 160, 150e3, g, 160, 25600);
    expect(full.switchingW).toBe(0);
    expect(full.capacitiveW).toBe(0);
    expect(Math.abs(full.resistiveAt25W - 1.6)).toBeLessThan(1e-12);
    // Just below: switching ½·V_s·g·v·(t_r+t_f)·f·h and C_oss ½·C·V_s²·f·h with h = (160 − v)/0.96.
    const v = 160 - 0.48;
    const half = modulatorLossParts(dev, 160, 150e3, g, v, v * v);
    expect(Math.abs(half.switchingW - 0.5 * 160 * g * v * 40e-9 * 150e3 * 0.5)).toBeLessThan(1e-12);
    expect(Math.abs(half.capacitiveW - 0.5 * 200e-12 * 160 * 160 * 150e3 * 0.5)).toBeLessThan(1e-12);
    // Continuity: the loss 1 µV below 100 % duty is within 1e-5 W of the loss at 100 %.
    const near = modulatorLossParts(dev, 160, 150e3, g, 160 - 1e-6, (160 - 1e-6) ** 2);
    const sum = (p: typeof near) => p.resistiveAt25W + p.switchingW + p.capacitiveW;
    expect(Math.abs(sum(near) - sum(full))).toBeLessThan(1e-5);
    // Below the taper every cycle switches; an ideal switch (w = 0) stops only at V_s.
    expect(modulatorSwitchingShare(159, 160, 0.96)).toBe(1);
    expect(modulatorSwitchingShare(159.99, 160, 0)).toBe(1);
    expect(modulatorSwitchingShare(160, 160, 0)).toBe(0);
  });
});
