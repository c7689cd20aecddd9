import { describe, expect, it } from 'vitest';
import { fosterPeriodicPeakKPerW, fosterZthKPerW, type FosterStage } from '../../../../shared/physics/thermal/foster.ts';
import { ThermalNetwork, type ThermalPath } from '../../../../shared/physics/thermal/network.ts';
import reference from '../../../fixtures/thermal/reference.json';

const FOUR: FosterStage[] = reference.network.foster;
const PATH: ThermalPath = { foster: FOUR, caseToSinkKPerW: 0.5, sinkToAmbientKPerW: 3, sinkHeatCapacityJPerK: 50 };
const BARE = { caseToSinkKPerW: 0, sinkToAmbientKPerW: 0, sinkHeatCapacityJPerK: 0 };

describe('ThermalNetwork: reference responses', () => {
  it('reproduces the single-RC reference: 63.2121 K after 10 ms on, 23.2544 K after 10 ms off', () => {
    // One Foster RC, Zth(t) = R(1 − e^(−t/τ)) (NXP AN11261 "Using RC Thermal Models"), R = 2 K/W,
    // τ = 10 ms, P = 50 W [calc]: 100(1 − e⁻¹) and that times e⁻¹. Tolerance 5e-5 K (4 decimals given).
    const net = ThermalNetwork.fromPath({ foster: [{ rKPerW: 2, tauS: 0.01 }], ...BARE });
    const x = net.createState();
    net.step(x, 50, 0.01);
    expect(Math.abs(net.junctionRiseK(x) - 63.2121)).toBeLessThan(5e-5);
    net.step(x, 0, 0.01);
    expect(Math.abs(net.junctionRiseK(x) - 23.2544)).toBeLessThan(5e-5);
  });

  it('with the case at ambient, gives back the Foster Zth(t) and the Foster cells themselves', () => {
    // Foster and Cauer forms have the same Z(s) (Infineon AN2008-03), so the ladder's modal
    // (Foster) equivalent must return the datasheet cells: τₖ = 1/λₖ, Rₖ = bₖ²/λₖ. Tolerance 1e-10
    // relative: round-off through synthesis and eigen-decomposition.
    const net = ThermalNetwork.fromPath({ foster: FOUR, ...BARE });
    for (let e = -7; e <= 1; e += 0.5) {
      expect(Math.abs(net.zthKPerW(10 ** e) - fosterZthKPerW(FOUR, 10 ** e))).toBeLessThan(1e-11);
    }
    const back = net.fosterEquivalent().sort((a, b) => a.tauS - b.tauS);
    back.forEach((s, k) => {
      expect(Math.abs(s.tauS / FOUR[k].tauS - 1)).toBeLessThan(1e-10);
      expect(Math.abs(s.rKPerW / FOUR[k].rKPerW - 1)).toBeLessThan(1e-10);
    });
  });

  it('matches a matrix-exponential (scipy expm) solution of the chained network on and off', () => {
    // test/fixtures/thermal/make_reference.py: x(t) = A⁻¹(e^(At) − I)·B·P with scipy.linalg.expm,
    // independent of the modal method. Tolerance 1e-9 relative (float64 in both; expm ~1e-13).
    const net = ThermalNetwork.fromPath(PATH);
    for (const row of reference.network.steps) {
      const x = net.createState();
      net.step(x, reference.network.powerW, row.onS);
      expect(Math.abs(net.junctionRiseK(x) / row.junctionAfterOnK - 1)).toBeLessThan(1e-9);
      // The sink rise after 1 ms is ~2e-8 K, a difference of modal terms ~1e6 times larger: there the
      // tolerance is absolute, 1e-12 K (round-off of those terms).
      expect(Math.abs(net.sinkRiseK(x) - row.sinkAfterOnK)).toBeLessThan(1e-9 * row.sinkAfterOnK + 1e-12);
      net.step(x, 0, row.offS);
      expect(Math.abs(net.junctionRiseK(x) / row.junctionAfterOffK - 1)).toBeLessThan(1e-9);
    }
  });

  it('settles at Tj = Tamb + P·(ΣR_jc + R_cs + R_sa), case at P·(R_cs + R_sa), sink at P·R_sa', () => {
    // Steady state of a series thermal path (NXP AN11261: resistances in series add). ΣR_jc = 0.70 K/W.
    // Tolerance 1e-9 relative: e^(−λ_min·10⁵ s) is 0 and the rest is round-off.
    const net = ThermalNetwork.fromPath(PATH);
    const x = net.createState();
    net.step(x, 10, 1e5);
    expect(Math.abs(net.junctionRiseK(x) / (10 * (0.7 + 0.5 + 3)) - 1)).toBeLessThan(1e-9);
    expect(Math.abs(net.steadyStateRiseK(10) / 42 - 1)).toBeLessThan(1e-12);
    expect(Math.abs(net.zthKPerW(1e7) / 4.2 - 1)).toBeLessThan(1e-9);
    expect(Math.abs(net.caseRiseK(x) / 35 - 1)).toBeLessThan(1e-9);
    expect(Math.abs(net.sinkRiseK(x) / 30 - 1)).toBeLessThan(1e-9);
  });
});

