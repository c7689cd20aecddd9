import { describe, expect, it } from 'vitest';
import { DEFAULT_CLIP_THRESHOLD, measureLevels } from '../../../shared/dsp/level.ts';

const FS = 48000;

/** A·sin(2π f n/fs) + dc, n samples. */
function sine(n: number, f: number, amp = 1, dc = 0, fs = FS): Float32Array {
  const x = new Float32Array(n);
  for (let i = 0; i < n; i++) x[i] = amp * Math.sin((2 * Math.PI * f * i) / fs) + dc;
  return x;
}

// 20·log10(1/√2): RMS of a full-scale sine, plain convention (a sine's crest factor is √2:
// Harris, Proc. IEEE 66(1), 1978 [recalled]; the identity mean(sin²) = 1/2 is exact).
const SINE_RMS_DBFS = 20 * Math.log10(Math.SQRT1_2); // −3.0103 dB

describe('measureLevels: reference signals', () => {
  it('reads a full-scale square wave as 0 dBFS RMS and 0 dB crest', () => {
    // 1 kHz square at 48 kHz: 24 samples at +1, 24 at −1, 1000 periods.
    const x = new Float32Array(FS);
    for (let i = 0; i < FS; i++) x[i] = Math.floor(i / 24) % 2 === 0 ? 1 : -1;
    const r = measureLevels([x], { sampleRate: FS });
    // Exact: every sample is ±1, so mean square is 1 (float64 sums of 1s are exact).
    expect(r.overall.rmsDbfs).toBeCloseTo(0, 12);
    expect(r.overall.samplePeakDbfs).toBeCloseTo(0, 12);
    expect(r.overall.crestDb).toBeCloseTo(0, 12);
    expect(r.overall.dcOffset).toBeCloseTo(0, 12);
    // A full-scale square is indistinguishable from clipping: 2000 runs of 24 samples.
    expect(r.overall.clippedRuns).toBe(2000);
    expect(r.overall.clippedSamples).toBe(48000);
  });

  it('reads a full-scale sine as −3.0103 dBFS RMS with 3.0103 dB crest (not AES17)', () => {
    // 1 kHz at 48 kHz: 48 samples per period, sample 12 is exactly sin(π/2) = 1.
    const r = measureLevels([sine(FS, 1000)], { sampleRate: FS }).perChannel[0];
    // Tolerance 1e-5 dB: float32 samples carry ≤ 6e-8 relative error (≤ 5e-7 dB on the RMS).
    expect(r.rmsDbfs).toBeCloseTo(SINE_RMS_DBFS, 5);
    expect(r.rmsDbfs).toBeCloseTo(-3.0103, 4); // crest √2: Harris 1978 [recalled]
    expect(r.samplePeak).toBeCloseTo(1, 7);
    expect(r.crestDb).toBeCloseTo(3.0103, 4);
    expect(r.rms).toBeCloseTo(Math.SQRT1_2, 7);
    // Full-scale peaks are single samples (neighbours are cos(2π/48) ≈ 0.9914): no clipping.
    expect(r.clippedSamples).toBe(0);
    expect(r.clippedRuns).toBe(0);
    expect(r.nearSilenceFraction).toBe(0);
  });

  it('measures DC offset as the mean and includes it in the RMS', () => {
    const r = measureLevels([sine(FS, 1000, 0.5, 0.25)], { sampleRate: FS }).overall;
    // Exact identities over whole periods: mean = dc, mean square = A²/2 + dc².
    // Tolerance 1e-7: float32 rounding of 0.5·sin + 0.25 (≤ 3e-8 per sample, partly cancelling).
    expect(r.dcOffset).toBeCloseTo(0.25, 7);
    expect(r.rms).toBeCloseTo(Math.sqrt(0.125 + 0.0625), 7);
    expect(r.samplePeak).toBeCloseTo(0.75, 7);
  });
});

