import { describe, expect, it } from 'vitest';
import { DEMO_DRIVER_BUCK, DEMO_DRIVER_LINEAR, DEMO_DRIVER_PULSE } from '../../../../shared/demo/drivers.ts';
import { solveElectrothermal, steadyJunctionC } from '../../../../shared/physics/driver/electrothermal.ts';
import { simulatePulses } from '../../../../shared/physics/driver/simulate-pulses.ts';
import { frameLossModel, simulateRail } from '../../../../shared/physics/driver/simulate-rail.ts';
import { ThermalNetwork } from '../../../../shared/physics/thermal/network.ts';
import type { DriverProfile } from '../../../../shared/schemas/driver.ts';

// The simulations' input checks (each message names the argument, the rule and the value), their
// warnings word for word at and past each limit, and their figures for an empty drive.

const COIL = { resonanceHz: 120e3, qualityFactor: 15 };
const clone = (p: DriverProfile): DriverProfile => structuredClone(p);
const rail = (m: number[], s?: number[]) => ({ frameS: 1e-3, meanV: Float64Array.from(m), meanSquareV2: Float64Array.from(s ?? m.map((v) => v * v)) });

describe('solveElectrothermal and steadyJunctionC at the runaway edge', () => {
  it('in runaway holds the loss at its Tj max value, and a loop gain of exactly 1 is runaway', () => {
    // a = 100 W, α = 0.01/K, h = 1 K/W: loop gain 1 (exact in float64). Loss a·(1 + α(150 − 25)) + b
    // = 100·2.25 + 5 = 230 W; mean junction free + h·p = 40 + 230 °C (hand values).
    expect(100 * 0.01 * 1).toBe(1);
    const s = solveElectrothermal(100, 5, 0.01, 40, 1, 150);
    expect(s).toEqual({ powerW: 230, meanJunctionC: 270, runaway: true });
    expect(steadyJunctionC(100, 0, 0.01, 1, 25)).toBe(Infinity);
    expect(steadyJunctionC(200, 0, 0.01, 1, 25)).toBe(Infinity);
  });

  it('does not call a mean junction exactly at Tj max a runaway', () => {
    // α = 0: p = b = 50 W, mean = 30 + 2·50 = 130 °C.
    expect(solveElectrothermal(0, 50, 0, 30, 2, 130)).toEqual({ powerW: 50, meanJunctionC: 130, runaway: false });
    expect(solveElectrothermal(0, 50, 0, 30, 2, 129.999).runaway).toBe(true);
  });
});

describe('simulateRail: input checks', () => {
  it('names the argument, the rule and the value', () => {
    const bad = (r: ReturnType<typeof rail>) => () => simulateRail(DEMO_DRIVER_LINEAR, COIL, r);
    for (const f of [0, -1e-3, Number.NaN, Infinity]) {
      expect(bad({ ...rail([1]), frameS: f })).toThrow(new RangeError(`simulateRail: rail.frameS must be finite and > 0, got ${f}`));
    }
    expect(bad({ ...rail([1, 2]), meanSquareV2: Float64Array.of(1) })).toThrow(
      new RangeError('simulateRail: rail.meanV and rail.meanSquareV2 differ in length (2 vs 1)'),
    );
    // Tolerance of the range checks: 1e-6·V_s = 48 µV.
    expect(bad(rail([-1e-4]))).toThrow(new RangeError('simulateRail: rail.meanV[0] must lie in 0…48 V, got -0.0001'));
    expect(bad(rail([48.0001]))).toThrow(/rail\.meanV\[0\] must lie in 0…48 V/);
    expect(bad(rail([1], [-1e-8]))).toThrow(new RangeError('simulateRail: rail.meanSquareV2[0] must lie in 0…2304 V², got -1e-8'));
    expect(bad(rail([1], [2304.01]))).toThrow(/rail\.meanSquareV2\[0\] must lie in 0…2304 V²/);
    expect(bad(rail([-2e-5, 48.00002], [-1e-9, 2304.001]))).not.toThrow();
    expect(() => simulateRail(DEMO_DRIVER_PULSE, COIL, rail([1]))).toThrow(new RangeError('simulateRail: the profile uses the pulse scheme; use simulatePulses'));
    const noPwm = clone(DEMO_DRIVER_BUCK);
    for (const f of [0, undefined]) {
      noPwm.pwmFrequencyHz = f;
      expect(() => simulateRail(noPwm, COIL, rail([1]))).toThrow(new RangeError('simulateRail: rail-switched needs pwmFrequencyHz > 0, got 0'));
    }
    expect(() => frameLossModel(DEMO_DRIVER_LINEAR, 'modulator', 120e3)).toThrow(new RangeError('frameLossModel: the profile has no modulator device'));
  });

  it('checks the coil, the ambient temperature, the initial states and the devices', () => {
    for (const q of [0, Number.NaN, Infinity]) {
      expect(() => simulateRail(DEMO_DRIVER_LINEAR, { resonanceHz: 1e5, qualityFactor: q }, rail([1]))).toThrow(
        new RangeError(`simulateRail: coil.qualityFactor must be finite and > 0, got ${q}`),
      );
    }
    expect(() => simulateRail(DEMO_DRIVER_LINEAR, COIL, rail([1]), { ambientC: Number.NaN })).toThrow(
      new RangeError('simulateRail: ambientC must be finite, got NaN'),
    );
    expect(() => simulateRail(DEMO_DRIVER_LINEAR, COIL, rail([1]), { initial: [] })).toThrow(
      new RangeError('simulateRail: opts.initial needs one state per device (2), got 0'),
    );
    const noPass = clone(DEMO_DRIVER_LINEAR);
    noPass.devices = noPass.devices.filter((d) => d.role !== 'pass');
    expect(() => simulateRail(noPass, COIL, rail([1]))).toThrow(
      new RangeError('simulateRail: the profile has no pass device (validate it with parseDriverProfile)'),
    );
  });
});

