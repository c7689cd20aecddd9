/**
 * `npm run bench`: speed and memory of the analysis engine on a 5-minute 44.1 kHz stereo 16-bit
 * WAV of our own synthesised demo music, written to a temporary folder. Prints wall time,
 * real-time factor and peak RSS of decoding plus the full analysis as the command line runs them
 * (analyze-once.ts: both cores, analyzeClipParallel), where each task ran, and one run on a single
 * thread (analyzeClip) for comparison; where ffmpeg is on PATH, also times its EBU R 128 loudness
 * pass (`ffmpeg -af ebur128=peak=true -f null -`) on the same file and prints our time as a ratio of
 * it. Targets (from the project's issue on the analysis engine): ratio ≤ 0.8, peak RSS < 256 MiB.
 */
import { execFileSync, spawnSync } from 'node:child_process';
import { mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { encodeWav, writeWavAtomic } from '../../server/audio/wav.ts';
import { synthLongDemo } from '../../shared/demo/clips.ts';
import { runPlanBench } from './plan-bench.ts';

const DURATION_S = 300;
const here = fileURLToPath(new URL('.', import.meta.url));
const dir = mkdtempSync(join(tmpdir(), 'coilcue-bench-'));
const wav = join(dir, 'five-minutes.wav');

function median(xs: number[]): number {
  const s = [...xs].sort((a, b) => a - b);
  return s[Math.floor(s.length / 2)];
}

try {
  const t = performance.now();
  await writeWavAtomic(wav, encodeWav(synthLongDemo(DURATION_S, 44100), { format: 's16', seed: 1 }));
  console.log(`generated ${DURATION_S} s stereo 44.1 kHz 16-bit WAV in ${((performance.now() - t) / 1000).toFixed(2)} s`);

  interface Run { totalMs: number; decodeMs: number; analyzeMs: number; maxRssMiB: number; stagesMs: Record<string, number>; timeline: string[] }
  const once = (...extra: string[]): Run =>
    JSON.parse(execFileSync(process.execPath, [join(here, 'child.mjs'), join(here, 'analyze-once.ts'), wav, ...extra], { encoding: 'utf8' }));
  // ffmpeg's pass is timed between our runs, so both see the same state of a shared, noisy machine.
  const hasFfmpeg = spawnSync('sh', ['-c', 'command -v ffmpeg'], { encoding: 'utf8' }).status === 0;
  const ffmpegS = (): number => {
    const t0 = performance.now();
    spawnSync('ffmpeg', ['-hide_banner', '-nostats', '-i', wav, '-af', 'ebur128=peak=true', '-f', 'null', '-'], { encoding: 'utf8' });
    return (performance.now() - t0) / 1000;
  };
  const runs: Run[] = [];
  const ffTimes: number[] = [];
  for (let i = 0; i < 3; i++) {
    runs.push(once());
    if (hasFfmpeg) ffTimes.push(ffmpegS());
  }
  const totalS = median(runs.map((r) => r.totalMs)) / 1000;
  const rss = Math.max(...runs.map((r) => r.maxRssMiB));
  const last = runs[runs.length - 1];
  console.log(`analysis (decode + full analysis, both cores), median of ${runs.length}: ${totalS.toFixed(3)} s (runs ${runs.map((r) => (r.totalMs / 1000).toFixed(2)).join(', ')})`);
  console.log(`  decode ${(median(runs.map((r) => r.decodeMs)) / 1000).toFixed(3)} s, analysis ${(median(runs.map((r) => r.analyzeMs)) / 1000).toFixed(3)} s`);
  console.log(`  tasks (last run, ms from the end of decoding): ${last.timeline.join(', ')}`);
  console.log(`  real-time factor: ${(totalS / DURATION_S).toFixed(5)} (${(DURATION_S / totalS).toFixed(0)}× faster than real time)`);
  console.log(`  peak RSS: ${rss.toFixed(1)} MiB (target < 256 MiB): ${rss < 256 ? 'met' : 'NOT MET'}`);
  if (hasFfmpeg) {
    const ff = median(ffTimes);
    const ratio = totalS / ff;
    console.log(`ffmpeg ebur128=peak=true, median of 3: ${ff.toFixed(3)} s (runs ${ffTimes.map((t) => t.toFixed(2)).join(', ')}); ratio ours/ffmpeg ${ratio.toFixed(2)} (target ≤ 0.8): ${ratio <= 0.8 ? 'met' : 'NOT MET'}`);
  } else {
    console.log('ffmpeg not on PATH: ratio not measured (apt-get install -y ffmpeg to compare)');
  }
  const seq = once('--sequential');
  console.log(
    `one thread (analyzeClip), for comparison: ${(seq.totalMs / 1000).toFixed(3)} s, peak RSS ${seq.maxRssMiB.toFixed(1)} MiB; ` +
      `stages ${Object.entries(seq.stagesMs).map(([k, v]) => `${k} ${v.toFixed(0)} ms`).join(', ')}`,
  );

  await runPlanBench(wav);
} finally {
  rmSync(dir, { recursive: true, force: true });
}