describe('ThermalNetwork: exact update', () => {
  it('is independent of the step size: one 10 ms step equals ten 1 ms steps', () => {
    // Zero-order hold is exact for constant power (Franklin, Powell & Workman, ch. 4 [recalled]). Tolerance 1e-12.
    const net = ThermalNetwork.fromPath(PATH);
    const a = net.createState();
    const b = net.createState();
    net.step(a, 25, 0.01);
    for (let i = 0; i < 10; i++) net.step(b, 25, 0.001);
    a.forEach((v, k) => expect(Math.abs(v - b[k])).toBeLessThan(1e-12 * Math.max(1, Math.abs(v))));
    expect(Math.abs(net.junctionRiseK(a) - 25 * net.zthKPerW(0.01))).toBeLessThan(1e-12);
  });

  it('agrees with a fine RK4 integration of C·dθ/dt = −G·θ + e₁P for a varying power', () => {
    // Independent integrator on the node equations (classical RK4, step 1 µs ≪ smallest τ of the
    // ladder ≈ 20 µs: local error ~(h/τ)⁵). Power changes every 1 ms, so ZOH is exact. Tolerance 1e-6 K.
    const path: ThermalPath = { foster: [{ rKPerW: 0.3, tauS: 2e-4 }, { rKPerW: 0.5, tauS: 5e-3 }], caseToSinkKPerW: 0.4, sinkToAmbientKPerW: 2, sinkHeatCapacityJPerK: 0.5 };
    const net = ThermalNetwork.fromPath(path);
    const c = [...net.cauer.map((s) => s.cJPerK), path.sinkHeatCapacityJPerK];
    const r = net.cauer.map((s) => s.rKPerW);
    const deriv = (th: number[], p: number): number[] => {
      const q01 = (th[0] - th[1]) / r[0];
      const q12 = (th[1] - th[2]) / (r[1] + path.caseToSinkKPerW);
      const q2a = th[2] / path.sinkToAmbientKPerW;
      return [(p - q01) / c[0], (q01 - q12) / c[1], (q12 - q2a) / c[2]];
    };
    let th = [0, 0, 0];
    const x = net.createState();
    const h = 1e-6;
    for (let ms = 0; ms < 20; ms++) {
      const p = ms % 3 === 0 ? 0 : 10 + ms;
      for (let i = 0; i < 1000; i++) {
        const k1 = deriv(th, p);
        const k2 = deriv(th.map((v, j) => v + (h / 2) * k1[j]), p);
        const k3 = deriv(th.map((v, j) => v + (h / 2) * k2[j]), p);
        const k4 = deriv(th.map((v, j) => v + h * k3[j]), p);
        th = th.map((v, j) => v + (h / 6) * (k1[j] + 2 * k2[j] + 2 * k3[j] + k4[j]));
      }
      net.step(x, p, 1e-3);
      const nodes = net.nodeRisesK(x);
      nodes.forEach((v, j) => expect(Math.abs(v - th[j])).toBeLessThan(1e-6));
    }
  });

  it('gives the interval-mean junction rise (checked against a 1000-point average)', () => {
    // Mean of the exact trajectory over Δt, computed by sampling the exact solution finely.
    // Tolerance 1e-6 relative: midpoint-rule error of 1000 samples.
    const net = ThermalNetwork.fromPath(PATH);
    const x = net.createState();
    net.step(x, 12, 0.003);
    const c = net.coefficients(0.002);
    const formula = net.meanJunctionRiseK(x, 30, c);
    let sum = 0;
    for (let i = 0; i < 1000; i++) {
      const y = Float64Array.from(x);
      net.step(y, 30, ((i + 0.5) / 1000) * 0.002);
      sum += net.junctionRiseK(y);
    }
    expect(Math.abs(formula / (sum / 1000) - 1)).toBeLessThan(1e-6);
    expect(Math.abs(c.endRisePerW - net.zthKPerW(0.002))).toBeLessThan(1e-12);
  });

  it('reaches the exact periodic peak of its own Foster equivalent under a pulse train', () => {
    // Periodic steady peak of a Foster network, ΔT/P = Σ Rᵢ(1 − e^(−tp/τᵢ))/(1 − e^(−T/τᵢ)) (superposed
    // single-pulse responses of NXP AN11261's Foster model, summed as a geometric series) [calc],
    // applied to the chained network's modal Foster form.
    // Pulses 200 µs every 5 ms at 40 W for 2000 s (≈ 13 τ of the sink: transient e^-13 ≈ 2e-6 of
    // the rise), tolerance 1e-5 relative.
    const net = ThermalNetwork.fromPath({ ...PATH, sinkHeatCapacityJPerK: 50 });
    const x = net.createState();
    const on = net.coefficients(2e-4);
    const off = net.coefficients(4.8e-3);
    let peak = 0;
    for (let i = 0; i < 400000; i++) {
      net.advance(x, 40, on);
      peak = net.junctionRiseK(x);
      net.advance(x, 0, off);
    }
    const formula = 40 * fosterPeriodicPeakKPerW(net.fosterEquivalent(), 2e-4, 5e-3);
    expect(Math.abs(peak / formula - 1)).toBeLessThan(1e-5);
  });
});

