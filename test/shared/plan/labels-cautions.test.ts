/**
 * Plain names of the limits (shared/plan/limit-labels.ts), the pulse duty cycle beside them
 * (shared/plan/duty-cycle.ts), and the cautions (shared/plan/cautions.ts).
 */
import { describe, expect, it } from 'vitest';
import { DEMO_DRIVER_LINEAR, DEMO_DRIVER_PULSE } from '../../../shared/demo/drivers.ts';
import { planCautions } from '../../../shared/plan/cautions.ts';
import { dutyCycleFigures } from '../../../shared/plan/duty-cycle.ts';
import { limitText, limitValueText } from '../../../shared/plan/limit-labels.ts';

describe('limit names', () => {
  it('say what a share counts', () => {
    expect(limitText({ limit: 'duty', role: null, value: 0.00123, allowed: 0.001, unit: 'share' })).toBe('pulses clamped by the duty limit: 0.123 % of pulses, allowed 0.100 %');
    expect(limitText({ limit: 'over-modulation', role: null, value: 0.0005, allowed: 0.001, unit: 'share' })).toBe('over-modulated time: 0.050 % of the time, allowed 0.100 %');
    expect(limitText({ limit: 'junction-temperature', role: 'pass', value: 71.25, allowed: 150, unit: 'C' })).toBe('junction temperature (pass): 71.3 °C, allowed 150.0 °C');
    expect(limitValueText(2.4, 'A')).toBe('2.40 A');
  });
});

describe('dutyCycleFigures', () => {
  it('gives the mean over the clip and the worst over one pulse period, by hand', () => {
    // Pulses at 0, 10 and 15 ms of 100, 200 and 400 µs over 20 ms: mean 700 µs / 20 ms = 3.5 %;
    // periods 10 and 5 ms: duties 200/10000 = 2 % and 400/5000 = 8 % (the worst, at 15 ms).
    const d = dutyCycleFigures({ startS: Float64Array.of(0, 0.01, 0.015), onS: Float64Array.of(1e-4, 2e-4, 4e-4), count: 3 }, 0.02, 0.08);
    expect(d.meanDuty).toBeCloseTo(0.035, 12);
    expect(d.worstDuty).toBeCloseTo(0.08, 12);
    expect(d.worstAtS).toBe(0.015);
    expect(d.maxDuty).toBe(0.08);
    expect(dutyCycleFigures({ startS: Float64Array.of(0), onS: Float64Array.of(1e-4), count: 1 }, 1, 0.1)).toMatchObject({ worstDuty: 0, worstAtS: null });
  });
});

describe('planCautions', () => {
  it('names the estimated figures with how to measure them, and leaves out what was measured', () => {
    const computed = planCautions({ resonanceMeasuredHz: null, qualityFactorMeasured: null, keepOutM: 1.04 }, DEMO_DRIVER_LINEAR);
    expect(computed.profile).toMatch(/only if the coil and driver profiles are right/);
    expect(computed.estimated.join('\n')).toMatch(/coil resonance: computed.*measure it/);
    expect(computed.estimated.join('\n')).toMatch(/coil Q: computed.*Q = π·f0·τ/);
    expect(computed.estimated.join('\n')).toMatch(/heat sinks \(bridge, pass\).*R = ΔT\/P/);
    expect(computed.keepOut).toMatch(/1\.04 m from the top load.*interlock.*emergency stop/);
    const measured = planCautions({ resonanceMeasuredHz: 318e3, qualityFactorMeasured: 45, keepOutM: null }, DEMO_DRIVER_PULSE);
    expect(measured.estimated.join('\n')).not.toMatch(/coil resonance|coil Q/);
    expect(measured.estimated.join('\n')).toMatch(/switch figures/);
    expect(measured.keepOut).toMatch(/^Keep everyone beyond the keep-out distance;/);
  });
});
