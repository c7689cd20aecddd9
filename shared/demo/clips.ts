/**
 * Built-in demo clips, synthesised by code from an invented scenario (a harbour at dusk): no recorded
 * or third-party music. Deterministic (noise from a seeded generator), peak normalised to −1 dBFS.
 * Pure: no node:*, no DOM.
 */
import type { AudioClip } from '../audio/clip.ts';
import { dbToAmp } from '../units.ts';
import { BEATS_PER_BAR, HARBOUR_BARS, HARBOUR_BPM, bassNotes, chordNotes, dynamicsAt, melodyNotes, type Note } from './melody.ts';
import { createRng } from './prng.ts';
import { addPartials, midiToHz, mixNote, normalisePeak, noteSamples, schroederPhases, type Voice } from './synth.ts';

/** Names of the built-in demo clips. */
export type DemoClipName = 'harbour-lights' | 'night-ferry' | 'steady-hum';

/** What each demo clip is, for menus and help text. */
export interface DemoClipInfo {
  name: DemoClipName;
  title: string;
  description: string;
  /** Length, s. */
  durationS: number;
  channelCount: number;
}

/** Sample peak of every demo clip, dBFS. */
export const DEMO_PEAK_DBFS = -1;

const HARBOUR_S = (HARBOUR_BARS * BEATS_PER_BAR * 60) / HARBOUR_BPM; // 30 s

/** The demo clips, in menu order. @example DEMO_CLIPS.map((c) => c.name) // ['harbour-lights', 'night-ferry', 'steady-hum'] */
export const DEMO_CLIPS: readonly DemoClipInfo[] = [
  {
    name: 'harbour-lights',
    title: 'Harbour Lights',
    description:
      'A 30 s stereo tune in D major at 96 BPM: plucked lead, organ chords, bass down to 49 Hz; a crescendo to a climax, a quiet passage 20 dB down, then a return. Tests dynamics and low notes.',
    durationS: HARBOUR_S,
    channelCount: 2,
  },
  {
    name: 'night-ferry',
    title: 'Night Ferry',
    description:
      'A 20 s sparse, percussive stereo scene: bell strikes, low thumps and clicks over faint water noise some 55 dB below the peak. High crest factor; tests peak handling and gating.',
    durationS: 20,
    channelCount: 2,
  },
  {
    name: 'steady-hum',
    title: 'Steady Hum',
    description:
      'A 10 s loud, sustained A-major organ chord in just intonation with low-crest-factor (Schroeder) phases, identical in both channels. Tests continuous thermal load.',
    durationS: 10,
    channelCount: 2,
  },
];

function checkRate(sampleRate: number): void {
  if (!Number.isFinite(sampleRate) || sampleRate < 8000 || sampleRate > 384000) {
    throw new RangeError(`demo clip sampleRate must be 8000…384000 Hz, got ${sampleRate}`);
  }
}

/**
 * Synthesises a demo clip at `sampleRate` Hz (default 44100): stereo Float32Array channels, peak
 * −1 dBFS. Same name and rate, same samples.
 * @example const clip = synthDemoClip('harbour-lights'); clip.channels[0].length // 1323000
 */
export function synthDemoClip(name: DemoClipName, sampleRate = 44100): AudioClip {
  checkRate(sampleRate);
  switch (name) {
    case 'harbour-lights':
      return harbour([0], sampleRate, HARBOUR_S);
    case 'night-ferry':
      return nightFerry(sampleRate);
    case 'steady-hum':
      return steadyHum(sampleRate);
    default:
      throw new RangeError(`unknown demo clip "${String(name)}"; known: ${DEMO_CLIPS.map((c) => c.name).join(', ')}`);
  }
}

/**
 * A long clip for benchmarks: Harbour Lights played repeatedly, each pass transposed (0, +5, −2, +3
 * semitones, cycling) and continuous across passes, cut to `durationS` with a 1.5 s fade-out.
 * @example synthLongDemo(300).channels[0].length // 13230000 (5 min at 44.1 kHz)
 */
export function synthLongDemo(durationS: number, sampleRate = 44100): AudioClip {
  checkRate(sampleRate);
  if (!Number.isFinite(durationS) || durationS <= 0 || durationS > 7200) {
    throw new RangeError(`synthLongDemo durationS must be in (0, 7200] s, got ${durationS}`);
  }
  const passes = Math.ceil(durationS / HARBOUR_S);
  const cycle = [0, 5, -2, 3];
  return harbour(Array.from({ length: passes }, (_, i) => cycle[i % cycle.length]), sampleRate, durationS);
}

// ——— Harbour Lights ———

