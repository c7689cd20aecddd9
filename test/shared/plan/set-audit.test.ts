import { describe, expect, it } from 'vitest';
import { simulatePulses } from '../../../shared/physics/driver/simulate-pulses.ts';
import { simulateRail } from '../../../shared/physics/driver/simulate-rail.ts';
import { evaluateAtGain, planSettings } from '../../../shared/plan/evaluate.ts';
import { planSet } from '../../../shared/plan/set.ts';
import { COIL, linearDriver, mosfet, planClip, pulseDriver, tone } from './fixtures.ts';

// Audit checks of a set against values the set code did not make: each item's start temperature
// from an independent idle run (one exact step of the thermal network over the whole gap, where
// the set idles on 0.1 s frames), and each item's peak as its hottest device's. Drivers with no
// Rds(on) temperature coefficient (fixtures.ts), so the idle loss is constant and the exact
// zero-order-hold update over one long step equals the sum of short ones: 1e-9 K is round-off.
// Ambient 40 °C, so a figure taken relative to 25 °C instead of the ambient shows up.

/** Bridge idles cool, the pass device idles at g·V_s²/4 = 36 W on 1.5 K/W: the pass device is hottest. */
const LINEAR = linearDriver(
  mosfet('bridge', { rKPerW: 1, tauS: 0.004, caseToSinkKPerW: 0.5, sinkToAmbientKPerW: 4, sinkHeatCapacityJPerK: 2 }, { rdsOnOhm: 0.5 }),
  mosfet('pass', { rKPerW: 0.5, tauS: 0.004, sinkToAmbientKPerW: 1, sinkHeatCapacityJPerK: 20 }),
);
/** Pulse bridge with a sink mass (1 J/K on 3 K/W): warms during a clip and cools in a gap. */
const PULSE = pulseDriver(
  mosfet('bridge', { rKPerW: 0.5, tauS: 0.01, caseToSinkKPerW: 0.2, sinkToAmbientKPerW: 3, sinkHeatCapacityJPerK: 1 }, { rdsOnOhm: 2 }),
);

describe('set audit: start temperatures from an independent idle run, peaks from the hottest device', () => {
  it('rail-linear at 40 °C: the second item starts where one exact idle step from the first end state puts it', () => {
    const s = planSettings(LINEAR, { ambientC: 40 });
    const clip = planClip('t', tone(1000, 0.5, 1));
    const gapS = 2.5;
    const set = planSet([{ clip, gapAfterS: gapS, gainDb: 0 }, { clip, gapAfterS: 0, gainDb: -3 }], COIL, LINEAR, s);
    // The first item from cold, outside the set code.
    const first = evaluateAtGain(clip, COIL, LINEAR, 0, s);
    const vs = LINEAR.supplyVoltageV;
    const gap = simulateRail(LINEAR, COIL, { frameS: gapS, meanV: Float64Array.of(vs / 2), meanSquareV2: Float64Array.of((vs * vs) / 4) }, { initial: first.sim.finalState, ambientC: 40 });
    const start = set.items[1].startJunctionC;
    expect(start.map((d) => d.role)).toEqual(['bridge', 'pass']);
    start.forEach((d, k) => expect(Math.abs(d.junctionC - (40 + gap.finalState[k][0]))).toBeLessThan(1e-9));
    // The first item starts at the 40 °C ambient, not at 25 °C.
    for (const d of set.items[0].startJunctionC) expect(d.junctionC).toBe(40);
    // Peak of each item = its hottest device's; here the pass device, hotter than the bridge.
    const second = evaluateAtGain(clip, COIL, LINEAR, -3, s, { initial: gap.finalState });
    set.items.forEach((it, i) => {
      const sim = i === 0 ? first.sim : second.sim;
      const peaks = sim.devices.map((d) => d.peakJunctionC);
      expect(Math.abs(it.peakJunctionC - Math.max(...peaks))).toBeLessThan(1e-9);
      expect(it.peakJunctionC).toBeGreaterThan(Math.min(...peaks) + 1);
      it.devices.forEach((d, k) => expect(Math.abs(d.peakJunctionC - peaks[k])).toBeLessThan(1e-9));
    });
  });

  it('pulse scheme: the idle gap makes no pulses, and the next start matches one exact idle step', () => {
    const s = planSettings(PULSE, { ambientC: 40 });
    const clip = planClip('p', tone(200, 0.5, 1), { pulses: true });
    const set = planSet([{ clip, gapAfterS: 1.7, gainDb: 0 }, { clip, gapAfterS: 0, gainDb: 0 }], COIL, PULSE, s);
    const first = evaluateAtGain(clip, COIL, PULSE, 0, s);
    const gap = simulatePulses(PULSE, COIL, { startS: new Float64Array(0), onS: new Float64Array(0) }, 1.7, { initial: first.sim.finalState, ambientC: 40 });
    const j = set.items[1].startJunctionC[0].junctionC;
    expect(Math.abs(j - (40 + gap.finalState[0][0]))).toBeLessThan(1e-9);
    // It cooled in the gap, but not all the way (τ_sink ≈ 3 s).
    expect(j).toBeLessThan(set.items[0].devices[0].endJunctionC - 0.5);
    expect(j).toBeGreaterThan(41);
    expect(set.items[0].devices[0].endJunctionC).toBeCloseTo(40 + first.sim.finalState[0][0], 9);
  });
});
