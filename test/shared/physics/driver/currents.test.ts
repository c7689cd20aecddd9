import { describe, expect, it } from 'vitest';
import { bridgeCurrentFactors, railConductanceAPerV, ringUpTimeS } from '../../../../shared/physics/driver/currents.ts';

const N = 200_000; // samples per RF cycle for the waveform integrals (midpoint rule: error ~1/N²)

/** Mean over one cycle θ ∈ [0, 2π) of f(θ), midpoint rule. */
function cycleMean(f: (theta: number) => number): number {
  let s = 0;
  for (let i = 0; i < N; i++) s += f(((i + 0.5) / N) * 2 * Math.PI);
  return s / N;
}

describe('bridgeCurrentFactors: waveform integration at resonance', () => {
  // Square-wave drive, sinusoidal tank current in phase with it (Erickson & Maksimović §19.1).
  // Tolerances 1e-9 relative: midpoint-rule error of N samples on smooth (half-)sines.
  const V = 48;
  const Is = 3;

  it('half-bridge: Î = π·I_s, per switch I_rms = Î/2, I_avg = I_s, power V·I_s carried by the fundamental', () => {
    const k = bridgeCurrentFactors('half-bridge');
    const peak = k.tankPeak * Is;
    const i = (th: number) => peak * Math.sin(th);
    const high = (th: number) => (th < Math.PI ? i(th) : 0); // the high-side switch conducts the positive half
    const vOut = (th: number) => (th < Math.PI ? V : 0);
    expect(Math.abs(cycleMean(high) / Is - 1)).toBeLessThan(1e-9); // supply current = mean high-side current
    expect(Math.abs(cycleMean((th) => vOut(th) * i(th)) / (V * Is) - 1)).toBeLessThan(1e-9);
    expect(Math.abs(Math.sqrt(cycleMean((th) => high(th) ** 2)) / (k.switchRms * Is) - 1)).toBeLessThan(1e-9);
    expect(Math.abs(k.switchAvg - 1)).toBeLessThan(1e-15);
    expect(k.switchPeak).toBe(k.tankPeak);
  });

  it('full bridge: Î = (π/2)·I_s, per switch I_rms = Î/2, I_avg = I_s/2', () => {
    const k = bridgeCurrentFactors('full-bridge');
    const peak = k.tankPeak * Is;
    const i = (th: number) => peak * Math.sin(th);
    const vOut = (th: number) => (th < Math.PI ? V : -V);
    const sw = (th: number) => (th < Math.PI ? i(th) : 0); // one diagonal pair conducts the positive half
    // Supply current = i·sign(v_out) = |i| in phase; its mean must be I_s.
    expect(Math.abs(cycleMean((th) => Math.abs(i(th))) / Is - 1)).toBeLessThan(1e-9);
    expect(Math.abs(cycleMean((th) => vOut(th) * i(th)) / (V * Is) - 1)).toBeLessThan(1e-9);
    expect(Math.abs(Math.sqrt(cycleMean((th) => sw(th) ** 2)) / (k.switchRms * Is) - 1)).toBeLessThan(1e-9);
    expect(Math.abs(cycleMean(sw) / (k.switchAvg * Is) - 1)).toBeLessThan(1e-9);
  });

  it('single switch (class E, D = 0.5): the published switch waveform gives I_avg, I_rms, I_peak and the output amplitude', () => {
    // i_S(θ) = I_s(1 + (π/2)·sin θ − cos θ) for 0 < θ ≤ π, 0 otherwise (Sokal & Sokal 1975; Raab 1977;
    // Kazimierczuk, RF Power Amplifiers [recalled]); published ratios I_rms/I_s = 1.5385,
    // I_peak/I_s = 2.862, output amplitude 1.8621 [recalled] — checked to their 4–5 digits and to
    // the integral at 1e-9.
    const k = bridgeCurrentFactors('single-switch');
    const iS = (th: number) => (th <= Math.PI ? Is * (1 + (Math.PI / 2) * Math.sin(th) - Math.cos(th)) : 0);
    expect(Math.abs(cycleMean(iS) / Is - 1)).toBeLessThan(1e-9);
    expect(Math.abs(Math.sqrt(cycleMean((th) => iS(th) ** 2)) / (k.switchRms * Is) - 1)).toBeLessThan(1e-9);
    let max = 0;
    let outMax = 0;
    for (let j = 0; j <= N; j++) {
      const th = (j / N) * Math.PI;
      max = Math.max(max, iS(th));
      outMax = Math.max(outMax, Math.abs(Is - iS(th))); // output current = I_s − i_S while on
    }
    expect(Math.abs(max / (k.switchPeak * Is) - 1)).toBeLessThan(1e-9);
    expect(Math.abs(outMax / (k.tankPeak * Is) - 1)).toBeLessThan(1e-9);
    expect(Math.abs(k.switchRms - 1.5385)).toBeLessThan(5e-5);
    expect(Math.abs(k.switchPeak - 2.862)).toBeLessThan(5e-4);
    expect(Math.abs(k.tankPeak - 1.8621)).toBeLessThan(5e-5);
  });
});

describe('railConductanceAPerV and ringUpTimeS', () => {
  it('scales the rail current linearly: I = fullRailCurrentA·V/V_s', () => {
    expect(railConductanceAPerV({ fullRailCurrentA: 3, supplyVoltageV: 48 }) * 24).toBeCloseTo(1.5, 14);
  });

  it('gives the envelope time constant of a series RLC driven at resonance from rest', () => {
    // RK4 integration of L·di/dt + R·i + q/C = V·sin(ω0·t) with Q = 50, f0 = 1 Hz: the current
    // envelope follows (V/R)(1 − e^(−t/τ)) with τ = 2L/R = Q/(π·f0) (Terman [recalled]). The
    // half-cycle peaks are compared with that envelope; tolerance 1 % (corrections of order 1/Q).
    const q = 50;
    const f0 = 1;
    const w0 = 2 * Math.PI * f0;
    const L = 1;
    const R = (w0 * L) / q;
    const C = 1 / (w0 * w0 * L);
    const tau = ringUpTimeS(f0, q);
    expect(Math.abs(tau - q / Math.PI)).toBeLessThan(1e-12);
    const h = 1e-4;
    let i = 0;
    let qc = 0;
    let t = 0;
    const d = (tt: number, ii: number, qq: number): [number, number] => [(Math.sin(w0 * tt) - R * ii - qq / C) / L, ii];
    let prev = 0;
    let rising = true;
    let checked = 0;
    while (t < 3 * tau) {
      const [a1, b1] = d(t, i, qc);
      const [a2, b2] = d(t + h / 2, i + (h / 2) * a1, qc + (h / 2) * b1);
      const [a3, b3] = d(t + h / 2, i + (h / 2) * a2, qc + (h / 2) * b2);
      const [a4, b4] = d(t + h, i + h * a3, qc + h * b3);
      i += (h / 6) * (a1 + 2 * a2 + 2 * a3 + a4);
      qc += (h / 6) * (b1 + 2 * b2 + 2 * b3 + b4);
      t += h;
      const mag = Math.abs(i);
      if (rising && mag < prev && t > 0.5 * tau) {
        const env = (1 / R) * (1 - Math.exp(-(t - h) / tau));
        expect(Math.abs(prev / env - 1)).toBeLessThan(0.01);
        checked++;
      }
      rising = mag >= prev;
      prev = mag;
    }
    expect(checked).toBeGreaterThan(70); // two peaks per cycle over 2.5 τ ≈ 40 cycles
  });
});
