import { describe, expect, it } from 'vitest';
import { DEMO_DRIVER_LINEAR, DEMO_DRIVER_PULSE } from '../../../../shared/demo/drivers.ts';
import { bridgeLossParts, totalLossW } from '../../../../shared/physics/driver/losses.ts';
import { simulatePulses } from '../../../../shared/physics/driver/simulate-pulses.ts';
import { fosterPeriodicPeakKPerW } from '../../../../shared/physics/thermal/foster.ts';
import { ThermalNetwork } from '../../../../shared/physics/thermal/network.ts';
import type { DriverProfile } from '../../../../shared/schemas/driver.ts';
import { PULSE_COIL, pulseLossW } from './pulse-fixtures.ts';

const COIL = PULSE_COIL;
const D = DEMO_DRIVER_PULSE;
const clone = (p: DriverProfile): DriverProfile => structuredClone(p);
const train = (n: number, periodS: number, onS: number, t0 = 0) => ({
  startS: Float64Array.from({ length: n }, (_, i) => t0 + i * periodS),
  onS: new Float64Array(n).fill(onS),
});

describe('simulatePulses: thermal response', () => {
  it('gives T_amb + P·Zth(t_on) for a single pulse from rest, at the pulse end', () => {
    // Single-pulse use of the transient thermal impedance (NXP AN11261). Demo IGBT loss during the
    // pulse: 11.4 + 47.05 + 0.92 ≈ 59.4 W (hand calculation in losses.test.ts). Tolerance 1e-9 K.
    const sim = simulatePulses(D, COIL, train(1, 1, 150e-6, 0.01), 0.1);
    const net = ThermalNetwork.fromPath(D.devices[0].thermal);
    const p = pulseLossW();
    expect(p).toBeGreaterThan(59);
    expect(p).toBeLessThan(60);
    expect(Math.abs(sim.devices[0].peakJunctionC - (25 + p * net.zthKPerW(150e-6)))).toBeLessThan(1e-9);
    expect(sim.devices[0].peakAtS).toBeCloseTo(0.01015, 12);
  });

  it('reaches the exact periodic steady peak under a long pulse train', () => {
    // ΔT/P = Σ Rᵢ(1 − e^(−tp/τᵢ))/(1 − e^(−T/τᵢ)) over the network's Foster equivalent (superposed
    // single-pulse responses of NXP AN11261's Foster model, a geometric series per cell [calc]). A light sink
    // (2 J/K, τ ≈ 3 s) lets 60 s (20 τ) reach the periodic state: transient e^-20 → tolerance 1e-6.
    const d = clone(D);
    d.devices[0].thermal.sinkHeatCapacityJPerK = 2;
    const sim = simulatePulses(d, COIL, train(30000, 2e-3, 100e-6), 60);
    const net = ThermalNetwork.fromPath(d.devices[0].thermal);
    const want = 25 + pulseLossW(d) * fosterPeriodicPeakKPerW(net.fosterEquivalent(), 100e-6, 2e-3);
    expect(Math.abs(sim.devices[0].peakJunctionC / want - 1)).toBeLessThan(1e-6);
  });

  it('keeps per-pulse peaks in the frame-grid traces (frame maximum, not frame average)', () => {
    // Pulses of 100 µs every 10 ms, 1 ms frames: the frame holding a pulse end reports that end's
    // temperature; the case/sink traces are frame-end values and lie below it. Float32: 1e-6 relative.
    const sim = simulatePulses(D, COIL, train(5, 0.01, 100e-6, 0.0005), 0.05, { traces: true });
    const tr = sim.devices[0].traces!;
    expect(tr.junctionC).toHaveLength(50);
    const net = ThermalNetwork.fromPath(D.devices[0].thermal);
    expect(Math.abs(tr.junctionC[0] / (25 + pulseLossW() * net.zthKPerW(100e-6)) - 1)).toBeLessThan(1e-6);
    expect(Math.abs(Math.max(...tr.junctionC) / sim.devices[0].peakJunctionC - 1)).toBeLessThan(1e-6);
    expect(tr.junctionC[0]).toBeGreaterThan(tr.junctionC[1] + 1); // the pulse frame stands out
    expect(tr.caseC[0]).toBeLessThan(tr.junctionC[0]);
    // Frame-mean loss: 100 µs of P in a 1 ms frame.
    expect(Math.abs(tr.lossW[0] / (pulseLossW() * 0.1) - 1)).toBeLessThan(1e-6);
    expect(tr.lossW[1]).toBe(0);
    expect(Math.abs(sim.supply.currentA![0] - 12 * 0.1)).toBeLessThan(1e-6);
  });

  it('gives the same final state with and without traces (exact update over split intervals)', () => {
    const p = { startS: Float64Array.of(0.0003, 0.0021, 0.0105, 0.0111), onS: Float64Array.of(1.2e-4, 9e-5, 1.5e-4, 3e-5) };
    const a = simulatePulses(D, COIL, p, 0.02);
    const b = simulatePulses(D, COIL, p, 0.02, { traces: true, frameS: 7e-4 });
    a.finalState[0].forEach((v, k) => expect(Math.abs(v - b.finalState[0][k])).toBeLessThan(1e-12 * Math.max(1, Math.abs(v))));
    expect(Math.abs(a.devices[0].peakJunctionC - b.devices[0].peakJunctionC)).toBeLessThan(1e-12);
    expect(b.devices[0].traces!.junctionC).toHaveLength(29);
  });

  it('lets a MOSFET bridge heat its own loss up through Rds(on)(Tj)', () => {
    // Positive temperature coefficient of R_ds(on) (Baliga 2008, ch. 6 [recalled]): later pulses dissipate more than the first.
    const d = clone(DEMO_DRIVER_LINEAR);
    d.scheme = 'pulse';
    d.pulse = { maxOnTimeS: 1e-3, minOffTimeS: 1e-4, maxDuty: 0.5 };
    const pts = train(2000, 1e-3, 4e-4);
    const sim = simulatePulses(d, { resonanceHz: 300e3, qualityFactor: 20 }, pts, 2);
    const parts = bridgeLossParts(d.devices[0], d.topology, 300e3, { meanCurrentA: 3, meanSquareCurrentA2: 9, meanPowerW: 144, meanSquareV2: 2304 });
    const atAmbient = totalLossW(parts, 0.007, 25) * 0.4; // duty 40 %
    expect(sim.devices[0].meanLossW).toBeGreaterThan(atAmbient);
    expect(sim.warnings.some((w) => w.includes('pass device is not used'))).toBe(true);
  });
});