/** Plucked lead: harmonics 1…8 at 1/k, the k-th decaying with τ = 1.5 s / k (upper partials die first, as in a plucked string). */
const LEAD: Voice = {
  partials: Array.from({ length: 8 }, (_, i) => ({ ratio: i + 1, amp: 1 / (i + 1), decayS: 1.5 / (i + 1) })),
  env: { attackS: 0.006, decayS: 0.25, sustainLevel: 0.7, releaseS: 0.12 },
};
/** Organ pad: drawbar-like steady harmonics 1, 2, 3, 4, 6, slow attack. */
const PAD: Voice = {
  partials: [
    { ratio: 1, amp: 0.6, decayS: Infinity },
    { ratio: 2, amp: 0.3, decayS: Infinity },
    { ratio: 3, amp: 0.18, decayS: Infinity },
    { ratio: 4, amp: 0.12, decayS: Infinity },
    { ratio: 6, amp: 0.06, decayS: Infinity },
  ],
  env: { attackS: 0.35, decayS: 0.5, sustainLevel: 0.85, releaseS: 0.5 },
};
/** Bass: fundamental-heavy, slowly decaying 2nd and 3rd harmonics. */
const BASS: Voice = {
  partials: [
    { ratio: 1, amp: 1, decayS: 2.5 },
    { ratio: 2, amp: 0.4, decayS: 1.2 },
    { ratio: 3, amp: 0.12, decayS: 0.6 },
  ],
  env: { attackS: 0.01, decayS: 0.3, sustainLevel: 0.8, releaseS: 0.12 },
};

function harbour(transposes: readonly number[], fs: number, durationS: number): AudioClip {
  const n = Math.round(durationS * fs);
  const left = new Float32Array(n);
  const right = new Float32Array(n);
  // A pass at a given transposition is always the same samples: render it once, add it at each offset.
  const passes = new Map<number, [Float32Array, Float32Array]>();
  const passLen = Math.round(HARBOUR_S * fs);
  transposes.forEach((tr, k) => {
    let pass = passes.get(tr);
    if (!pass) passes.set(tr, (pass = harbourPass(tr, fs)));
    const s0 = k * passLen;
    const m = Math.min(pass[0].length, n - s0);
    for (let i = 0; i < m; i++) {
      left[s0 + i] += pass[0][i];
      right[s0 + i] += pass[1][i];
    }
  });
  fadeOut(left, right, Math.round(1.5 * fs));
  const channels = [left, right];
  normalisePeak(channels, dbToAmp(DEMO_PEAK_DBFS));
  return { sampleRate: fs, channels };
}

/** One pass of the tune (30 s plus 1 s for the last releases), unnormalised. */
function harbourPass(transpose: number, fs: number): [Float32Array, Float32Array] {
  const n = Math.round((HARBOUR_S + 1) * fs);
  const left = new Float32Array(n);
  const right = new Float32Array(n);
  const beatS = 60 / HARBOUR_BPM;
  // The tune reuses few (voice, pitch, length) combinations: render each once, mix it many times.
  const cache = new Map<string, Float32Array>();
  const play = (notes: Note[], voice: Voice, vid: string, gain: number, pan: (i: number) => number, legato: number) => {
    notes.forEach(([onset, len, m], i) => {
      const key = `${vid}:${m}:${len}`;
      let note = cache.get(key);
      if (!note) cache.set(key, (note = noteSamples(voice, midiToHz(m), len * beatS * legato, fs)));
      mixNote(left, right, note, onset * beatS, gain * dynamicsAt(onset), pan(i), fs);
    });
  };
  play(melodyNotes(transpose), LEAD, 'lead', 0.5, () => -0.2, 0.9);
  play(chordNotes(transpose), PAD, 'pad', 0.16, (i) => 0.1 + 0.25 * (i % 3), 1);
  play(bassNotes(transpose), BASS, 'bass', 0.45, () => 0, 0.95);
  return [left, right];
}

/** Raised-cosine fade over the last `m` samples. */
function fadeOut(left: Float32Array, right: Float32Array, m: number): void {
  const n = left.length;
  const k = Math.min(m, n);
  for (let i = 0; i < k; i++) {
    const g = 0.5 * (1 + Math.cos((Math.PI * (i + 1)) / k));
    left[n - k + i] *= g;
    right[n - k + i] *= g;
  }
}

// ——— Night Ferry ———

/**
 * Bell: the first four bending modes of a free–free bar, frequency ratios 1 : 2.756 : 5.404 : 8.933
 * (Fletcher & Rossing, *The Physics of Musical Instruments*, 2nd ed., 1998, §2.15), higher modes decaying faster.
 */
const BELL: Voice = {
  partials: [
    { ratio: 1, amp: 1, decayS: 0.8 },
    { ratio: 2.756, amp: 0.45, decayS: 0.35 },
    { ratio: 5.404, amp: 0.25, decayS: 0.18 },
    { ratio: 8.933, amp: 0.12, decayS: 0.1 },
  ],
  env: { attackS: 0.002, decayS: Infinity, sustainLevel: 1, releaseS: 0.3 },
};

