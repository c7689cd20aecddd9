import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { modulationCornerHz, qualityFactor, resonanceHz, ringUpTauS } from '../../../../shared/physics/coil/resonance.ts';

describe('resonance and Q', () => {
  it('f0 = 1/(2π√(LC)): (2π f0)²·L·C = 1 for any L, C', () => {
    // Thomson's formula as an invariant over µH…H and fF…nF. Tolerance 1e-14.
    fc.assert(
      fc.property(fc.double({ min: -6, max: 0, noNaN: true }), fc.double({ min: -15, max: -9, noNaN: true }), (le, ce) => {
        const L = 10 ** le;
        const C = 10 ** ce;
        const w = 2 * Math.PI * resonanceHz(L, C);
        expect(Math.abs(w * w * L * C - 1)).toBeLessThan(1e-14);
      }),
    );
  });

  it('Q = 2πfL/R, corner f0/(2Q), and τ·2π·corner = 1', () => {
    expect(qualityFactor(380e3, 28.7e-3, 200)).toBeCloseTo(342.62, 2); // hand value 2π·380e3·0.0287/200
    expect(modulationCornerHz(400e3, 100)).toBeCloseTo(2000, 10);
    expect(ringUpTauS(400e3, 100) * 2 * Math.PI * modulationCornerHz(400e3, 100)).toBeCloseTo(1, 14);
  });

  it('a series RLC driven at resonance rings up with envelope 1 − e^{−t/τ}, τ = Q/(π f0)', () => {
    // Direct simulation (RK4, 400 steps per cycle) of L di/dt = V sin(ω0 t) − R i − q/C from rest,
    // Q = 25, f0 = 1 Hz. The envelope is the in-phase amplitude over one cycle, (2/T)∫ i sin(ω0 t).
    // Compare at t = τ, 2τ with the first-order model behind modulationCornerHz. Tolerance 2 %:
    // the model neglects the off-resonant part of the transient, of relative size ~1/(2Q).
    const Q = 25;
    const f0 = 1;
    const w0 = 2 * Math.PI * f0;
    const L = 1;
    const C = 1 / (w0 * w0 * L);
    const R = (w0 * L) / Q;
    const tau = ringUpTauS(f0, Q);
    const steps = 400;
    const dt = 1 / (f0 * steps);
    const deriv = (t: number, q: number, i: number): [number, number] => [i, (Math.sin(w0 * t) - R * i - q / C) / L];
    const total = Math.ceil((2 * tau + 1) * f0) * steps;
    const current = new Float64Array(total + 1);
    let q = 0;
    let i = 0;
    for (let n = 0; n < total; n++) {
      const t = n * dt;
      const k1 = deriv(t, q, i);
      const k2 = deriv(t + dt / 2, q + (dt / 2) * k1[0], i + (dt / 2) * k1[1]);
      const k3 = deriv(t + dt / 2, q + (dt / 2) * k2[0], i + (dt / 2) * k2[1]);
      const k4 = deriv(t + dt, q + dt * k3[0], i + dt * k3[1]);
      q += (dt / 6) * (k1[0] + 2 * k2[0] + 2 * k3[0] + k4[0]);
      i += (dt / 6) * (k1[1] + 2 * k2[1] + 2 * k3[1] + k4[1]);
      current[n + 1] = i;
    }
    const envelopeAt = (t: number): number => {
      const n0 = Math.round((t - 0.5 / f0) / dt);
      let s = 0;
      for (let n = n0; n < n0 + steps; n++) s += current[n] * Math.sin(w0 * n * dt);
      return (2 * s) / steps;
    };
    const iSteady = 1 / R;
    expect(Math.abs(envelopeAt(tau) / iSteady - (1 - Math.exp(-1)))).toBeLessThan(0.02);
    expect(Math.abs(envelopeAt(2 * tau) / iSteady - (1 - Math.exp(-2)))).toBeLessThan(0.02);
  });
});
