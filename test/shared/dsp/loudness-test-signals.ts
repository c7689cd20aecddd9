/**
 * Test signals for the loudness and true-peak suites, synthesised from the published descriptions of
 * EBU Tech 3341 / 3342 (sine tones whose level steps between segments). The same synthesis is
 * mirrored in test/fixtures/loudness/reference_values.py, which computes the [calc] values quoted in
 * the tests.
 */

/**
 * A sine x[i] = A(i)·sin(2π·f·i/fs + phase) whose peak amplitude A steps between segments
 * (durations in s, levels in dBFS peak); segment boundaries at round(cumulative seconds·fs). The
 * phase runs on across boundaries, as in a single oscillator whose gain is switched.
 */
export function steppedTone(
  segments: readonly (readonly [durationS: number, peakDbfs: number])[],
  sampleRateHz = 48000,
  freqHz = 1000,
  phaseRad = 0,
): Float32Array {
  let total = 0;
  const bounds = [0];
  for (const [d] of segments) {
    total += d;
    bounds.push(Math.round(total * sampleRateHz));
  }
  const out = new Float32Array(bounds[bounds.length - 1]);
  const w = (2 * Math.PI * freqHz) / sampleRateHz;
  for (let s = 0; s < segments.length; s++) {
    const amp = Math.pow(10, segments[s][1] / 20);
    for (let i = bounds[s]; i < bounds[s + 1]; i++) out[i] = amp * Math.sin(w * i + phaseRad);
  }
  return out;
}

/**
 * The true-peak test tones of EBU Tech 3341 (cases 15–19): a sine of `cyclesPerSample`·fs Hz, peak
 * amplitude `amp` (linear), starting phase in degrees, with 10 ms linear fade-in and fade-out.
 */
export function fadedSine(
  cyclesPerSample: number,
  amp: number,
  phaseDeg: number,
  sampleRateHz = 48000,
  durationS = 1,
): Float32Array {
  const n = Math.round(durationS * sampleRateHz);
  const nf = Math.round(0.01 * sampleRateHz);
  const out = new Float32Array(n);
  const ph = (phaseDeg * Math.PI) / 180;
  for (let i = 0; i < n; i++) {
    const env = i < nf ? i / nf : i >= n - nf ? (n - 1 - i) / nf : 1;
    out[i] = env * amp * Math.sin(2 * Math.PI * cyclesPerSample * i + ph);
  }
  return out;
}

/** A deterministic pseudo-random generator in [0, 1) (32-bit LCG, Numerical Recipes constants). */
export function lcg(seed: number): () => number {
  let s = seed >>> 0;
  return () => (s = (Math.imul(s, 1664525) + 1013904223) >>> 0) / 4294967296;
}

/**
 * A short music-like signal: decaying harmonic notes on a beat grid, noise hits and a slow level
 * swell, peak-normalised to `peak`. For properties that want something other than a steady tone.
 */
export function musicLike(durationS: number, sampleRateHz: number, seed = 1, peak = 0.9): Float32Array {
  const rnd = lcg(seed);
  const n = Math.round(durationS * sampleRateHz);
  const x = new Float64Array(n);
  for (let t0 = 0; t0 < durationS; t0 += 0.25) {
    const i0 = Math.round(t0 * sampleRateHz);
    const f = 110 * Math.pow(2, Math.floor(rnd() * 36) / 12);
    const amp = 0.15 + 0.15 * rnd();
    const len = Math.min(n - i0, Math.round(0.6 * sampleRateHz));
    for (let i = 0; i < len; i++) {
      const t = i / sampleRateHz;
      let v = 0;
      for (let h = 1; h <= 6; h++) v += Math.sin(2 * Math.PI * f * h * t) / h;
      x[i0 + i] += amp * Math.exp(-4 * t) * v;
    }
    const hitLen = Math.min(n - i0, Math.round(0.08 * sampleRateHz));
    const hitAmp = rnd() < 0.5 ? 0.3 : 0.1;
    for (let i = 0; i < hitLen; i++) x[i0 + i] += (rnd() * 2 - 1) * hitAmp * Math.exp((-40 * i) / sampleRateHz);
  }
  let m = 0;
  for (let i = 0; i < n; i++) {
    x[i] *= 0.6 + 0.4 * Math.sin((2 * Math.PI * i) / sampleRateHz / 7);
    m = Math.max(m, Math.abs(x[i]));
  }
  return Float32Array.from(x, (v) => (v * peak) / m);
}
