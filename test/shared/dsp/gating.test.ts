import { describe, expect, it } from 'vitest';
import { energyMeanAbove, gate, loudnessLufs } from '../../../shared/dsp/gating.ts';

describe('gating helpers (ITU-R BS.1770-4 Annex 1 gating)', () => {
  it('averages energies, not dB values', () => {
    // 10·log10((10^-2 + 10^-3)/2) = −22.596 dB (BS.1770-4 Annex 1: energies are averaged), versus −25 for a dB average.
    const r = energyMeanAbove([-20, -30, -80], -70);
    expect(r.count).toBe(2);
    expect(r.meanLufs).toBeCloseTo(10 * Math.log10(0.0055), 12);
  });

  it('gates strictly above the thresholds', () => {
    // BS.1770-4 Annex 1: blocks with l_j > Γ; a block exactly at −70 LUFS does not count.
    expect(energyMeanAbove([-70, -70], -70).count).toBe(0);
    const g = gate([-23, -23, -40], -10);
    // Absolute mean 10·log10((2·10^-2.3 + 10^-4)/3) = −24.7178 → Γr = −34.7178; −40 is dropped.
    expect(g.relativeGateLufs).toBeCloseTo(-34.7178, 4);
    expect(g.meanLufs).toBeCloseTo(-23, 12);
    expect(g.count).toBe(2);
  });

  it('reports −Infinity when no block passes the absolute gate', () => {
    expect(gate([-Infinity, -80], -10)).toEqual({ relativeGateLufs: -Infinity, meanLufs: -Infinity, count: 0 });
  });

  it('keeps the absolute gate when the relative gate lies below it', () => {
    // Mean of {−62, −75} above −70 is −62 → Γr = −72 < −70: −75 must still stay out.
    expect(gate([-62, -75], -10).count).toBe(1);
  });

  it('applies the −0.691 dB offset of the BS.1770-4 loudness formula', () => {
    expect(loudnessLufs(1)).toBeCloseTo(-0.691, 12);
    expect(loudnessLufs(0)).toBe(-Infinity);
  });
});