describe('measureLevels: clipping', () => {
  it('counts runs of at least 3 same-sign samples at or beyond full scale', () => {
    const x = new Float32Array(200);
    const put = (at: number, values: number[]) => values.forEach((v, i) => (x[at + i] = v));
    put(10, [1]); // run of 1: not clipping
    put(20, [1, 1]); // run of 2: not clipping
    put(30, [1, 1, 1]); // 3: counts
    put(40, [-1, -1, -1, -1, -1]); // 5 at −32768/32768: counts
    put(50, [32767 / 32768, 32767 / 32768, 32767 / 32768]); // decoded 16-bit positive full scale: counts
    put(60, [1, 1, -1, -1]); // sign change splits into two runs of 2: not clipping
    put(70, [1.3, 1.5, 1.2, 1.1]); // float source beyond full scale: counts (4)
    put(80, [0.9999, 0.9999, 0.9999]); // below the threshold (−0.0009 dBFS): not clipping
    put(196, [-1, -1, -1, -1]); // run reaching the end of the clip: counts (4)
    const r = measureLevels([x], { sampleRate: 1000, silenceWindowS: 0.01 }).perChannel[0];
    expect(r.clippedRuns).toBe(5);
    expect(r.clippedSamples).toBe(3 + 5 + 3 + 4 + 4);
  });

  it('carries a run across silence-window boundaries and ends it in a window without clipping', () => {
    // 10-sample windows (1 kHz, 10 ms). Counts below are by hand from the placed runs.
    const x = new Float32Array(120);
    x.fill(1, 8, 13); // 5 samples over the boundary at 10: one run of 5
    x.fill(-1, 17, 20); // 3 samples ending on a window's last sample; window 2 is clean: counts (3)
    x.fill(1, 38, 40); // 2 samples ending window 3 ...
    x.fill(1, 40, 41); // ... continued by 1 in window 4: one run of 3
    x.fill(-1, 59, 61); // 2 over the boundary at 60: too short
    x.fill(1, 78, 80); // 2 at the end of window 7 ...
    x.fill(-1, 80, 82); // ... then 2 of the other sign in window 8: two runs of 2, neither counts
    x.fill(-1, 88, 90); // 2 ending window 8; window 9 is clean, so ...
    x.fill(-1, 100, 102); // ... these 2 of the same sign are a new run: neither counts
    x.fill(1, 111, 120); // 9 reaching the end of the clip: counts
    const r = measureLevels([x], { sampleRate: 1000, silenceWindowS: 0.01 }).perChannel[0];
    expect(r.clippedRuns).toBe(4);
    expect(r.clippedSamples).toBe(5 + 3 + 3 + 9);
    const r2 = measureLevels([x], { sampleRate: 1000, silenceWindowS: 0.01, minClipRun: 2 }).perChannel[0];
    expect([r2.clippedRuns, r2.clippedSamples]).toEqual([9, 5 + 3 + 3 + 2 + 2 + 2 + 2 + 2 + 9]);
  });

  it('follows minClipRun and clipThreshold', () => {
    const x = new Float32Array(100);
    x.fill(1, 10, 12); // run of 2
    x.fill(0.95, 50, 55); // run of 5 at 0.95
    const r1 = measureLevels([x], { sampleRate: 1000, silenceWindowS: 0.01, minClipRun: 2 }).overall;
    expect([r1.clippedRuns, r1.clippedSamples]).toEqual([1, 2]);
    // Float32 0.95 is 0.94999999; samples are compared as stored, so give the threshold as float32.
    const r2 = measureLevels([x], { sampleRate: 1000, silenceWindowS: 0.01, clipThreshold: Math.fround(0.95) }).overall;
    expect([r2.clippedRuns, r2.clippedSamples]).toEqual([1, 5]);
  });

  it('uses a default threshold that catches +32767/32768 but not +32766/32768', () => {
    // Why not 1 − 0.5/32768: it lies above the largest positive 16-bit code. common practice
    expect(32767 / 32768).toBeGreaterThanOrEqual(DEFAULT_CLIP_THRESHOLD);
    expect(32766 / 32768).toBeLessThan(DEFAULT_CLIP_THRESHOLD);
    expect(32767 / 32768).toBeLessThan(1 - 0.5 / 32768);
  });
});

describe('measureLevels: near-silence', () => {
  it('reports the fraction of duration in windows below −60 dBFS RMS', () => {
    // 1 s at −20 dBFS peak, 1 s of digital silence, 0.5 s at −70 dBFS peak (−73 dBFS RMS).
    const loud = sine(FS, 1000, 0.1);
    const quiet = sine(FS / 2, 1000, Math.pow(10, -70 / 20));
    const x = new Float32Array(2.5 * FS);
    x.set(loud, 0);
    x.set(quiet, 2 * FS);
    const r = measureLevels([x], { sampleRate: FS }).perChannel[0];
    // 50 ms windows (2400 samples) align with the segment edges, so the fraction is exact.
    expect(r.nearSilenceFraction).toBeCloseTo(1.5 / 2.5, 12);
    // At a −80 dBFS threshold the −73 dBFS RMS passage is no longer near-silent; digital silence still is.
    const r2 = measureLevels([x], { sampleRate: FS, silenceThresholdDbfs: -80 }).perChannel[0];
    expect(r2.nearSilenceFraction).toBeCloseTo(1 / 2.5, 12);
  });

  it('weighs a short tail window by its length', () => {
    // 1.01 s at 48 kHz: 20 full windows of sound, then a 10 ms silent tail.
    const x = new Float32Array(48480);
    x.set(sine(48000, 1000, 0.5));
    const r = measureLevels([x], { sampleRate: FS }).overall;
    expect(r.nearSilenceFraction).toBeCloseTo(480 / 48480, 12);
  });
});