describe('ThermalNetwork: sink variants and state', () => {
  it('treats a sink without heat capacity as a plain resistance', () => {
    // With C_sink = 0 the sink is not a node: θ_sink = R_sa·q and θ_case = (R_cs + R_sa)·q with q the
    // heat flow leaving the ladder — Ohm's law on the series tail at every instant. The same path with a
    // tiny C_sink (τ ≈ 1e-9 s) must agree once that time constant has passed. Tolerances 1e-9 relative.
    const massless = ThermalNetwork.fromPath({ ...PATH, sinkHeatCapacityJPerK: 0 });
    expect(massless.hasSinkNode).toBe(false);
    expect(massless.nodeCount).toBe(4);
    const tiny = ThermalNetwork.fromPath({ ...PATH, sinkHeatCapacityJPerK: 1e-10 });
    expect(tiny.nodeCount).toBe(5);
    const a = massless.createState();
    const b = tiny.createState();
    for (const [p, dt] of [[20, 0.002], [0, 0.01], [35, 0.3]]) {
      massless.step(a, p, dt);
      tiny.step(b, p, dt);
      const ja = massless.junctionRiseK(a);
      expect(Math.abs(ja / tiny.junctionRiseK(b) - 1)).toBeLessThan(1e-7);
      expect(Math.abs(massless.sinkRiseK(a) / massless.caseRiseK(a) - 3 / 3.5)).toBeLessThan(1e-12);
    }
    const x = massless.createState();
    massless.step(x, 10, 1e4);
    expect(Math.abs(massless.junctionRiseK(x) / 42 - 1)).toBeLessThan(1e-9);
    expect(Math.abs(massless.sinkRiseK(x) / 30 - 1)).toBeLessThan(1e-9);
  });

  it('holds the sink at ambient when R_sa = 0, whatever its capacity', () => {
    const net = ThermalNetwork.fromPath({ ...PATH, sinkToAmbientKPerW: 0 });
    const x = net.createState();
    net.step(x, 10, 1e4);
    expect(net.sinkRiseK(x)).toBe(0);
    expect(Math.abs(net.junctionRiseK(x) / 12 - 1)).toBeLessThan(1e-9);
  });

  it('responds like the bare Foster set before heat reaches the case', () => {
    // At t ≪ the ladder's slow constants the boundary at the case cannot be seen: Zth ≈ Zth_jc(t).
    // At 10 µs they agree to 1e-6 relative; at 1 s the chained path is far above the bare 0.7 K/W.
    const net = ThermalNetwork.fromPath(PATH);
    expect(Math.abs(net.zthKPerW(1e-5) / fosterZthKPerW(FOUR, 1e-5) - 1)).toBeLessThan(1e-6);
    expect(net.zthKPerW(1)).toBeGreaterThan(0.8);
  });

  it('converts between modal state and node rises both ways', () => {
    const net = ThermalNetwork.fromPath(PATH);
    const x = net.createState();
    net.step(x, 10, 0.5);
    const nodes = net.nodeRisesK(x);
    expect(nodes[0]).toBeCloseTo(net.junctionRiseK(x), 12);
    expect(nodes[nodes.length - 1]).toBeCloseTo(net.sinkRiseK(x), 12);
    const back = net.stateFromNodeRisesK(nodes);
    back.forEach((v, k) => expect(Math.abs(v - x[k])).toBeLessThan(1e-12 * Math.max(1, Math.abs(x[k]))));
    expect(() => net.stateFromNodeRisesK([1, 2])).toThrow(RangeError);
  });
});
