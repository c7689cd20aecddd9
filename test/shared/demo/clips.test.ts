// Demo clips (shared/demo/clips.ts): deterministic, the stated lengths, peak at −1 dBFS, and the musical
// properties each clip is there to exercise (dynamics, low notes, crest factor, steady level).
import { describe, expect, it } from 'vitest';
import type { AudioClip } from '../../../shared/audio/clip.ts';
import { DEMO_CLIPS, DEMO_PEAK_DBFS, synthDemoClip, synthLongDemo, type DemoClipName } from '../../../shared/demo/clips.ts';
import { midiToHz } from '../../../shared/demo/synth.ts';

const FS = 44100;
const cache = new Map<DemoClipName, AudioClip>();
const clip = (name: DemoClipName) => cache.get(name) ?? (cache.set(name, synthDemoClip(name)), cache.get(name)!);

const db = (x: number) => 20 * Math.log10(x);
/** Mean-square over both channels of samples [a, b). */
function meanSquare(c: AudioClip, a: number, b: number): number {
  let s = 0;
  for (const ch of c.channels) for (let i = a; i < b; i++) s += ch[i] * ch[i];
  return s / (c.channels.length * (b - a));
}
/** RMS in dBFS of consecutive 400 ms windows between t0 and t1 seconds. */
function windowRmsDb(c: AudioClip, t0: number, t1: number, winS = 0.4): number[] {
  const w = Math.round(winS * c.sampleRate);
  const out: number[] = [];
  for (let a = Math.round(t0 * c.sampleRate); a + w <= Math.round(t1 * c.sampleRate); a += w) out.push(10 * Math.log10(meanSquare(c, a, a + w)));
  return out;
}
function peakDb(c: AudioClip): number {
  let m = 0;
  for (const ch of c.channels) for (const v of ch) m = Math.max(m, Math.abs(v));
  return db(m);
}
/** Amplitude of the component at f Hz in x[a, b) by a single DFT bin (Goertzel-equivalent), Hann-windowed. */
function toneAmp(x: Float32Array, fs: number, f: number, a: number, b: number): number {
  let re = 0, im = 0, wsum = 0;
  const n = b - a;
  for (let i = 0; i < n; i++) {
    const w = 0.5 - 0.5 * Math.cos((2 * Math.PI * i) / n);
    const ph = (2 * Math.PI * f * i) / fs;
    re += w * x[a + i] * Math.cos(ph);
    im -= w * x[a + i] * Math.sin(ph);
    wsum += w;
  }
  return (2 * Math.hypot(re, im)) / wsum;
}

describe('every demo clip', () => {
  it.each(DEMO_CLIPS.map((c) => [c.name, c] as const))('%s: stated length and channels, peak −1 dBFS, deterministic', (name, info) => {
    const c = clip(name);
    expect(c.sampleRate).toBe(FS);
    expect(c.channels).toHaveLength(info.channelCount);
    for (const ch of c.channels) expect(ch.length).toBe(Math.round(info.durationS * FS));
    // Normalised to the peak exactly, up to float32 rounding of the scaled samples (6e-8 relative ≈ 5e-7 dB).
    expect(Math.abs(peakDb(c) - DEMO_PEAK_DBFS)).toBeLessThan(1e-5);
    const again = synthDemoClip(name);
    again.channels.forEach((ch, i) => expect(Buffer.compare(Buffer.from(ch.buffer), Buffer.from(c.channels[i].buffer))).toBe(0));
  });

  it('other sample rates keep the duration and the peak', () => {
    for (const fs of [22050, 48000]) {
      const c = synthDemoClip('steady-hum', fs);
      expect(c.sampleRate).toBe(fs);
      expect(c.channels[0].length).toBe(10 * fs);
      expect(Math.abs(peakDb(c) - DEMO_PEAK_DBFS)).toBeLessThan(1e-5);
    }
  });

  it('rejects an unknown name or an unusable sample rate', () => {
    expect(() => synthDemoClip('sea-shanty' as DemoClipName)).toThrow(/unknown demo clip/);
    expect(() => synthDemoClip('steady-hum', 100)).toThrow(RangeError);
  });
});

