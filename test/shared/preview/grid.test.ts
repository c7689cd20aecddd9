/**
 * The display grid of the modulation preview as the command line carries it (shared/preview/grid.ts)
 * against values computed by hand for a four-frame signal, its CSV, and the block-character chart.
 */
import { describe, expect, it } from 'vitest';
import { DEMO_DRIVER_LINEAR, DEMO_DRIVER_PULSE } from '../../../shared/demo/drivers.ts';
import { computeFrameStats } from '../../../shared/dsp/frame-stats.ts';
import { magnitudeHistogram } from '../../../shared/dsp/histogram.ts';
import type { PlanClip } from '../../../shared/plan/evaluate.ts';
import { blockRow, gridChart, gridCsv, modulationGrid } from '../../../shared/preview/grid.ts';
import { modulationPreview } from '../../../shared/preview/modulation.ts';

const FS = 8000;
/** Four 1 ms frames of 8 samples: silence, a constant 0.5, full-scale ±1 alternating, a constant 0.25. */
const frames = [Array(8).fill(0), Array(8).fill(0.5), Array.from({ length: 8 }, (_, i) => (i % 2 ? -1 : 1)), Array(8).fill(0.25)];
const x = Float32Array.from(frames.flat());
const clip: PlanClip = { name: 'hand', durationS: x.length / FS, frames: computeFrameStats(x, FS, { frameS: 0.001 }), histogram: magnitudeHistogram(x) };
/** 40 V supply, 2 A at full rail: v = 20·(1 + x) V, P = E[v²]·(2 A / 40 V) = E[v²]/20 W. */
const DRIVER = { ...DEMO_DRIVER_LINEAR, supplyVoltageV: 40, fullRailCurrentA: 2 };

describe('modulationGrid', () => {
  // By hand, at 0 dB, two columns of two frames:
  //   frame 0: v = 20 V, P = 400/20 = 20 W;     frame 1: v = 30 V, P = 900/20 = 45 W
  //   frame 2: v = 0 or 40 V, E[v²] = 800, P = 40 W;  frame 3: v = 25 V, P = 625/20 = 31.25 W
  // column 0: rail 20…30 V, power mean 32.5 W, highest 45 W; column 1: rail 0…40 V, mean 35.625 W, highest 40 W.
  const g = modulationGrid(modulationPreview(clip, DRIVER, 0, { maxColumns: 2 }));

  it('carries per column the rail extremes and the power, each array named with its unit', () => {
    expect(g.columns).toBe(2);
    expect(g.columnS).toBeCloseTo(0.002, 12);
    expect(g.timeS).toEqual([0, 0.002]);
    // Float32 storage: 1e-5 relative.
    const close = (a: number[] | null, b: number[]) => b.forEach((v, j) => expect(a![j]).toBeCloseTo(v, 4));
    close(g.railMinV, [20, 0]);
    close(g.railMaxV, [30, 40]);
    close(g.powerMeanW, [32.5, 35.625]);
    close(g.powerMaxW, [45, 40]);
    expect(g.pulseCount).toBeNull();
    expect(g.maxOnTimeS).toBeNull();
  });

  it('writes the same grid as CSV, one row per column', () => {
    expect(gridCsv(g)).toBe('timeS,railMinV,railMaxV,powerMeanW,powerMaxW\n0,20,30,32.5,45\n0.002,0,40,35.625,40\n');
  });
});

describe('modulationGrid, pulse scheme', () => {
  it('carries per column the pulse count, the longest on-time and the power, as computed by hand', () => {
    // Three pulse instants at 0.5, 1.2 and 3.1 ms with levels 0.5, 1 and 0.25; at 0 dB the on-time is
    // 100 µs × level: 50, 100 and 25 µs (no limit binds: no off-time, duty up to 1, and a 1 µs minimum
    // on-time). 100 V × 10 A = 1 kW full power.
    const driver = { ...DEMO_DRIVER_PULSE, supplyVoltageV: 100, fullRailCurrentA: 10, pulse: { maxOnTimeS: 100e-6, minOffTimeS: 0, maxDuty: 1, minOnTimeS: 1e-6 } };
    const pulsed: PlanClip = {
      ...clip,
      pulseEvents: { mode: 'zero-crossing', timeS: Float64Array.of(0.0005, 0.0012, 0.0031), level: Float32Array.of(0.5, 1, 0.25), durationS: clip.durationS },
    };
    const g = modulationGrid(modulationPreview(pulsed, driver, 0, { maxColumns: 2, resonanceHz: 300e3 }));
    // column 0 (0…2 ms): 2 pulses, longest 100 µs, mean power (150 µs / 2 ms)·1000 W = 75 W;
    // column 1 (2…4 ms): 1 pulse of 25 µs, mean (25 µs / 2 ms)·1000 W = 12.5 W; highest: 1000 W while a pulse is on.
    expect(g.pulseCount).toEqual([2, 1]);
    g.maxOnTimeS!.forEach((v, j) => expect(v).toBeCloseTo([100e-6, 25e-6][j], 10));
    g.powerMeanW.forEach((v, j) => expect(v).toBeCloseTo([75, 12.5][j], 3));
    expect(g.powerMaxW).toEqual([1000, 1000]);
    expect(g.railMinV).toBeNull();
    expect(gridCsv(g).split('\n')[0]).toBe('timeS,pulseCount,maxOnTimeS,powerMeanW,powerMaxW');
  });
});

describe('the text chart', () => {
  it('draws each value as one of eight block heights, keeping the extremes when it narrows the grid', () => {
    expect(blockRow([0, 1, 2, 4, 8], 5, 8)).toBe(' ▁▂▄█');
    // Two cells over four values: each takes its larger (or, for a lowest row, its smaller) value.
    expect(blockRow([0, 8, 4, 2], 2, 8)).toBe('█▄');
    expect(blockRow([0, 8, 4, 2], 2, 8, true)).toBe(' ▂');
  });

  it('labels each row with its quantity and scale', () => {
    const g = modulationGrid(modulationPreview(clip, DRIVER, 0, { maxColumns: 2 }));
    const rows = gridChart(g, { width: 40, supplyV: 40, fullPowerW: 80, durationS: clip.durationS });
    expect(rows[0]).toMatch(/rail highest \(0…40 V\)\s+│▆█│/);
    expect(rows[1]).toMatch(/rail lowest \(0…40 V\)\s+│▄ │/);
    expect(rows[2]).toMatch(/power mean \(0…80 W\)\s+│▃▄│/);
  });
});
