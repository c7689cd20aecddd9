/**
 * Child process of the benchmark: decodes and analyses one file the way the analyze command does
 * (server/cli/commands/analyze.ts, analyzeFile: the analysis worker started before decoding, the
 * channels decoded into shared memory, analyzeClipParallel with the channels given up, so the mix
 * goes over channel 0), then prints its own timings and peak resident memory as JSON. Run alone so
 * the memory figure is the analysis's, not the generator's.
 *
 * `--sequential` times analyzeClip on one thread instead (no worker), for comparison.
 * Output: decodeMs, analyzeMs, totalMs (from before the worker start to the result), stagesMs
 * (each task's duration, keyed "thread:task" in the parallel run, by stage in the sequential one),
 * timeline (each task's start and end, ms from the start of the analysis), durationS, maxRssMiB.
 */
import { analyzeClipParallel, startAnalysisWorker } from '../../server/analysis/analyze-parallel.ts';
import { decodeAudioFile } from '../../server/audio/decode.ts';
import { analyzeClip } from '../../shared/analysis/analyze-clip.ts';
import { peakRssKiB } from './peak-rss.cjs';

/** Run by test/bench/child.mjs (tsx's CommonJS hook, as bin/coilcue.cjs runs the product). */
export async function main(): Promise<void> {
  const file = process.argv[2];
  const sequential = process.argv.includes('--sequential');
  const t0 = performance.now();
  const worker = sequential ? undefined : startAnalysisWorker();
  const clip = await decodeAudioFile(file, { sharedChannels: !sequential });
  const t1 = performance.now();
  const stages: Record<string, number> = {};
  const timeline: string[] = [];
  if (sequential) {
    let last = t1;
    let lastStage = '';
    analyzeClip(clip, {
      onProgress: (_f, stage) => {
        const now = performance.now();
        if (lastStage) stages[lastStage] = now - last;
        last = now;
        lastStage = stage;
      },
    });
  } else {
    const origin = performance.timeOrigin + t1;
    await analyzeClipParallel(clip, {
      worker,
      donateChannels: true,
      onTask: (t) => {
        stages[`${t.thread}:${t.task}`] = t.endMs - t.startMs;
        timeline.push(`${t.thread} ${t.task} ${(t.startMs - origin).toFixed(0)}–${(t.endMs - origin).toFixed(0)}`);
      },
    });
  }
  const t2 = performance.now();
  process.stdout.write(
    JSON.stringify({
      decodeMs: t1 - t0,
      analyzeMs: t2 - t1,
      totalMs: t2 - t0,
      stagesMs: stages,
      timeline,
      durationS: clip.channels[0].length / clip.sampleRate,
      maxRssMiB: peakRssKiB() / 1024,
    }) + '\n',
  );
}
