// The tank primary (shared/physics/coil/tank.ts) and its profile fields (shared/schemas/coil.ts).
import { describe, expect, it } from 'vitest';
import { InputError } from '../../../../shared/errors.ts';
import { analyzeCoil } from '../../../../shared/physics/coil/analyze.ts';
import { resonanceHz } from '../../../../shared/physics/coil/resonance.ts';
import { tankTuningCapacitanceF } from '../../../../shared/physics/coil/tank.ts';
import { parseCoilProfile, type CoilProfile } from '../../../../shared/schemas/coil.ts';

/** An invented spark-gap coil: a larger secondary with an 8-turn primary tank. */
const gapCoil = (tank: Record<string, unknown>, lead?: number): CoilProfile =>
  parseCoilProfile({
    name: 'gap coil (invented)',
    secondary: { formDiameterM: 0.11, windingLengthM: 0.45, turns: 1100, wireDiameterM: 0.0004 },
    topLoad: { shape: 'torus', outerDiameterM: 0.3, tubeDiameterM: 0.075 },
    primary: { turns: 8, diameterM: 0.2, windingLengthM: 0.06, offsetM: 0, ...(lead === undefined ? {} : { leadInductanceH: lead }), tank },
  });

describe('tank primary', () => {
  it('tuning capacitance is 1/((2π·f0)²·L) and tunes the tank back to f0', () => {
    // Thomson's formula f = 1/(2π√(LC)) solved for C: 10 µH at 318 kHz → 1/((2π·318e3)²·10e-6) = 25.049 nF (hand value).
    expect(tankTuningCapacitanceF(318e3, 10e-6)).toBeCloseTo(25.049e-9, 12);
    // Round trip through the resonance formula, to rounding (1e-12 relative).
    for (const [f, l] of [[50e3, 40e-6], [318e3, 10e-6], [3.1e6, 0.8e-6]]) {
      expect(Math.abs(resonanceHz(l, tankTuningCapacitanceF(f, l)) / f - 1)).toBeLessThan(1e-12);
    }
  });

  it('reports the tuning capacitance with the leads, the fitted resonance and its ratio, and the spark-gap estimate', () => {
    const r = analyzeCoil(gapCoil({ capacitanceF: 20e-9, switching: 'spark-gap', supplyPeakV: 12700 }, 1e-6));
    const t = r.tank!;
    const lp = r.primary.inductanceH + 1e-6;
    expect(t.leadInductanceH).toBe(1e-6);
    expect(t.tankInductanceH).toBeCloseTo(lp, 15);
    // Against the formula written out (not the function under test): C = 1/((2π f0)² L_p).
    expect(Math.abs(t.tankTuningCapacitanceF * (2 * Math.PI * r.resonanceHz) ** 2 * lp - 1)).toBeLessThan(1e-12);
    // The primary's own resonance with 20 nF: f = 1/(2π√(L_p·C)).
    expect(Math.abs(t.primaryResonanceHz! - 1 / (2 * Math.PI * Math.sqrt(lp * 20e-9)))).toBeLessThan(1e-6);
    expect(t.primaryToSecondaryRatio).toBeCloseTo(t.primaryResonanceHz! / r.resonanceHz, 12);
    // Too little capacitance fitted: the primary rings high and the note says what to do.
    expect(t.primaryToSecondaryRatio!).toBeGreaterThan(1);
    expect(t.notes.join(' ')).toMatch(/above the secondary: fit more capacitance/);
    // Spark gap: 12.7 kV / 3 kV/mm = 4.233 mm (AMS Glossary of Meteorology, 3 MV/m), labelled as an estimate, with mains cautions.
    expect(t.sparkGap!.breakdownGapM).toBeCloseTo(12700 / 3e6, 12);
    expect(t.sparkGap!.basis).toMatch(/^Estimate/);
    expect(t.sparkGap!.tankEnergyJ).toBeCloseTo(0.5 * 20e-9 * 12700 ** 2, 9);
    expect(t.cautions.join(' ')).toMatch(/mains.*lethal.*bleed/);
    // Coupled, the tuned pair rings at f0/√(1 ± k).
    expect(t.coupledModesHz.lowerHz).toBeCloseTo(r.resonanceHz / Math.sqrt(1 + r.couplingK), 6);
    expect(t.coupledModesHz.upperHz).toBeCloseTo(r.resonanceHz / Math.sqrt(1 - r.couplingK), 6);
  });

  it('with no capacitor yet, no leads and solid-state switching: tuning only, leads 0, no gap or mains cautions', () => {
    const r = analyzeCoil(gapCoil({ capacitanceF: null, switching: 'solid-state' }));
    const t = r.tank!;
    expect(t.leadInductanceH).toBe(0);
    expect(t.fittedCapacitanceF).toBeNull();
    expect(t.primaryResonanceHz).toBeNull();
    expect(t.primaryToSecondaryRatio).toBeNull();
    expect(t.sparkGap).toBeNull();
    expect(t.cautions).toEqual([]);
    expect(Math.abs(t.tankTuningCapacitanceF * (2 * Math.PI * r.resonanceHz) ** 2 * r.primary.inductanceH - 1)).toBeLessThan(1e-12);
    // A profile without a tank has none.
    const plain = parseCoilProfile({ ...gapCoil({ capacitanceF: null, switching: 'solid-state' }), primary: { turns: 8, diameterM: 0.2, windingLengthM: 0.06, offsetM: 0 } });
    expect(analyzeCoil(plain).tank).toBeNull();
  });

  it('refuses bad tank fields naming the dotted field', () => {
    const cases: [Record<string, unknown>, number | undefined, string, RegExp][] = [
      [{ capacitanceF: -1, switching: 'spark-gap' }, undefined, 'primary.tank.capacitanceF', /at least 1e-12, got -1/],
      [{ capacitanceF: 1e-9, switching: 'rotary' }, undefined, 'primary.tank.switching', /./],
      [{ capacitanceF: 1e-9, switching: 'spark-gap', supplyPeakV: 0 }, undefined, 'primary.tank.supplyPeakV', /at least 1, got 0/],
      [{ switching: 'spark-gap' }, undefined, 'primary.tank.capacitanceF', /is missing/],
      [{ capacitanceF: 1e-9, switching: 'spark-gap' }, 0.01, 'primary.leadInductanceH', /at most 0\.0001, got 0\.01/],
    ];
    for (const [tank, lead, field, msg] of cases) {
      let err: unknown;
      try {
        gapCoil(tank, lead);
      } catch (e) {
        err = e;
      }
      expect(err, field).toBeInstanceOf(InputError);
      expect((err as InputError).field, field).toBe(field);
      expect((err as InputError).message, field).toMatch(msg);
    }
  });
});