describe('simulatePulses: bookkeeping and warnings', () => {
  it('balances energy and counts RF cycles, ring-up and supply figures', () => {
    // Input V_s·I·Σt_on; dissipated 4 switches × P·Σt_on (IGBT: constant P). Ring-up τ = Q/(π f0) =
    // 15/(π·120 kHz) = 39.8 µs; RF cycles = t_on·f0. Tolerances 1e-12 relative (sums).
    const on = Float64Array.of(30e-6, 100e-6, 150e-6, 20e-6);
    const pts = { startS: Float64Array.of(0.001, 0.003, 0.005, 0.007), onS: on };
    const sim = simulatePulses(D, COIL, pts, 0.01);
    const sumOn = 300e-6;
    expect(Math.abs(sim.energy.inputJ / (320 * 12 * sumOn) - 1)).toBeLessThan(1e-12);
    expect(Math.abs(sim.energy.dissipatedJ / (4 * pulseLossW() * sumOn) - 1)).toBeLessThan(1e-12);
    expect(Math.abs((sim.energy.deliveredJ + sim.energy.dissipatedJ) / sim.energy.inputJ - 1)).toBeLessThan(1e-12);
    expect(Math.abs(sim.devices[0].meanLossW / ((pulseLossW() * sumOn) / 0.01) - 1)).toBeLessThan(1e-12);
    expect(sim.pulse).toEqual({ count: 4, rfCyclesMin: expect.closeTo(2.4, 9), rfCyclesMean: expect.closeTo(9, 9), shorterThanRingUp: 2 });
    expect(sim.warnings.some((w) => w.includes('ring-up') && w.includes('39.8 µs'))).toBe(true);
    expect(sim.supply.peakCurrentA).toBe(12);
    expect(Math.abs(sim.supply.meanCurrentA - (12 * sumOn) / 0.01)).toBeLessThan(1e-12);
  });

  it("warns about pulses beyond the profile's on-time, off-time and duty limits", () => {
    // Demo limits: 150 µs on, 1 ms off, 8 % duty.
    const pts = { startS: Float64Array.of(0, 0.0015, 0.002), onS: Float64Array.of(2e-4, 1e-4, 1e-4) };
    const sim = simulatePulses(D, COIL, pts, 0.004);
    expect(sim.warnings.some((w) => w.includes('1 pulse(s) longer'))).toBe(true);
    expect(sim.warnings.some((w) => w.includes('1 gap(s) shorter'))).toBe(true);
    expect(sim.warnings.some((w) => w.includes('overall duty 10.00 %'))).toBe(true);
  });

  it('rejects overlapping pulses, pulses past the end and rail-scheme profiles', () => {
    const bad = { startS: Float64Array.of(0, 5e-5), onS: Float64Array.of(1e-4, 1e-4) };
    expect(() => simulatePulses(D, COIL, bad, 1)).toThrow(/before the previous pulse ends/);
    expect(() => simulatePulses(D, COIL, train(1, 1, 1e-4, 0.99995), 1)).toThrow(/after durationS/);
    expect(() => simulatePulses(DEMO_DRIVER_LINEAR, COIL, train(1, 1, 1e-4), 1)).toThrow(/simulateRail/);
    expect(() => simulatePulses(D, COIL, { startS: Float64Array.of(0), onS: Float64Array.of(0) }, 1)).toThrow(RangeError);
  });
});
