/**
 * Child process of the benchmark: analyses one file the way the analyze command does
 * (server/services/analysis.ts, analyzeFile: the analysis worker started first, the file analysed
 * in one pass as it is decoded, the source part on the worker), then prints its own timings and
 * peak resident memory as JSON. Run alone so the memory figure is the analysis's, not the
 * generator's. It runs the sources through tsx (not the command line's prebuilt bundles), so its
 * times include some compiling: they say where the time goes, the command's figure is the measure.
 *
 * `--sequential` runs the source part on this thread too (no worker), for comparison.
 * Output: totalMs (from before the worker start to the result), decodeMs (to the end of decoding,
 * with the channel part, which runs as each block arrives), sourcePart (where it ran, and its start
 * and end in ms from the start), maxRssMiB.
 */
import { analyzeFileStream } from '../../server/analysis/analyze-stream.ts';
import { AnalysisWorker, startAnalysisWorker } from '../../server/analysis/worker-handle.ts';
import { peakRssKiB } from './peak-rss.cjs';

/** Run by test/bench/child.mjs (tsx's CommonJS hook, as bin/coilcue.cjs runs the product without its bundles). */
export async function main(): Promise<void> {
  const file = process.argv[2];
  const sequential = process.argv.includes('--sequential');
  const t0 = performance.now();
  const origin = performance.timeOrigin + t0;
  const worker = sequential ? new AnalysisWorker(null) : startAnalysisWorker();
  let decodedMs = 0;
  let sourcePart = { where: '', startMs: 0, endMs: 0 };
  await analyzeFileStream(file, {
    worker,
    onProgress: (_f, stage) => {
      if (stage !== 'analysing' && decodedMs === 0) decodedMs = performance.now() - t0;
    },
    onSourcePart: (where, a, b) => (sourcePart = { where, startMs: a - origin, endMs: b - origin }),
  });
  const totalMs = performance.now() - t0;
  process.stdout.write(JSON.stringify({ totalMs, decodeMs: decodedMs || sourcePart.startMs, sourcePart, maxRssMiB: peakRssKiB() / 1024 }) + '\n');
}
