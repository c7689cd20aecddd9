/**
 * The pulse scheme's frame grid at its edges: a clip whose length exceeds a whole number of frames
 * by a rounding sliver, and pieces that fall just short of a whole frame. The grid is bookkeeping
 * only: it must neither lose energy nor change the thermal state the run reaches.
 */
import { describe, expect, it } from 'vitest';
import { DEMO_DRIVER_PULSE } from '../../../../shared/demo/drivers.ts';
import { simulatePulses } from '../../../../shared/physics/driver/simulate-pulses.ts';
import { PULSE_COIL, pulseLossW } from './pulse-fixtures.ts';

const COIL = PULSE_COIL;
const D = DEMO_DRIVER_PULSE;
const FRAME_S = 1e-3;
const PULSE_LOSS_W = pulseLossW();

describe('simulatePulses: the frame grid at its edges', () => {
  it('counts a pulse in the sliver past the last whole frame in the last frame', () => {
    // 5 frames and 5e-10 of a frame: within the grid's rounding tolerance (1e-9 of a frame), so
    // there are 5 frames and the last one runs to the end. A pulse of 0.3 ps inside that sliver
    // must appear in frame 4's mean loss and mean supply current (energy conservation: the trace
    // times the frame length sums to P·t_on). 1e-5 relative: the pulse's length is a difference of
    // two times near 5 ms, whose float64 spacing (8.7e-19 s) is ~3e-6 of 0.3 ps.
    const durationS = 5 * FRAME_S + 5e-13;
    const onS = 3e-13;
    const pulses = { startS: Float64Array.of(5 * FRAME_S + 1e-13), onS: Float64Array.of(onS) };
    const sim = simulatePulses(D, COIL, pulses, durationS, { traces: true });
    const tr = sim.devices[0].traces!;
    expect(tr.lossW).toHaveLength(5);
    expect(Array.from(tr.lossW.subarray(0, 4))).toEqual([0, 0, 0, 0]);
    expect(Math.abs(tr.lossW[4] / ((PULSE_LOSS_W * onS) / FRAME_S) - 1)).toBeLessThan(1e-5);
    expect(Math.abs(sim.supply.currentA![4] / ((D.fullRailCurrentA * onS) / FRAME_S) - 1)).toBeLessThan(1e-5);
  });

  it('runs a pulse that crosses into the sliver to the end of the clip', () => {
    // A pulse from the middle of the last whole frame to the end of the sliver: one piece in frame 4
    // of 0.5 ms + 5e-13 s.
    const durationS = 5 * FRAME_S + 5e-13;
    const startS = 4.5 * FRAME_S;
    const onS = durationS - startS;
    const pulses = { startS: Float64Array.of(startS), onS: Float64Array.of(onS) };
    const traced = simulatePulses(D, COIL, pulses, durationS, { traces: true });
    const plain = simulatePulses(D, COIL, pulses, durationS);
    const tr = traced.devices[0].traces!;
    expect(Math.abs(tr.lossW[4] / ((PULSE_LOSS_W * onS) / FRAME_S) - 1)).toBeLessThan(1e-6);
    traced.finalState[0].forEach((v, k) => expect(Math.abs(v - plain.finalState[0][k])).toBeLessThan(1e-12 * Math.max(1, Math.abs(v))));
  });

  it('reaches the same state as a run without traces when pulses end just short of frame ends', () => {
    // Pieces 0.5 ns shorter than a whole frame: the traced run must step them by their own length
    // (a whole frame's coefficients would heat the junction for 0.5 ns too long, ~1e-5 K here),
    // so its final state and peak equal those of the untraced run, which steps each pulse whole.
    const shortS = 5e-10;
    const pulses = {
      startS: Float64Array.of(0, 2 * FRAME_S, 5 * FRAME_S),
      onS: Float64Array.of(FRAME_S - shortS, FRAME_S - shortS, FRAME_S - shortS),
    };
    const durationS = 8 * FRAME_S;
    const traced = simulatePulses(D, COIL, pulses, durationS, { traces: true });
    const plain = simulatePulses(D, COIL, pulses, durationS);
    expect(Math.abs(traced.devices[0].peakJunctionC - plain.devices[0].peakJunctionC)).toBeLessThan(1e-9);
    traced.finalState[0].forEach((v, k) => expect(Math.abs(v - plain.finalState[0][k])).toBeLessThan(1e-9));
    // and the peak is a real one: a millisecond of ~59 W lifts the junction well above ambient
    expect(plain.devices[0].peakJunctionC).toBeGreaterThan(30);
  });
});
