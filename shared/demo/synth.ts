/**
 * Additive-synthesis building blocks for the demo clips: partials from a second-order recursive
 * oscillator, ADSR envelopes, equal-power panning and low-crest-factor phases.
 * Pure, no I/O; buffers are Float32Array (audio), time in seconds, frequency in hertz.
 */

/** Equal-tempered pitch: f = 440·2^((m − 69)/12) Hz for MIDI note m (A4 = 69 = 440 Hz, ISO 16:1975). */
export const midiToHz = (m: number): number => 440 * Math.pow(2, (m - 69) / 12);

/** One partial of a voice: frequency ratio to the note, relative amplitude, exponential decay time. */
export interface Partial {
  ratio: number;
  amp: number;
  /** 1/e decay time of this partial, s; Infinity for none. */
  decayS: number;
  /** Starting phase, rad (default 0). */
  phaseRad?: number;
}

/**
 * ADSR envelope (common practice since the analogue synthesisers of the 1960s; see C. Roads,
 * *The Computer Music Tutorial*, MIT Press 1996, ch. 3): linear attack 0→1 over attackS, exponential
 * approach to sustainLevel with time constant decayS, hold while the note is held, then a linear fall
 * from its value at release to 0 over releaseS.
 */
export interface Adsr {
  attackS: number;
  decayS: number;
  sustainLevel: number;
  releaseS: number;
}

/** An instrument: its partials and its envelope. */
export interface Voice {
  partials: Partial[];
  env: Adsr;
}

/**
 * Writes the envelope for a note held `holdS` seconds into `out[0 … n)`, n = round((holdS + releaseS)·fs).
 * Returns n. Incremental (one multiply per sample in the decay), no allocation.
 * @example adsrInto(buf, 0.5, { attackS: 0.01, decayS: 0.2, sustainLevel: 0.6, releaseS: 0.1 }, 44100) // 26460
 */
export function adsrInto(out: Float32Array, holdS: number, env: Adsr, fs: number): number {
  const nHold = Math.round(holdS * fs);
  const nRel = Math.max(1, Math.round(env.releaseS * fs));
  const nA = Math.max(1, Math.round(env.attackS * fs));
  const n = nHold + nRel;
  const k = env.decayS > 0 ? Math.exp(-1 / (env.decayS * fs)) : 0;
  let excess = 1 - env.sustainLevel; // above-sustain part, decays geometrically
  let v = 0;
  for (let i = 0; i < nHold; i++) {
    if (i < nA) v = (i + 1) / nA;
    else {
      excess *= k;
      v = env.sustainLevel + excess;
    }
    out[i] = v;
  }
  const start = nHold > 0 ? v : 0;
  for (let i = 0; i < nRel; i++) out[nHold + i] = start * (1 - (i + 1) / nRel);
  return n;
}

/**
 * Adds Σ_p amp_p·e^(−t/τ_p)·sin(2π f0 r_p t + φ_p) for t = i/fs, i < n, into `out` (the note's own
 * buffer, from index 0). Partials at or above 0.45·fs are skipped (no aliasing).
 * Oscillator: the recursion y[i] = 2cos(ω)·y[i−1] − y[i−2] started from sin(φ − ω), sin(φ − 2ω), which
 * generates sin(ωi + φ) exactly in exact arithmetic (Chebyshev recurrence; e.g. J. O. Smith,
 * *Introduction to Digital Filters*, 2007, "digital sinusoid generators"); rounding error grows about
 * linearly, ~1e-12 relative over a few seconds in double precision.
 * @example addPartials(buf, 44100, 220, voice.partials, 44100) // one second of the tone
 */
export function addPartials(out: Float32Array, n: number, f0: number, partials: readonly Partial[], fs: number): void {
  for (const p of partials) {
    const f = f0 * p.ratio;
    if (f >= 0.45 * fs || p.amp === 0) continue;
    const w = (2 * Math.PI * f) / fs;
    const c = 2 * Math.cos(w);
    const phi = p.phaseRad ?? 0;
    let y1 = Math.sin(phi - w);
    let y2 = Math.sin(phi - 2 * w);
    let a = p.amp;
    const g = Number.isFinite(p.decayS) ? Math.exp(-1 / (p.decayS * fs)) : 1;
    for (let i = 0; i < n; i++) {
      const y = c * y1 - y2;
      y2 = y1;
      y1 = y;
      out[i] += a * y;
      a *= g;
    }
  }
}