function nightFerry(fs: number): AudioClip {
  const durationS = 20;
  const n = Math.round(durationS * fs);
  const left = new Float32Array(n);
  const right = new Float32Array(n);
  const rng = createRng(0x5eaf);
  // Bell strikes on the D-major pentatonic: [time s, MIDI, pan, gain].
  const bells: [number, number, number, number][] = [
    [0.6, 81, -0.4, 1.0], [3.1, 78, 0.4, 0.7], [3.45, 74, 0.4, 0.5], [7.2, 83, -0.3, 0.9],
    [11.4, 76, 0.5, 0.8], [11.7, 81, 0.5, 0.6], [15.3, 86, -0.5, 1.0], [18.1, 74, 0.2, 0.6],
  ];
  for (const [t, m, pan, g] of bells) mixNote(left, right, noteSamples(BELL, midiToHz(m), 2, fs), t, 0.35 * g, pan, fs);
  // Low thumps: a sine whose pitch falls 115 → 45 Hz (τ 40 ms) under a 120 ms decay, centred.
  for (const t0 of [1.2, 5.0, 9.1, 13.0, 16.9]) {
    const s0 = Math.round(t0 * fs);
    const len = Math.min(Math.round(0.8 * fs), n - s0);
    let phase = 0;
    for (let i = 0; i < len; i++) {
      const t = i / fs;
      phase += (2 * Math.PI * (45 + 70 * Math.exp(-t / 0.04))) / fs;
      const v = 0.5 * Math.exp(-t / 0.12) * Math.sin(phase) * Math.SQRT1_2;
      left[s0 + i] += v;
      right[s0 + i] += v;
    }
  }
  // Clicks: 12 ms bursts of white noise decaying with τ = 3 ms, random pan.
  for (const t0 of [2.2, 2.5, 6.3, 8.7, 10.2, 14.5, 16.4, 19.2]) {
    const s0 = Math.round(t0 * fs);
    const len = Math.min(Math.round(0.012 * fs), n - s0);
    const th = (Math.PI / 2) * rng();
    const gl = Math.cos(th), gr = Math.sin(th);
    for (let i = 0; i < len; i++) {
      const v = 0.9 * Math.exp(-i / (0.003 * fs)) * (2 * rng() - 1);
      left[s0 + i] += gl * v;
      right[s0 + i] += gr * v;
    }
  }
  // Water: independent white noise per channel through a one-pole low-pass (fc 400 Hz,
  // y += (1 − e^(−2π fc/fs))·(x − y)), swelling slowly at 0.1 Hz.
  const a = 1 - Math.exp((-2 * Math.PI * 400) / fs);
  let yl = 0, yr = 0;
  for (let i = 0; i < n; i++) {
    yl += a * (2 * rng() - 1 - yl);
    yr += a * (2 * rng() - 1 - yr);
    const swell = 0.05 * (0.6 + 0.4 * Math.sin((2 * Math.PI * 0.1 * i) / fs));
    left[i] += swell * yl;
    right[i] += swell * yr;
  }
  const channels = [left, right];
  normalisePeak(channels, dbToAmp(DEMO_PEAK_DBFS));
  return { sampleRate: fs, channels };
}

// ——— Steady Hum ———

/**
 * A-major triad A2 E3 A3 C#4 in just intonation (frequency ratios 2 : 3 : 4 : 5 over 55 Hz; Ptolemy's
 * intense diatonic), four harmonics each at 1/k. Every component is then a harmonic of 55 Hz, so the
 * combined spectrum takes Schroeder phases and the waveform a low crest factor.
 */
function steadyHum(fs: number): AudioClip {
  const durationS = 10;
  const n = Math.round(durationS * fs);
  const f0 = 55;
  const amps = new Array<number>(20).fill(0); // amps[h − 1]: harmonic h of 55 Hz
  for (const root of [2, 3, 4, 5]) for (let k = 1; k <= 4; k++) amps[root * k - 1] += 1 / k;
  const phases = schroederPhases(amps); // for cosines: +π/2 below turns our sine oscillators into cosines
  const mono = new Float32Array(n);
  addPartials(
    mono,
    n,
    f0,
    amps.flatMap((a, i) => (a > 0 ? [{ ratio: i + 1, amp: a, decayS: Infinity, phaseRad: phases[i] + Math.PI / 2 }] : [])),
    fs,
  );
  // 60 ms raised-cosine fade in and out so the chord starts and stops without a click.
  const m = Math.round(0.06 * fs);
  for (let i = 0; i < m; i++) {
    const g = 0.5 * (1 - Math.cos((Math.PI * (i + 1)) / m));
    mono[i] *= g;
    mono[n - 1 - i] *= g;
  }
  const channels = [mono, mono.slice()];
  normalisePeak(channels, dbToAmp(DEMO_PEAK_DBFS));
  return { sampleRate: fs, channels };
}
