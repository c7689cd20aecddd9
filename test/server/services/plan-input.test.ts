/**
 * Planning in bounded memory (server/services/analysis.ts loadForPlanning): the planner's input
 * read off the file block by block, without the decoded channels, equals the one built from the
 * full analysis (analyzeClip, then toPlanClip), and the decoder's discardSamples mode hands over the
 * same samples as a whole decode.
 */
import { mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { decodeAudioFile } from '../../../server/audio/decode.ts';
import { encodeWav } from '../../../server/audio/wav.ts';
import { loadForPlanning } from '../../../server/services/planning-input.ts';
import { analyzeClip } from '../../../shared/analysis/analyze-clip.ts';
import { modulationSource } from '../../../shared/audio/clip.ts';
import { toPlanClip } from '../../../shared/plan/plan-clip.ts';
import type { SampleBlocks } from '../../../shared/preview/sample-blocks.ts';
import { uniformNoise } from '../../shared/dsp/uniform-noise.ts';

const FS = 44100;
const dir = mkdtempSync(join(tmpdir(), 'coilcue-plan-input-'));
afterAll(() => rmSync(dir, { recursive: true, force: true }));

// 13 s of stereo (three of the decoder's 1 MiB blocks of 2^18 frames): tones out of step plus noise.
const n = 13 * FS;
const l = uniformNoise(n, 0.2, 5).map((v, i) => v + 0.5 * Math.sin((2 * Math.PI * 330 * i) / FS));
const r = uniformNoise(n, 0.2, 6).map((v, i) => v + 0.4 * Math.sin((2 * Math.PI * 330 * i) / FS + 2));
const path = join(dir, 'clip.wav');

/** Exact equality of two numeric arrays, element by element (far quicker than a deep toEqual). */
function same(a: ArrayLike<number>, b: ArrayLike<number>): void {
  expect(a.length).toBe(b.length);
  let bad = -1;
  for (let i = 0; i < a.length && bad < 0; i++) if (!Object.is(a[i], b[i])) bad = i;
  expect(bad).toBe(-1);
}
/** Every sample of a block source, in one array. */
function readAll(src: SampleBlocks): Float32Array {
  const out = new Float32Array(src.length);
  for (let a = 0; a < src.length; a += src.maxBlock) out.set(src.read(a, Math.min(src.maxBlock, src.length - a)), a);
  return out;
}
writeFileSync(path, encodeWav({ sampleRate: FS, channels: [l, r] }, { format: 's16', seed: 1 }));

describe('loadForPlanning', () => {
  it('gives the planner what the full analysis gives it, without the channels', async () => {
    const clip = await decodeAudioFile(path);
    const full = analyzeClip(clip, { channel: 'mix' });
    const source = modulationSource(clip, 'mix');
    const want = toPlanClip('clip', full, source, { scheme: 'pulse' });
    const got = await loadForPlanning(path, { name: 'clip', pulses: true, keepSource: true });
    // a WAV file's source is read again from the file, block by block: the same samples
    same(readAll(got.source!), source);
    got.source!.close();
    same(got.planClip.frames.mean, want.frames.mean);
    same(got.planClip.frames.meanSquare, want.frames.meanSquare);
    same(got.planClip.frames.min, want.frames.min);
    same(got.planClip.frames.max, want.frames.max);
    expect(Array.from(got.planClip.histogram.counts)).toEqual(Array.from(want.histogram.counts));
    same(got.planClip.pulseEvents!.timeS, want.pulseEvents!.timeS);
    same(got.planClip.pulseEvents!.level, want.pulseEvents!.level);
    // Welch's segments summed in stretches (WelchStream): equal within float64 rounding.
    const w = await loadForPlanning(path, { name: 'clip', pulses: false });
    expect(w.analysis.spectrum.welch!.segments).toBe(full.spectrum.welch.segments);
    const psd = full.spectrum.welch.psd;
    for (const p of [w, got]) for (let k = 0; k < psd.length; k++) expect(Math.abs(p.analysis.spectrum.welch!.psd[k] - psd[k])).toBeLessThanOrEqual(1e-12 * psd[k] + 1e-300);
    expect(got.clip).toMatchObject({ channelCount: 2, sampleCount: n, sampleRate: FS, format: 'wav' });
  });

  it('keeps no source unless asked, and refuses the right channel of a mono file', async () => {
    const got = await loadForPlanning(path, { name: 'clip', pulses: false });
    expect(got.source).toBeNull();
    expect(got.planClip.pulseEvents).toBeUndefined();
    const mono = join(dir, 'mono.wav');
    writeFileSync(mono, encodeWav({ sampleRate: FS, channels: [l.subarray(0, FS)] }, { format: 's16' }));
    await expect(loadForPlanning(mono, { name: 'm', pulses: false, channel: 'right' })).rejects.toMatchObject({ code: 'bad-channel' });
  });
});

describe('decodeAudioFile discardSamples', () => {
  it('hands over every frame once, in order, in reused block arrays, and keeps none', async () => {
    const whole = await decodeAudioFile(path);
    const seen = [new Float32Array(n), new Float32Array(n)];
    let at = 0;
    let started = 0;
    const clip = await decodeAudioFile(path, {
      discardSamples: true,
      onStart: (frames, channels, fs) => {
        started++;
        expect([frames, channels, fs]).toEqual([n, 2, FS]);
      },
      onFrames: (chs, from, to) => {
        expect(chs[0].length).toBeLessThan(n);
        for (let c = 0; c < 2; c++) seen[c].set(chs[c].subarray(from, to), at);
        at += to - from;
      },
    });
    expect(started).toBe(1);
    expect(at).toBe(n);
    same(seen[0], whole.channels[0]);
    same(seen[1], whole.channels[1]);
    expect(clip.channels.map((c) => c.length)).toEqual([0, 0]);
    expect(clip.durationS).toBeCloseTo(13, 9);
  });
});