/**
 * Equal-power pan gains for pan ∈ [−1 (left), 1 (right)]: L = cos θ, R = sin θ, θ = π(pan + 1)/4,
 * so L² + R² = 1 (the −3 dB centre law; common practice, e.g. Roads 1996 ch. 9).
 * @example panGains(0) // [0.7071, 0.7071]
 */
export function panGains(pan: number): [number, number] {
  const t = (Math.PI * (pan + 1)) / 4;
  return [Math.cos(t), Math.sin(t)];
}

/**
 * Schroeder phases for a sum of harmonics with relative powers p_1…p_N (Σp = 1) that keep the crest
 * factor low: φ_n = −2π Σ_{l<n} (n − l)·p_l, for the signal Σ √(2p_n)·cos(2π n t/T + φ_n)
 * (M. R. Schroeder, "Synthesis of low-peak-factor signals and binary sequences with low autocorrelation",
 * IEEE Trans. Inf. Theory 16(1), 1970, with φ_1 = 0 [recalled]). Input: amplitudes indexed by harmonic
 * number − 1 (zeros allowed: absent harmonics still count in n − l); output: phases in rad for COSINE
 * components (add π/2 for the sine oscillators of addPartials).
 * @example schroederPhases([1, 1, 1, 1]) // flat spectrum, φ_n = −π n(n−1)/N: [0, −π/2, −3π/2, −3π]
 */
export function schroederPhases(amps: readonly number[]): number[] {
  const pow = amps.map((a) => a * a);
  const total = pow.reduce((s, x) => s + x, 0) || 1;
  const p = pow.map((x) => x / total);
  const out: number[] = [];
  for (let n = 0; n < amps.length; n++) {
    let s = 0;
    for (let l = 0; l < n; l++) s += (n - l) * p[l];
    out.push(-2 * Math.PI * s);
  }
  return out;
}

/** Largest |x| over all channels (sample peak, linear). @example peakAbs([Float32Array.of(0.1, -0.8)]) // 0.8 */
export function peakAbs(channels: readonly Float32Array[]): number {
  let hi = 0;
  let lo = 0;
  for (let c = 0; c < channels.length; c++) {
    const ch = channels[c];
    for (let i = 0; i < ch.length; i++) {
      const v = ch[i];
      if (v > hi) hi = v;
      else if (v < lo) lo = v;
    }
  }
  return Math.max(hi, -lo);
}

/**
 * Scales all channels in place so the sample peak is `peakAmp` (linear, e.g. 10^(−1/20) for −1 dBFS);
 * silent input is left as is. @example normalisePeak(channels, dbToAmp(-1))
 */
export function normalisePeak(channels: Float32Array[], peakAmp: number): void {
  const m = peakAbs(channels);
  if (m === 0) return;
  const g = peakAmp / m;
  for (const ch of channels) for (let i = 0; i < ch.length; i++) ch[i] *= g;
}

/**
 * One note of `voice` held `holdS` seconds, release included: envelope × partials, gain 1, mono.
 * Length round((holdS + releaseS)·fs) samples.
 * @example noteSamples(voice, 220, 0.5, 44100).length // 0.5 s + release
 */
export function noteSamples(voice: Voice, f0: number, holdS: number, fs: number): Float32Array {
  const env = new Float32Array(Math.round((holdS + voice.env.releaseS) * fs) + 2);
  const n = adsrInto(env, holdS, voice.env, fs);
  const tone = new Float32Array(n);
  addPartials(tone, n, f0, voice.partials, fs);
  for (let i = 0; i < n; i++) tone[i] *= env[i];
  return tone;
}

/**
 * Adds `note` × `gain`, equal-power panned by `pan` (see panGains), into the stereo pair from time
 * `startS` (seconds; rounded to the nearest sample); samples past the end are dropped.
 * @example mixNote(left, right, noteSamples(voice, 220, 0.5, fs), 1.25, 0.4, -0.2, fs)
 */
export function mixNote(left: Float32Array, right: Float32Array, note: Float32Array, startS: number, gain: number, pan: number, fs: number): void {
  const [gl, gr] = panGains(pan);
  const s0 = Math.round(startS * fs);
  const end = Math.min(note.length, left.length - s0);
  const a = gain * gl;
  const b = gain * gr;
  for (let i = Math.max(0, -s0); i < end; i++) {
    const v = note[i];
    left[s0 + i] += a * v;
    right[s0 + i] += b * v;
  }
}
