import { describe, expect, it } from 'vitest';
import { DEMO_COIL_NAMES, DEMO_COILS } from '../../../../shared/demo/coils.ts';
import { analyzeCoil } from '../../../../shared/physics/coil/analyze.ts';
import { parseCoilProfile } from '../../../../shared/schemas/coil.ts';

describe('demo coils (shared/demo/coils.ts)', () => {
  it.each(DEMO_COIL_NAMES)('%s is a valid profile that analyses to plausible figures', (name) => {
    const p = DEMO_COILS[name];
    expect(parseCoilProfile(p)).toEqual(p);
    expect(p.name).toBe(name);
    const r = analyzeCoil(p);
    // Plausibility ranges for small solid-state coils (common practice): tens to hundreds of kHz,
    // mH-range secondaries, loose coupling, Q of tens to hundreds.
    expect(r.resonanceHz).toBeGreaterThan(100e3);
    expect(r.resonanceHz).toBeLessThan(1.5e6);
    expect(r.secondary.inductanceH).toBeGreaterThan(1e-3);
    expect(r.secondary.inductanceH).toBeLessThan(100e-3);
    expect(r.couplingK).toBeGreaterThan(0.05);
    expect(r.couplingK).toBeLessThan(0.5);
    expect(r.qualityFactor).toBeGreaterThan(20);
    expect(r.qualityFactor).toBeLessThan(2000);
  });

  it('has a small, a desk-size and a larger coil, in order of resonance', () => {
    const f = (n: string): number => analyzeCoil(DEMO_COILS[n]).resonanceHz;
    expect(f('pocket-spark')).toBeGreaterThan(f('desk-lantern'));
    expect(f('desk-lantern')).toBeGreaterThan(f('bench-tower'));
  });
});