describe('harbour-lights', () => {
  it('has dynamics: the quiet passage (bars 9–10) sits more than 10 dB below the climax (bar 8)', () => {
    const c = clip('harbour-lights');
    // 96 BPM, 4/4: a bar lasts 2.5 s; bar 8 is 17.5–20 s, bars 9–10 are 20–25 s (release tails skipped).
    const climax = Math.max(...windowRmsDb(c, 17.5, 20));
    const quiet = Math.max(...windowRmsDb(c, 20.6, 25));
    expect(climax - quiet).toBeGreaterThan(10);
    // and the opening (mp, bars 1–4) is quieter than the climax: a crescendo happens
    expect(climax - Math.max(...windowRmsDb(c, 0.5, 10))).toBeGreaterThan(4);
  });
  it('has bass notes: G1 (49 Hz) sounds in bar 3 well above a frequency no note uses', () => {
    const c = clip('harbour-lights');
    const left = c.channels[0];
    const a = Math.round(5 * FS), b = Math.round(7.5 * FS);
    expect(db(toneAmp(left, FS, midiToHz(31), a, b) / toneAmp(left, FS, 60, a, b))).toBeGreaterThan(20);
  });
  it('is stereo with a slight spread: channels differ but stay strongly correlated', () => {
    const [l, r] = clip('harbour-lights').channels;
    let lr = 0, ll = 0, rr = 0;
    for (let i = 0; i < l.length; i++) {
      lr += l[i] * r[i];
      ll += l[i] * l[i];
      rr += r[i] * r[i];
    }
    const rho = lr / Math.sqrt(ll * rr);
    expect(rho).toBeGreaterThan(0.6);
    expect(rho).toBeLessThan(0.999);
  });
});

describe('night-ferry', () => {
  it('is sparse and percussive: crest factor above 20 dB, with a faint noise floor between events', () => {
    const c = clip('night-ferry');
    const rmsDb = 10 * Math.log10(meanSquare(c, 0, c.channels[0].length));
    expect(DEMO_PEAK_DBFS - rmsDb).toBeGreaterThan(20);
    const floor = Math.min(...windowRmsDb(c, 0, 20));
    expect(floor).toBeLessThan(-45); // quiet gaps…
    expect(floor).toBeGreaterThan(-75); // …but not digital silence
  });
});

describe('steady-hum', () => {
  it('is loud and steady: crest factor below 8 dB (a sine is 3.01), level flat within 0.5 dB', () => {
    const c = clip('steady-hum');
    const n = c.channels[0].length;
    const rmsDb = 10 * Math.log10(meanSquare(c, Math.round(0.1 * FS), n - Math.round(0.1 * FS)));
    expect(DEMO_PEAK_DBFS - rmsDb).toBeLessThan(8);
    expect(rmsDb).toBeGreaterThan(-10);
    const w = windowRmsDb(c, 0.2, 9.8);
    expect(Math.max(...w) - Math.min(...w)).toBeLessThan(0.5);
  });
  it('is the just A-major chord: 110, 165, 220, 275 Hz present; identical channels', () => {
    const [l, r] = clip('steady-hum').channels;
    expect(Buffer.compare(Buffer.from(l.buffer), Buffer.from(r.buffer))).toBe(0);
    const a = FS, b = 3 * FS;
    const ref = toneAmp(l, FS, 110, a, b);
    for (const f of [165, 220, 275]) expect(toneAmp(l, FS, f, a, b) / ref).toBeGreaterThan(0.3);
    expect(toneAmp(l, FS, 138.6, a, b) / ref).toBeLessThan(0.01); // an equal-tempered C#3 is not there
  });
});

describe('synthLongDemo', () => {
  it('extends the tune, transposed each pass, to the asked length with a fade-out', () => {
    const c = synthLongDemo(45);
    expect(c.channels[0].length).toBe(45 * FS);
    expect(Math.abs(peakDb(c) - DEMO_PEAK_DBFS)).toBeLessThan(1e-5);
    // Pass 2 (30–60 s) is transposed up a fourth: its bar-3 bass is C2 (65.4 Hz), not G1 (49 Hz).
    const l = c.channels[0];
    const a = Math.round(35 * FS), b = Math.round(37.5 * FS);
    expect(toneAmp(l, FS, midiToHz(36), a, b)).toBeGreaterThan(10 * toneAmp(l, FS, midiToHz(31), a, b));
    const end = windowRmsDb(c, 44.9, 45, 0.1)[0];
    expect(end).toBeLessThan(Math.max(...windowRmsDb(c, 40, 43)) - 20);
  });
  it('rejects a non-positive length', () => {
    expect(() => synthLongDemo(0)).toThrow(RangeError);
  });
});