describe('simulateRail: warnings and figures', () => {
  it('has no warnings on a gentle drive, and names a device the scheme ignores', () => {
    expect(simulateRail(DEMO_DRIVER_LINEAR, COIL, rail([24, 24])).warnings).toEqual([]);
    const extra = clone(DEMO_DRIVER_LINEAR);
    extra.devices.push({ ...clone(DEMO_DRIVER_BUCK).devices.find((d) => d.role === 'modulator')! });
    expect(simulateRail(extra, COIL, rail([24])).warnings).toEqual(['profile: the modulator device is not used by the rail-linear scheme and was ignored.']);
  });

  it('warns when the frame-mean supply current passes the limit, at the first frame of its peak', () => {
    // Rail-linear: I = g·E[v] = (3 A/48 V)·48 V = 3 A at full rail (hand value).
    const d = clone(DEMO_DRIVER_LINEAR);
    d.supplyCurrentLimitA = 2;
    const sim = simulateRail(d, COIL, rail([24, 48, 48, 24]));
    expect(sim.supply.peakCurrentA).toBe(3);
    expect(sim.warnings).toContain('supply: frame-mean current reaches 3.00 A at 0.001 s, above the 2 A supply limit.');
    d.supplyCurrentLimitA = 3;
    expect(simulateRail(d, COIL, rail([24, 48, 48, 24])).warnings.filter((w) => w.startsWith('supply'))).toEqual([]);
  });

  it('warns when the bridge losses exceed the rail power, at the first such frame', () => {
    // A bridge with C_oss = 2 µF (10⁴ times the demo part's): its output-capacitance loss, which grows
    // with the rail voltage as the rail power g·v² does, is then above that power at every voltage.
    const leaky = clone(DEMO_DRIVER_LINEAR);
    leaky.devices[0].outputCapacitanceF = 2e-6;
    const text = (t: string) =>
      `bridge: the modelled bridge losses exceed the rail power (first at ${t} s): check the device figures (rise/fall times, C_oss) against the coil's resonance.`;
    expect(simulateRail(leaky, COIL, rail([10, 10, 0])).warnings).toContain(text('0.000'));
    expect(simulateRail(leaky, COIL, rail([0, 10, 10])).warnings).toContain(text('0.001'));
    expect(simulateRail(DEMO_DRIVER_LINEAR, COIL, rail([48, 24])).warnings).toEqual([]);
  });

  it('gives zeros for an empty rail and no traces unless asked', () => {
    const sim = simulateRail(DEMO_DRIVER_LINEAR, COIL, rail([]));
    expect(sim.supply.meanCurrentA).toBe(0);
    expect(sim.supply.peakCurrentA).toBe(0);
    const plain = simulateRail(DEMO_DRIVER_LINEAR, COIL, rail([24]));
    expect(plain.devices[0].traces).toBeUndefined();
    expect(plain.supply.currentA).toBeUndefined();
  });

  it('reads a mean square below E[v]² as E[v]² for the buck supply current too', () => {
    // A constant 24 V rail written with E[v²] = 0 must give the same figures as with E[v²] = 576 V².
    const a = simulateRail(DEMO_DRIVER_BUCK, COIL, rail([24, 24], [0, 0]));
    const b = simulateRail(DEMO_DRIVER_BUCK, COIL, rail([24, 24]));
    expect(a.supply.meanCurrentA).toBe(b.supply.meanCurrentA);
    expect(a.energy).toEqual(b.energy);
  });
});

