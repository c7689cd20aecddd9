import { describe, expect, it } from 'vitest';
import { steadyJunctionC } from '../../../../shared/physics/driver/electrothermal.ts';
import { simulatePulses } from '../../../../shared/physics/driver/simulate-pulses.ts';
import { simulateRail } from '../../../../shared/physics/driver/simulate-rail.ts';
import { linearDriver, mosfet, pulseDriver } from '../../plan/fixtures.ts';

// The electrothermal loop away from 25 °C: R_ds(on) scales with 1 + α(Tj − 25) (the datasheet's
// reference temperature), while the thermal network rises above the AMBIENT. At 25 °C ambient the
// two offsets coincide and a mix-up cannot show; at 40 °C it moves the steady state by α·15 K of
// loss. Closed form of the steady state (fixed point of T = T_amb + R·(a(1 + α(T − 25)) + b)):
// T = (T_amb + R(a(1 − 25α) + b))/(1 − aαR) — here written out by hand, not by the code under test.

const G = 3 / 48;
const HALF_BRIDGE_K2 = (Math.PI / 2) ** 2; // per-switch I_rms² / I_s² of a half-bridge at resonance (Erickson & Maksimović §19.1)
const COIL = { resonanceHz: 300e3, qualityFactor: 30 };

describe('electrothermal loop at 40 °C ambient against the closed-form steady state', () => {
  it('rail scheme: a bridge held at full rail settles where the closed form says', () => {
    // R_ds(on) 0.5 Ω at 25 °C, α = 0.007/K; path 1 + 0.5 + 2 = 3.5 K/W with a 2 J/K sink (τ ≈ 5 s):
    // 300 one-second frames are > 50 τ, so the transient is gone to far below 1e-9 K.
    const alpha = 0.007;
    const d = linearDriver(
      mosfet('bridge', { rKPerW: 1, tauS: 0.004, caseToSinkKPerW: 0.5, sinkToAmbientKPerW: 2, sinkHeatCapacityJPerK: 2 }, { rdsOnOhm: 0.5, rdsOnTempCoeffPerK: alpha }),
      mosfet('pass', { rKPerW: 0.5, tauS: 0.004, sinkToAmbientKPerW: 1 }),
    );
    const n = 300;
    const vs = 48;
    const sim = simulateRail(d, COIL, { frameS: 1, meanV: new Float64Array(n).fill(vs), meanSquareV2: new Float64Array(n).fill(vs * vs) }, { ambientC: 40 });
    const a = 0.5 * HALF_BRIDGE_K2 * G * G * vs * vs; // I²R at 25 °C, W
    const R = 3.5;
    const hand = (40 + R * a * (1 - 25 * alpha)) / (1 - a * alpha * R);
    expect(Math.abs(40 + sim.finalState[0][0] - hand)).toBeLessThan(1e-6);
    expect(Math.abs(steadyJunctionC(a, 0, alpha, R, 40) - hand)).toBeLessThan(1e-9);
    // Not the 25 °C answer shifted by 15 K: the loss itself is higher by a·α·15 at the same rise.
    const at25 = (25 + R * a * (1 - 25 * alpha)) / (1 - a * alpha * R);
    expect(hand - at25).toBeGreaterThan(15 + 1);
  });

  it('pulse scheme: a bridge on without a break settles where the closed form says', () => {
    const alpha = 0.006;
    const d = pulseDriver(
      mosfet('bridge', { rKPerW: 0.5, tauS: 0.01, caseToSinkKPerW: 0.2, sinkToAmbientKPerW: 1.3, sinkHeatCapacityJPerK: 1 }, { rdsOnOhm: 0.05, rdsOnTempCoeffPerK: alpha }),
      { maxDuty: 1, maxOnTimeS: 0.1 },
    );
    // 2000 back-to-back pulses of 0.1 s (the loss is held per pulse, so a pulse must be short beside
    // the sink's τ ≈ 1.3 s for the loop to track the temperature); 200 s ≫ τ.
    const n = 2000;
    const startS = Float64Array.from({ length: n }, (_, i) => i * 0.1);
    const sim = simulatePulses(d, COIL, { startS, onS: new Float64Array(n).fill(0.1) }, 200, { ambientC: 40 });
    const a = 0.05 * HALF_BRIDGE_K2 * 10 * 10; // I²R at 25 °C during a pulse: 10 A supply current
    const R = 2;
    const hand = (40 + R * a * (1 - 25 * alpha)) / (1 - a * alpha * R);
    expect(Math.abs(40 + sim.finalState[0][0] - hand)).toBeLessThan(1e-6);
  });
});
