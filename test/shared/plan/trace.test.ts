import { describe, expect, it } from 'vitest';
import type { DriverSimulation } from '../../../shared/physics/driver/types.ts';
import { evaluateAtGain, planSettings } from '../../../shared/plan/evaluate.ts';
import { MAX_TRACE_ROWS, traceCsv } from '../../../shared/plan/trace.ts';
import { COIL, concat, linearDriver, mosfet, planClip, silence, tone } from './fixtures.ts';

const DRIVER = linearDriver(
  mosfet('bridge', { rKPerW: 1, tauS: 0.004, sinkToAmbientKPerW: 3 }, { rdsOnOhm: 1 }),
  mosfet('pass', { rKPerW: 0.5, tauS: 0.004, sinkToAmbientKPerW: 1 }),
);
// 100 ms: a burst, then silence, so the columns vary from frame to frame.
const CLIP = planClip('burst', concat(tone(1000, 0.5, 0.03), silence(0.04), tone(1000, 0.9, 0.03)));
const SIM = evaluateAtGain(CLIP, COIL, DRIVER, 0, planSettings(DRIVER), { traces: true }).sim;

const parse = (csv: string) => {
  expect(csv.endsWith('\n')).toBe(true);
  const [header, ...rows] = csv.trimEnd().split('\n');
  return { header: header.split(','), rows: rows.map((r) => r.split(',').map(Number)) };
};

/** A simulation holding only traces, for layouts the planner would take long to produce. */
function fakeSim(n: number): DriverSimulation {
  const lossW = Float32Array.from({ length: n }, (_, k) => (k * 7919) % 1000);
  const junctionC = Float32Array.from({ length: n }, (_, k) => 25 + ((k * 104729) % 997) / 10);
  return {
    devices: [{ role: 'bridge', count: 2, peakJunctionC: 0, peakAtS: 0, meanLossW: 0, timeAboveWarnS: 0, warnC: 125, runaway: null, traces: { lossW, junctionC, caseC: lossW, sinkC: lossW } }],
    supply: { peakCurrentA: 0, meanCurrentA: 0 },
    finalState: [],
    warnings: [],
    energy: { inputJ: 0, deliveredJ: 0, dissipatedJ: 0 },
  };
}

describe('traceCsv', () => {
  it('writes a header naming time, then loss and junction temperature per device, and one row per frame', () => {
    const { header, rows } = parse(traceCsv(SIM, CLIP.frames.frameS));
    expect(header).toEqual(['timeS', 'bridgeLossW', 'bridgeJunctionC', 'passLossW', 'passJunctionC']);
    expect(rows).toHaveLength(CLIP.frames.count);
    rows.forEach((r, k) => {
      expect(r).toHaveLength(5);
      expect(r[0]).toBeCloseTo(k * 0.001, 9);
      // Six significant digits (toPrecision(6)): 1e-5 relative.
      expect(Math.abs(r[1] - SIM.devices[0].traces!.lossW[k])).toBeLessThanOrEqual(1e-5 * Math.abs(r[1]));
      expect(Math.abs(r[4] - SIM.devices[1].traces!.junctionC[k])).toBeLessThanOrEqual(1e-5 * r[4]);
    });
  });

  it('decimates to maxRows rows, each keeping its group’s maximum and its first frame’s time', () => {
    const n = CLIP.frames.count; // 100 frames
    const maxRows = 7;
    const group = Math.ceil(n / maxRows); // 15 frames per row
    const { rows } = parse(traceCsv(SIM, CLIP.frames.frameS, maxRows));
    expect(rows.length).toBeLessThanOrEqual(maxRows);
    expect(rows).toHaveLength(Math.ceil(n / group));
    rows.forEach((r, i) => {
      const k0 = i * group;
      const k1 = Math.min(n, k0 + group);
      expect(r[0]).toBeCloseTo(k0 * 0.001, 9);
      SIM.devices.forEach((d, j) => {
        const loss = Math.max(...d.traces!.lossW.subarray(k0, k1));
        const tj = Math.max(...d.traces!.junctionC.subarray(k0, k1));
        expect(Math.abs(r[1 + 2 * j] - loss)).toBeLessThanOrEqual(1e-5 * Math.abs(loss));
        expect(Math.abs(r[2 + 2 * j] - tj)).toBeLessThanOrEqual(1e-5 * tj);
      });
    });
    // No peak is lost: the column maxima survive decimation.
    const full = parse(traceCsv(SIM, CLIP.frames.frameS)).rows;
    for (let c = 1; c < 5; c++) expect(Math.max(...rows.map((r) => r[c]))).toBe(Math.max(...full.map((r) => r[c])));
  });

  it(`stays within ${MAX_TRACE_ROWS} rows by default, times ascending`, () => {
    const n = MAX_TRACE_ROWS + 1; // one frame too many: groups of two
    const { rows } = parse(traceCsv(fakeSim(n), 0.001));
    expect(rows.length).toBeLessThanOrEqual(MAX_TRACE_ROWS);
    expect(rows).toHaveLength(Math.ceil(n / 2));
    let ascending = true;
    for (let i = 1; i < rows.length; i++) ascending &&= rows[i][0] > rows[i - 1][0];
    expect(ascending).toBe(true);
    expect(rows[rows.length - 1][0]).toBeCloseTo(((rows.length - 1) * 2) / 1000, 6);
  });

  it('refuses a simulation run without traces', () => {
    const sim = evaluateAtGain(CLIP, COIL, DRIVER, 0, planSettings(DRIVER)).sim;
    expect(() => traceCsv(sim, 0.001)).toThrow(/without traces/);
  });
});
