import { describe, expect, it } from 'vitest';
import { ThermalNetwork } from '../../../../shared/physics/thermal/network.ts';

// ThermalNetwork at its edges: input checks, a zero-length step, steps much shorter than the
// fastest time constant, times before the step, and a sink held at ambient.

const BARE = { caseToSinkKPerW: 0, sinkToAmbientKPerW: 0, sinkHeatCapacityJPerK: 0 };
const LADDER = [
  { rKPerW: 0.3, cJPerK: 0.01 },
  { rKPerW: 0.4, cJPerK: 0.2 },
];

describe('ThermalNetwork.fromCauer: input checks', () => {
  it('rejects an empty ladder and a stage without positive R and C, naming the stage and values', () => {
    expect(() => ThermalNetwork.fromCauer([], BARE)).toThrow(new RangeError('ThermalNetwork: the Cauer ladder is empty'));
    for (const bad of [
      { rKPerW: 0, cJPerK: 1 },
      { rKPerW: -1, cJPerK: 1 },
      { rKPerW: Number.NaN, cJPerK: 1 },
      { rKPerW: 1, cJPerK: 0 },
      { rKPerW: 1, cJPerK: Number.NaN },
    ]) {
      expect(() => ThermalNetwork.fromCauer([LADDER[0], bad], BARE)).toThrow(
        new RangeError(`ThermalNetwork: Cauer stage 1 needs R > 0 and C > 0, got ${bad.rKPerW} K/W, ${bad.cJPerK} J/K`),
      );
    }
  });

  it('rejects a negative, infinite or missing external element, naming it', () => {
    for (const k of ['caseToSinkKPerW', 'sinkToAmbientKPerW', 'sinkHeatCapacityJPerK'] as const) {
      for (const v of [-1, Infinity, Number.NaN, undefined]) {
        expect(() => ThermalNetwork.fromCauer(LADDER, { ...BARE, [k]: v as number })).toThrow(
          new RangeError(`ThermalNetwork: ${k} must be a finite number ≥ 0, got ${String(v)}`),
        );
      }
      // 0 is allowed for each of them.
      expect(ThermalNetwork.fromCauer(LADDER, { ...BARE, sinkToAmbientKPerW: 1, [k]: 0 }).totalRKPerW).toBeGreaterThan(0);
    }
  });

  it('rejects node rises of the wrong length, naming both lengths', () => {
    const net = ThermalNetwork.fromCauer(LADDER, BARE);
    expect(() => net.stateFromNodeRisesK([1, 2, 3])).toThrow(new RangeError('ThermalNetwork: node rises need length 2, got 3'));
  });
});

describe('ThermalNetwork: a sink held at ambient', () => {
  it('leaves a sink with heat capacity but R_sa = 0 out of the state, with only finite time constants', () => {
    // R_sa = 0 ties the sink to ambient: the network is the ladder plus R_cs to ambient, two nodes,
    // and its Foster equivalent has the ladder's two time constants and ΣR = 0.3 + 0.4 + 0.5 K/W
    // (series resistances add).
    const net = ThermalNetwork.fromCauer(LADDER, { caseToSinkKPerW: 0.5, sinkToAmbientKPerW: 0, sinkHeatCapacityJPerK: 100 });
    expect(net.hasSinkNode).toBe(false);
    expect(net.nodeCount).toBe(2);
    const f = net.fosterEquivalent();
    expect(f).toHaveLength(2);
    for (const s of f) expect(Number.isFinite(s.tauS) && s.tauS > 0).toBe(true);
    // The same path written without the sink's capacity gives the same Foster set: tolerance 1e-12
    // relative (round-off of the eigen-decomposition).
    const plain = ThermalNetwork.fromCauer(LADDER, { caseToSinkKPerW: 0.5, sinkToAmbientKPerW: 0, sinkHeatCapacityJPerK: 0 }).fosterEquivalent();
    f.forEach((s, k) => {
      expect(Math.abs(s.tauS / plain[k].tauS - 1)).toBeLessThan(1e-12);
      expect(Math.abs(s.rKPerW / plain[k].rKPerW - 1)).toBeLessThan(1e-12);
    });
    expect(Math.abs(f[0].rKPerW + f[1].rKPerW - 1.2)).toBeLessThan(1e-12);
  });

  it('has one junction weight per mode', () => {
    const net = ThermalNetwork.fromCauer(LADDER, { caseToSinkKPerW: 0.5, sinkToAmbientKPerW: 2, sinkHeatCapacityJPerK: 100 });
    expect(net.nodeCount).toBe(3);
    expect(net.junctionWeights).toHaveLength(3);
    expect(net.caseWeights).toHaveLength(3);
    expect(net.sinkWeights).toHaveLength(3);
  });
});

describe('ThermalNetwork: short and empty steps', () => {
  it('gives the identity update for a step of zero length', () => {
    // Δt = 0: decay 1, gain 0, the mean over the step is the starting rise itself and no rise per watt.
    const net = ThermalNetwork.fromCauer(LADDER, BARE);
    const x = net.createState();
    net.step(x, 100, 0.05);
    const c = net.coefficients(0);
    expect(Array.from(c.decay)).toEqual([1, 1]);
    expect(Array.from(c.gain)).toEqual([0, 0]);
    expect(c.meanRisePerW).toBe(0);
    expect(c.endRisePerW).toBe(0);
    expect(Array.from(c.meanFromState)).toEqual(Array.from(net.junctionWeights));
    expect(Math.abs(net.meanJunctionRiseK(x, 100, c) - net.junctionRiseK(x))).toBeLessThan(1e-12);
  });

  it('gives the mean rise per watt of steps far shorter than the time constant to full precision', () => {
    // One Foster cell R = 2 K/W, τ = 1 s. The mean over Δt of the step response R(1 − e^(−t/τ)) (closed
    // form of a first-order RC step), integrated here by Simpson's rule on 64 panels (its error,
    // ~z⁵/N⁴, is far below round-off for z = Δt/τ ≤ 1e-3). Tolerance 1e-12 relative: the written-out
    // 1 − (1 − e^(−z))/z loses ~1e-16/z of it to cancellation (2e-9 relative at z = 1e-7).
    const net = ThermalNetwork.fromPath({ foster: [{ rKPerW: 2, tauS: 1 }], ...BARE });
    const simpsonMean = (dtS: number) => {
      const n = 64;
      const h = dtS / n;
      let s = 0;
      for (let i = 0; i <= n; i++) s += (i === 0 || i === n ? 1 : i % 2 === 1 ? 4 : 2) * 2 * -Math.expm1(-i * h);
      return (s * h) / 3 / dtS;
    };
    for (const dtS of [9e-4, 5e-4, 1e-4, 1e-5, 1e-7]) {
      const got = net.coefficients(dtS).meanRisePerW;
      expect(Math.abs(got / simpsonMean(dtS) - 1)).toBeLessThan(1e-12);
    }
  });
});

describe('ThermalNetwork.zthKPerW before the step', () => {
  it('is 0 at and before the power step and for a time that is not a number', () => {
    const net = ThermalNetwork.fromCauer(LADDER, BARE);
    expect(net.zthKPerW(-1)).toBe(0);
    expect(net.zthKPerW(-1e-9)).toBe(0);
    expect(net.zthKPerW(0)).toBe(0);
    expect(net.zthKPerW(Number.NaN)).toBe(0);
    expect(Math.abs(net.zthKPerW(Infinity) - 0.7)).toBeLessThan(1e-12);
  });
});