describe('measureLevels: channels', () => {
  it('reports stereo overall over every sample and per channel separately', () => {
    const left = sine(FS, 1000, 1);
    const right = sine(FS, 1000, 0.5, 0.1);
    const r = measureLevels([left, right], { sampleRate: FS });
    const [l, rr] = r.perChannel;
    expect(l.rms).toBeCloseTo(Math.SQRT1_2, 7);
    expect(rr.rms).toBeCloseTo(Math.sqrt(0.125 + 0.01), 7);
    // Overall: RMS over all samples of both channels = √(mean of the mean squares); peak of any.
    // Tolerance 1e-7: float32 sample rounding as above.
    expect(r.overall.rms).toBeCloseTo(Math.sqrt((0.5 + 0.135) / 2), 7);
    expect(r.overall.samplePeak).toBeCloseTo(1, 7);
    expect(r.overall.dcOffset).toBeCloseTo(0.05, 7);
    expect(r.overall.crestDb).toBeCloseTo(20 * Math.log10(1 / Math.sqrt(0.3175)), 5);
    expect(r.sampleCount).toBe(FS);
    expect(r.durationS).toBeCloseTo(1, 12);
  });

  it('counts a window as near-silent overall only when all channels together are below threshold', () => {
    // Left silent throughout; right loud in the first second only.
    const left = new Float32Array(2 * FS);
    const right = new Float32Array(2 * FS);
    right.set(sine(FS, 1000, 0.5));
    const r = measureLevels([left, right], { sampleRate: FS });
    expect(r.perChannel[0].nearSilenceFraction).toBeCloseTo(1, 12);
    expect(r.perChannel[1].nearSilenceFraction).toBeCloseTo(0.5, 12);
    expect(r.overall.nearSilenceFraction).toBeCloseTo(0.5, 12);
  });

  it('gives each channel the same levels whichever channels it is measured with', () => {
    // Invariant: channels are summed in pairs, but each channel's additions happen in the same order
    // as when it is measured alone, so its levels are identical (exact comparison intended).
    const a = sine(FS + 7, 1000, 1.2); // beyond full scale: clipped runs
    const b = sine(FS + 7, 440, 0.3, 0.01);
    const c = new Float32Array(FS + 7);
    c.set(sine(FS / 2, 1000, 1.5), FS / 4); // clipping between silences
    const alone = [a, b, c].map((x) => measureLevels([x], { sampleRate: FS }).perChannel[0]);
    expect(alone[0].clippedRuns).toBeGreaterThan(0);
    expect(alone[2].clippedRuns).toBeGreaterThan(0);
    for (const [set, idx] of [
      [[a, b, c], [0, 1, 2]],
      [[c, a], [2, 0]],
      [[b, c, a, b], [1, 2, 0, 1]],
    ] as const) {
      const r = measureLevels([...set], { sampleRate: FS });
      idx.forEach((k, i) => expect(r.perChannel[i]).toEqual(alone[k]));
      expect(r.overall.clippedRuns).toBe(idx.reduce((t: number, k) => t + alone[k].clippedRuns, 0));
      expect(r.overall.samplePeak).toBe(Math.max(...idx.map((k) => alone[k].samplePeak)));
    }
  });

  it('reports digital silence as −∞ dBFS with NaN crest', () => {
    const r = measureLevels([new Float32Array(1000)], { sampleRate: FS }).overall;
    expect(r.rmsDbfs).toBe(-Infinity);
    expect(r.samplePeakDbfs).toBe(-Infinity);
    expect(r.crestDb).toBeNaN();
    expect(r.nearSilenceFraction).toBeCloseTo(1, 12);
  });
});

describe('measureLevels: validation', () => {
  it('rejects bad input with messages naming the problem', () => {
    const x = new Float32Array(100);
    expect(() => measureLevels([], { sampleRate: FS })).toThrow(/channels is empty/);
    expect(() => measureLevels([new Float32Array(0)], { sampleRate: FS })).toThrow(/no samples/);
    expect(() => measureLevels([x, new Float32Array(99)], { sampleRate: FS })).toThrow(/channel 1 has 99/);
    expect(() => measureLevels([x], { sampleRate: 0 })).toThrow(/sampleRate/);
    expect(() => measureLevels([x], { sampleRate: FS, silenceWindowS: 0 })).toThrow(/silenceWindowS/);
    expect(() => measureLevels([x], { sampleRate: FS, minClipRun: 0 })).toThrow(/minClipRun/);
    const bad = new Float32Array(100);
    bad[50] = NaN;
    expect(() => measureLevels([x, bad], { sampleRate: FS })).toThrow(/channel 1 contains NaN/);
  });
});