const D = DEMO_DRIVER_PULSE;
const train = (start: number[], on: number[]) => ({ startS: Float64Array.from(start), onS: Float64Array.from(on) });

describe('simulatePulses: input checks', () => {
  it('names the argument, the rule and the value', () => {
    for (const dur of [0, -1, Number.NaN, Infinity]) {
      expect(() => simulatePulses(D, COIL, train([], []), dur)).toThrow(new RangeError(`simulatePulses: durationS must be finite and > 0, got ${dur}`));
    }
    expect(() => simulatePulses(D, COIL, train([0, 1], [1e-4]), 2)).toThrow(
      new RangeError('simulatePulses: pulses.startS and pulses.onS differ in length (2 vs 1)'),
    );
    expect(() => simulatePulses(D, COIL, train([0], [0]), 1)).toThrow(
      new RangeError('simulatePulses: pulse 0 needs a finite start and an on-time > 0, got start 0 s, on 0 s'),
    );
    expect(() => simulatePulses(D, COIL, train([0.5], [0.75]), 1)).toThrow(new RangeError('simulatePulses: pulse 0 ends at 1.25 s, after durationS 1 s'));
    // Within rounding of the end (1e-12 of a 10 s run) is allowed.
    expect(() => simulatePulses(D, COIL, train([9.9], [0.1 + 5e-12]), 10)).not.toThrow();
    for (const f of [0, Number.NaN, Infinity]) {
      expect(() => simulatePulses(D, COIL, train([], []), 1, { frameS: f })).toThrow(new RangeError(`simulatePulses: opts.frameS must be finite and > 0, got ${f}`));
    }
    expect(() => simulatePulses(DEMO_DRIVER_LINEAR, COIL, train([], []), 1)).toThrow(
      new RangeError('simulatePulses: the profile uses the rail-linear scheme; use simulateRail'),
    );
  });
});

describe('simulatePulses: limits and warnings word for word', () => {
  it('has no warnings for pulses exactly at the on-time and off-time limits, long enough to ring up', () => {
    // Demo limits 150 µs on, 1 ms off, 8 % duty; ring-up Q/(π·f0) = 39.8 µs; 12 A under the 20 A limit.
    const sim = simulatePulses(D, COIL, train([0.0002, 0.00135, 0.0025], [150e-6, 150e-6, 150e-6]), 0.01);
    expect(sim.warnings).toEqual([]);
  });

  it('words each limit it passes with the count and the limit', () => {
    const sim = simulatePulses(D, COIL, train([0, 0.0015, 0.002], [2e-4, 1e-4, 1e-4]), 0.004);
    expect(sim.warnings).toEqual([
      'pulses: 1 pulse(s) longer than the 150 µs maximum on-time.',
      'pulses: 1 gap(s) shorter than the 1000 µs minimum off-time.',
      'pulses: overall duty 10.00 % exceeds the 8.00 % maximum.',
    ]);
  });

  it('says when pulses are shorter than the ring-up time, and ignores limits a profile does not set', () => {
    const free = clone(D);
    delete free.pulse;
    const sim = simulatePulses(free, COIL, train([0, 0.0003], [2e-5, 3e-4]), 0.001);
    expect(sim.warnings).toEqual([
      "pulses: 1 of 2 pulse(s) are shorter than the tank's ring-up time Q/(π·f0) = 39.8 µs; their current stays below the full-supply figure used here (the loss estimate is conservative for them).",
    ]);
    expect(sim.pulse!.rfCyclesMin).toBeCloseTo(2.4, 9);
  });

  it('warns about the pulse current above the supply limit only when there are pulses', () => {
    const d = clone(D);
    d.supplyCurrentLimitA = 10;
    expect(simulatePulses(d, COIL, train([0], [1e-4]), 0.01).warnings).toEqual(['supply: the pulse current 12 A exceeds the 10 A supply limit.']);
    expect(simulatePulses(d, COIL, train([], []), 0.01).warnings).toEqual([]);
    d.supplyCurrentLimitA = 12;
    expect(simulatePulses(d, COIL, train([0], [1e-4]), 0.01).warnings).toEqual([]);
  });

  it('gives zeros for a run without pulses', () => {
    const sim = simulatePulses(D, COIL, train([], []), 0.01);
    expect(sim.supply.peakCurrentA).toBe(0);
    expect(sim.supply.meanCurrentA).toBe(0);
    expect(sim.pulse).toEqual({ count: 0, rfCyclesMin: 0, rfCyclesMean: 0, shorterThanRingUp: 0 });
    expect(sim.devices[0].traces).toBeUndefined();
  });
});

