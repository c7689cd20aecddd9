import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import { moveItem, roundGapUpS } from '../../../shared/display/reorder.ts';
import { clampRange, panRange, zoomRange } from '../../../shared/display/time-range.ts';
import { heatColour, spectrogramGrid } from '../../../shared/display/heat.ts';
import { bindingWords, headroomRows, sliderRange } from '../../../shared/display/verdict.ts';
import type { LimitCheck } from '../../../shared/plan/evaluate.ts';

describe('moveItem', () => {
  it('moves one entry and keeps the rest in order', () => {
    expect(moveItem(['a', 'b', 'c'], 0, 2)).toEqual(['b', 'c', 'a']);
    expect(moveItem(['a', 'b', 'c'], 2, 0)).toEqual(['c', 'a', 'b']);
    expect(moveItem(['a', 'b'], 1, 5)).toEqual(['a', 'b']);
  });
  it('is a permutation (property)', () => {
    fc.assert(
      fc.property(fc.array(fc.integer(), { minLength: 1, maxLength: 20 }), fc.nat(25), fc.nat(25), (xs, f, t) => {
        const out = moveItem(xs, f, t);
        expect([...out].sort()).toEqual([...xs].sort());
      }),
    );
  });
  it('rounds an offered gap up to whole seconds', () => expect(roundGapUpS(12.01)).toBe(13));
});

describe('zoom and pan stay inside the clip', () => {
  it('zooms about the centre', () => expect(zoomRange({ fromS: 10, toS: 20 }, 0.5, 60)).toEqual({ fromS: 12.5, toS: 17.5 }));
  it('pans by a share of the span and stops at the ends', () => {
    expect(panRange({ fromS: 10, toS: 20 }, 0.5, 60)).toEqual({ fromS: 15, toS: 25 });
    expect(panRange({ fromS: 50, toS: 60 }, 0.5, 60)).toEqual({ fromS: 50, toS: 60 });
    expect(panRange({ fromS: 0, toS: 10 }, -1, 60)).toEqual({ fromS: 0, toS: 10 });
  });
  it('never leaves [0, duration] and never grows past it (property)', () => {
    fc.assert(
      fc.property(fc.double({ min: 0, max: 100, noNaN: true }), fc.double({ min: 0.01, max: 100, noNaN: true }), fc.double({ min: 0.1, max: 8, noNaN: true }), (a, span, factor) => {
        const d = 100;
        const r = zoomRange(clampRange({ fromS: a, toS: a + span }, d), factor, d);
        expect(r.fromS).toBeGreaterThanOrEqual(-1e-9);
        expect(r.toS).toBeLessThanOrEqual(d + 1e-9);
        expect(r.toS).toBeGreaterThan(r.fromS);
      }),
    );
  });
});

describe('the spectrogram heat map', () => {
  it('reads rows by time and drops 0 Hz', () => {
    const g = spectrogramGrid([0, 1], [0, 100, 200], [
      [-10, -20, -30],
      [-40, -50, -100],
    ])!;
    expect(g.freqs).toEqual([100, 200]);
    expect(g.highDb).toBe(-20);
    expect(g.level(0, 0)).toBeCloseTo(1, 12);
    expect(g.level(1, 1)).toBe(0); // −100 dB is 80 dB below −20 dB
  });
  it('lightness rises along the colour scale, so it reads without hue', () => {
    const luma = (l: number) => {
      const [r, g, b] = heatColour(l);
      return 0.2126 * r + 0.7152 * g + 0.0722 * b;
    };
    for (let l = 0.05; l <= 1; l += 0.05) expect(luma(l)).toBeGreaterThan(luma(l - 0.05));
  });
});

describe('the verdict in words', () => {
  const limits: LimitCheck[] = [
    { limit: 'junction-temperature', role: 'bridge', value: 85, allowed: 125, unit: 'C', headroom: 40, ok: true, atS: 12 },
    { limit: 'supply-current', role: null, value: 7, allowed: 6, unit: 'A', headroom: -1, ok: false, atS: 3 },
  ];
  it('temperature use is the rise over ambient against the allowed rise', () => {
    const rows = headroomRows(limits, 25);
    expect(rows[0].used).toBeCloseTo(60 / 100, 12);
    expect(rows[0].words).toBe('40.0 °C to spare');
    expect(rows[1].used).toBeCloseTo(7 / 6, 12);
    expect(rows[1].words).toBe('over by 1.00 A');
    expect(rows[1].ok).toBe(false);
  });
  it('names the binding limit and device', () => {
    const w = bindingWords({ binding: { limit: 'junction-temperature', label: 'junction temperature (pass)', role: 'pass', atS: 4, value: 125.1, allowed: 125, unit: 'C' }, advisedGainDb: 2, unsafeOnSilence: false });
    expect(w).toBe('The junction temperature of the pass transistor binds: 125.1 °C against its limit of 125.0 °C');
    expect(bindingWords({ binding: null, advisedGainDb: null, unsafeOnSilence: false })).toMatch(/No gain/);
  });
  it('the slider spans the advice and stays in the planner range', () => {
    expect(sliderRange(6)).toEqual({ minDb: -18, maxDb: 18, stepDb: 0.5 });
    expect(sliderRange(38).maxDb).toBe(40);
  });
});
