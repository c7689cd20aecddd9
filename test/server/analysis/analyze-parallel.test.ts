// analyzeClipParallel (server/analysis/analyze-parallel.ts): the same ClipAnalysis as analyzeClip,
// whichever thread ran each task, for every modulation source and memory layout; the fallbacks
// when the worker cannot help. Equality is exact (toEqual on every number and typed array): each
// task runs the same code on the same samples in either thread, so there is no rounding to allow for.
import { describe, expect, it } from 'vitest';
import { AnalysisWorker, type TaskTiming, analyzeClipParallel, startAnalysisWorker } from '../../../server/analysis/analyze-parallel.ts';
import { analyzeClip } from '../../../shared/analysis/analyze-clip.ts';
import { type AudioClip, modulationSource } from '../../../shared/audio/clip.ts';

const FS = 44100;

/** 3 s of two different chords with noise, so every figure (pitch, bands, clipping runs…) is non-trivial. */
function synth(seconds: number, shared: boolean): AudioClip {
  const n = Math.round(seconds * FS);
  const alloc = () => (shared ? new Float32Array(new SharedArrayBuffer(4 * n)) : new Float32Array(n));
  const l = alloc();
  const r = alloc();
  let s = 12345;
  for (let i = 0; i < n; i++) {
    s = (Math.imul(s, 1664525) + 1013904223) >>> 0;
    const noise = 0.01 * (s / 2 ** 31 - 1);
    const t = i / FS;
    const note = t < seconds / 2 ? 220 : 330;
    l[i] = 0.4 * Math.sin(2 * Math.PI * note * t) + 0.2 * Math.sin(2 * Math.PI * 2.01 * note * t) + noise;
    r[i] = 0.3 * Math.sin(2 * Math.PI * 1.5 * note * t + 1) + noise;
  }
  r[1000] = r[1001] = r[1002] = 1; // one clipped run of 3 samples
  return { sampleRate: FS, channels: [l, r] };
}

describe('analyzeClipParallel gives analyzeClip’s result exactly', () => {
  const plain = synth(3, false);
  const shared = synth(3, true);

  it('mix of a stereo clip in shared memory: all tasks shared, the worker runs some of them', async () => {
    const timings: TaskTiming[] = [];
    const worker = startAnalysisWorker();
    expect(await worker.ready).toBe(true); // started early, as the command line does, so it can take part
    const got = await analyzeClipParallel(shared, { worker, onTask: (t) => timings.push(t) });
    expect(got).toEqual(analyzeClip(shared));
    // eight tasks and the mix, each once; the worker took part (it may run channel tasks too)
    expect(timings.map((t) => t.task).sort()).toEqual(['frames', 'levels', 'loudness', 'mix', 'pitch', 'source levels', 'spectrum', 'true peak']);
    expect(timings.some((t) => t.thread === 'worker')).toBe(true);
    for (const t of timings) expect(t.endMs).toBeGreaterThanOrEqual(t.startMs);
  });

  it('channels in ordinary memory, and each single-channel source', async () => {
    expect(await analyzeClipParallel(plain)).toEqual(analyzeClip(plain));
    for (const channel of ['left', 'right'] as const) {
      expect(await analyzeClipParallel(plain, { channel, frameS: 0.002 })).toEqual(analyzeClip(plain, { channel, frameS: 0.002 }));
      expect(await analyzeClipParallel(shared, { channel, fftSize: 1024 })).toEqual(analyzeClip(shared, { channel, fftSize: 1024 }));
    }
  });

  it('a mono clip (its source levels are the clip’s own, as in analyzeClip)', async () => {
    const mono = { sampleRate: 22050, channels: [plain.channels[0].slice(0, 22050 * 2)] };
    const got = await analyzeClipParallel(mono);
    expect(got).toEqual(analyzeClip(mono));
    expect(got.level.modulation.rmsDbfs).toBe(got.level.rmsDbfs);
  });

  it('reports non-decreasing progress from the first task to (1, "done")', async () => {
    const seen: [number, string][] = [];
    await analyzeClipParallel(shared, { onProgress: (f, stage) => seen.push([f, stage]) });
    expect(seen.at(-1)).toEqual([1, 'done']);
    for (let i = 1; i < seen.length; i++) expect(seen[i][0]).toBeGreaterThanOrEqual(seen[i - 1][0]);
  });
});