describe('simulatePulses: first frame and a pulse of exactly 1 s', () => {
  it('starts the first frame of the junction trace at the starting temperature', () => {
    // From a hot start without pulses the junction only cools: its maximum over frame 0 is the start.
    const warm = simulatePulses(D, COIL, train([0], [150e-6]), 150e-6);
    const sim = simulatePulses(D, COIL, train([], []), 0.01, { traces: true, initial: warm.finalState });
    const startC = 25 + ThermalNetwork.fromPath(D.devices[0].thermal).junctionRiseK(
      ThermalNetwork.fromPath(D.devices[0].thermal).stateFromNodeRisesK(warm.finalState[0]),
    );
    // Float32 trace: tolerance 1e-5 relative.
    expect(Math.abs(sim.devices[0].traces!.junctionC[0] / startC - 1)).toBeLessThan(1e-5);
    expect(startC).toBeGreaterThan(sim.devices[0].traces!.junctionC[1]);
  });

  it('reaches T_amb + P·Zth(1 s) at the end of a 1 s pulse from rest', () => {
    // Single-pulse use of the transient thermal impedance (NXP AN11261); P is the first pulse's loss,
    // the mean loss over the 2 s run times 2 (one pulse of 1 s). Tolerance 1e-9 relative.
    const sim = simulatePulses(D, COIL, train([0], [1]), 2);
    const p = sim.devices[0].meanLossW * 2;
    const net = ThermalNetwork.fromPath(D.devices[0].thermal);
    expect(Math.abs((sim.devices[0].peakJunctionC - 25) / (p * net.zthKPerW(1)) - 1)).toBeLessThan(1e-9);
  });
});

describe('simulatePulses: the frame-grid traces against runs that end at each frame', () => {
  it('gives per frame the peak junction, the end case and sink, the mean loss and current', () => {
    // 1 ms frames over 8.5 ms (a last frame of half length); one pulse straddles the 5 ms frame edge.
    // Reference: the same pulses cut at time t, simulated without traces up to t; its final state
    // gives the temperatures at t (the update is exact, so cutting changes nothing before t; the
    // demo IGBT's loss does not depend on temperature, so a cut pulse has the same power).
    const starts = [0.0005, 0.0031, 0.0049, 0.0062, 0.0081];
    const ons = [1e-4, 2e-4, 2e-4, 1.5e-4, 1e-4];
    const durS = 0.0085;
    const frameS = 1e-3;
    const sim = simulatePulses(D, COIL, train(starts, ons), durS, { traces: true, frameS });
    const tr = sim.devices[0].traces!;
    const net = ThermalNetwork.fromPath(D.devices[0].thermal);
    const at = (t: number) => {
      const s: number[] = [];
      const o: number[] = [];
      starts.forEach((st, i) => {
        if (st < t) {
          s.push(st);
          o.push(Math.min(ons[i], t - st));
        }
      });
      const x = net.stateFromNodeRisesK(simulatePulses(D, COIL, train(s, o), t).finalState[0]);
      return { j: 25 + net.junctionRiseK(x), c: 25 + net.caseRiseK(x), s: 25 + net.sinkRiseK(x) };
    };
    const powerW = (sim.devices[0].meanLossW * durS) / ons.reduce((a, b) => a + b, 0);
    expect(tr.junctionC).toHaveLength(9);
    for (let k = 0; k < 9; k++) {
      const t0 = k * frameS;
      const t1 = Math.min((k + 1) * frameS, durS);
      const times = [t1, ...starts.map((s, i) => s + ons[i]).filter((e) => e > t0 && e <= t1)];
      const peak = Math.max(...times.map((t) => at(t).j));
      const end = at(t1);
      let overlap = 0;
      starts.forEach((s, i) => (overlap += Math.max(0, Math.min(t1, s + ons[i]) - Math.max(t0, s))));
      // Float32 traces: tolerance 1e-5 relative (1e-6 W or A where the value is 0).
      expect(Math.abs(tr.junctionC[k] / peak - 1)).toBeLessThan(1e-5);
      expect(Math.abs(tr.caseC[k] / end.c - 1)).toBeLessThan(1e-5);
      expect(Math.abs(tr.sinkC[k] / end.s - 1)).toBeLessThan(1e-5);
      expect(Math.abs(tr.lossW[k] - (powerW * overlap) / (t1 - t0))).toBeLessThan(1e-5 * powerW);
      expect(Math.abs(sim.supply.currentA![k] - (12 * overlap) / (t1 - t0))).toBeLessThan(1e-5 * 12);
    }
  });
});