describe('fallbacks and errors', () => {
  const clip = synth(1, true);
  const expected = analyzeClip(clip);

  it('a worker that cannot start, or none (one core): this thread does everything', async () => {
    for (const entry of [new URL('./no-such-entry.cjs', import.meta.url), null]) {
      const broken = new AnalysisWorker(entry);
      expect(await broken.ready).toBe(false);
      expect(broken.available).toBe(false);
      const timings: TaskTiming[] = [];
      expect(await analyzeClipParallel(clip, { worker: broken, onTask: (t) => timings.push(t) })).toEqual(expected);
      expect(timings.every((t) => t.thread === 'main')).toBe(true);
    }
  });

  it('a worker terminated before the analysis, or already used: the same result', async () => {
    const w = startAnalysisWorker();
    await w.terminate();
    expect(w.available).toBe(false);
    expect(await analyzeClipParallel(clip, { worker: w })).toEqual(expected);
  });

  // Test doubles (test/fixtures/analysis/) claim the first task of the list and then exit, or report it failed.
  for (const [file, what] of [['claim-and-exit.cjs', 'dies holding a task'], ['claim-and-fail.cjs', 'reports a task failed']]) {
    it(`a worker that ${what}: that task is run here`, async () => {
      const w = new AnalysisWorker(new URL(`../../fixtures/analysis/${file}`, import.meta.url));
      expect(await w.ready).toBe(true);
      const timings: TaskTiming[] = [];
      expect(await analyzeClipParallel(clip, { worker: w, onTask: (t) => timings.push(t) })).toEqual(expected);
      expect(timings.filter((t) => t.task === 'loudness')).toHaveLength(1); // the first task of the list
      expect(timings.every((t) => t.thread === 'main')).toBe(true);
    });
  }

  it('a task that throws in the worker throws here too: analyzeClip’s error', async () => {
    const bad = synth(1, true);
    bad.channels[0][500] = Number.NaN;
    const message = (() => {
      try {
        analyzeClip(bad);
      } catch (e) {
        return (e as Error).message;
      }
    })();
    expect(message).toMatch(/NaN/);
    const w = startAnalysisWorker();
    await w.ready;
    await expect(analyzeClipParallel(bad, { worker: w })).rejects.toThrow(message);
    expect(w.available).toBe(false);
  });

  it('bad input rejects with analyzeClip’s RangeError and terminates the worker it was given', async () => {
    const w = startAnalysisWorker();
    await expect(analyzeClipParallel({ sampleRate: FS, channels: [clip.channels[0]] }, { channel: 'right', worker: w })).rejects.toThrow(/mono/);
    expect(w.available).toBe(false);
    await expect(analyzeClipParallel({ sampleRate: FS, channels: [] })).rejects.toThrow(RangeError);
  });
});

describe('donated channels: the mix written over channel 0 once the channel tasks have read it', () => {
  const copy = (c: AudioClip): AudioClip => ({ sampleRate: c.sampleRate, channels: c.channels.map((x) => x.slice()) });
  const clip = synth(1, true);
  const expected = analyzeClip(copy(clip));
  const mix = modulationSource(copy(clip), 'mix');

  it('shared channels: analyzeClip’s result; channel 0 then holds the mix, written after every channel task', async () => {
    const given = synth(1, true);
    const timings: TaskTiming[] = [];
    const w = startAnalysisWorker();
    await w.ready;
    expect(await analyzeClipParallel(given, { worker: w, donateChannels: true, onTask: (t) => timings.push(t) })).toEqual(expected);
    expect(Array.from(given.channels[0])).toEqual(Array.from(mix));
    expect(Array.from(given.channels[1])).toEqual(Array.from(clip.channels[1])); // only channel 0 is reused
    const mixAt = timings.find((t) => t.task === 'mix')!;
    for (const t of timings.filter((x) => ['levels', 'true peak', 'loudness'].includes(x.task))) expect(mixAt.startMs).toBeGreaterThanOrEqual(t.endMs);
    for (const t of timings.filter((x) => ['pitch', 'spectrum', 'frames', 'source levels'].includes(x.task))) expect(t.startMs).toBeGreaterThanOrEqual(mixAt.endMs);
  });

  it('without a worker the mix goes over channel 0 in place too; a single-channel source leaves the clip alone', async () => {
    const alone = copy(clip);
    expect(await analyzeClipParallel(alone, { worker: new AnalysisWorker(null), donateChannels: true })).toEqual(expected);
    expect(Array.from(alone.channels[0])).toEqual(Array.from(mix));
    const left = synth(1, true);
    expect(await analyzeClipParallel(left, { channel: 'left', donateChannels: true })).toEqual(analyzeClip(copy(clip), { channel: 'left' }));
    expect(Array.from(left.channels[0])).toEqual(Array.from(clip.channels[0]));
  });

  // The test doubles claim the first task of the list, here a channel task, and exit or report it failed.
  for (const [file, what] of [['claim-and-exit.cjs', 'dies holding a channel task'], ['claim-and-fail.cjs', 'reports a channel task failed']]) {
    it(`a worker that ${what}: that task is run here before the mix is written`, async () => {
      const given = synth(1, true);
      const w = new AnalysisWorker(new URL(`../../fixtures/analysis/${file}`, import.meta.url));
      expect(await w.ready).toBe(true);
      expect(await analyzeClipParallel(given, { worker: w, donateChannels: true })).toEqual(expected);
      expect(Array.from(given.channels[0])).toEqual(Array.from(mix));
    });
  }

  it('bad samples: analyzeClip’s error, and channel 0 is left as it was', async () => {
    const bad = synth(1, true);
    bad.channels[1][700] = Number.NaN;
    const before = bad.channels[0].slice();
    const w = startAnalysisWorker();
    await w.ready;
    await expect(analyzeClipParallel(bad, { worker: w, donateChannels: true })).rejects.toThrow(/channel 1 contains NaN/);
    expect(Array.from(bad.channels[0])).toEqual(Array.from(before));
  });
});
