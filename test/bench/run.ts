/**
 * `npm run bench`: speed and memory of the analysis engine on a 5-minute 44.1 kHz stereo 16-bit
 * WAV of our own synthesised demo music, written to a temporary folder.
 *
 * The measured figure is the command a user runs, end to end: `node bin/coilcue.cjs analyze <file>
 * --json`, from spawning the process to its exit (Node's start-up, loading the modules, decoding,
 * the analysis on both cores, the JSON written), with its peak RSS reported by an exit hook
 * preloaded with --require (rss-on-exit.cjs, reading /proc/self/status: see peak-rss.cjs for why not
 * getrusage). Where ffmpeg is on PATH, its EBU R 128 loudness pass
 * (`ffmpeg -af ebur128=peak=true -f null -`) is timed the same way on the same file, runs
 * interleaved with ours, and the ratio is printed twice: of the two medians, and the median of each
 * of our runs over the ffmpeg run right after it. Targets (from the project's issue on the analysis
 * engine): ratio ≤ 0.8 (both must meet it), peak RSS < 256 MiB.
 *
 * For diagnosis it then prints, from one in-process run (analyze-once.ts), when decoding (with the
 * channel part) ended and when the source part ran on the worker, and the same on one thread.
 *
 * Parts: `npm run bench -- [analyze] [plan] [engine] [server] [web]` runs only those (all by
 * default); the server part alone times the command line's analyze three times as its reference.
 */
import { execFileSync, spawnSync } from 'node:child_process';
import { mkdtempSync, readFileSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { encodeWav, writeWavAtomic } from '../../server/audio/wav.ts';
import { synthLongDemo } from '../../shared/demo/clips.ts';
import { runEngineBench } from './engine-bench.ts';
import { runPlanBench } from './plan-bench.ts';
import { runServerBench } from './server-bench.ts';
import { printWebBench } from './web-bench.ts';

const DURATION_S = 300;
const PARTS = ['analyze', 'plan', 'engine', 'server', 'web'] as const;
const asked = process.argv.slice(2);
for (const a of asked) {
  if (!(PARTS as readonly string[]).includes(a)) {
    console.error(`bench: unknown part "${a}"; choose from ${PARTS.join(', ')} (none runs them all)`);
    process.exit(2);
  }
}
const part = (name: (typeof PARTS)[number]) => asked.length === 0 || asked.includes(name);
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

  const bin = join(here, '..', '..', 'bin', 'coilcue.cjs');
  const rssFile = join(dir, 'rss');
  /** The executable end to end: wall seconds from spawn to exit, peak RSS in MiB. */
  const command = (): { s: number; rssMiB: number; cpuS: number } => {
    const t0 = performance.now();
    const r = spawnSync(process.execPath, ['--require', join(here, 'rss-on-exit.cjs'), bin, 'analyze', wav, '--json'], {
      env: { ...process.env, COILCUE_BENCH_RSS_FILE: rssFile },
      stdio: ['ignore', 'ignore', 'pipe'],
      encoding: 'utf8',
    });
    const s = (performance.now() - t0) / 1000;
    if (r.status !== 0) throw new Error(`coilcue analyze exited ${r.status}: ${r.stderr}`);
    const m = JSON.parse(readFileSync(rssFile, 'utf8')) as { rssKiB: number; cpuS: number };
    return { s, rssMiB: m.rssKiB / 1024, cpuS: m.cpuS };
  };
  // ffmpeg's pass is timed between our runs, so both see the same state of a shared, noisy machine.
  const hasFfmpeg = spawnSync('sh', ['-c', 'command -v ffmpeg'], { encoding: 'utf8' }).status === 0;
  // ffmpeg's CPU time (user + system) from the shell's `times`, whose second line is its children's.
  const ffCpu: number[] = [];
  const ffmpegS = (): number => {
    const t0 = performance.now();
    const r = spawnSync('bash', ['-c', 'ffmpeg -hide_banner -nostats -i "$1" -af ebur128=peak=true -f null - 2>/dev/null; times', 'bench', wav], { encoding: 'utf8' });
    const s = (performance.now() - t0) / 1000;
    const line = r.stdout.trim().split('\n').pop() ?? '';
    const secs = [...line.matchAll(/(\d+)m([\d.]+)s/g)].map((m) => 60 * Number(m[1]) + Number(m[2]));
    ffCpu.push(secs.length === 2 ? secs[0] + secs[1] : Number.NaN);
    return s;
  };
  command(); // a first run builds the command line's bundles (server/prebuilt.cjs), as any earlier use of the tool has
  if (!part('analyze')) {
    if (part('plan')) await runPlanBench(wav);
    if (part('engine')) await runEngineBench(dir, wav);
    // The server's reference only: the command line's analyze, median of three.
    if (part('server')) await runServerBench(wav, median([command().s, command().s, command().s]));
    if (part('web')) printWebBench();
  } else {
    const runs: { s: number; rssMiB: number; cpuS: number }[] = [];
    const ffTimes: number[] = [];
    for (let i = 0; i < 7; i++) {
      runs.push(command());
      if (hasFfmpeg) ffTimes.push(ffmpegS());
  }
  const totalS = median(runs.map((r) => r.s));
  const rss = Math.max(...runs.map((r) => r.rssMiB));
  console.log(`coilcue analyze --json, end to end, median of ${runs.length}: ${totalS.toFixed(3)} s (runs ${runs.map((r) => r.s.toFixed(2)).join(', ')})`);
  console.log(`  real-time factor: ${(totalS / DURATION_S).toFixed(5)} (${(DURATION_S / totalS).toFixed(0)}× faster than real time)`);
  console.log(`  peak RSS, highest of the runs: ${rss.toFixed(1)} MiB (runs ${runs.map((r) => r.rssMiB.toFixed(0)).join(', ')}; target < 256 MiB): ${rss < 256 ? 'met' : 'NOT MET'}`);
  if (hasFfmpeg) {
    const ff = median(ffTimes);
    const ratio = totalS / ff;
    // Each of our runs against the ffmpeg run right after it: the pair saw the same state of the
    // machine, so the median of the pairs' ratios shrugs off a slow spell better than either median.
    const paired = median(runs.map((r, i) => r.s / ffTimes[i]));
    console.log(`ffmpeg ebur128=peak=true, median of ${ffTimes.length}: ${ff.toFixed(3)} s (runs ${ffTimes.map((t) => t.toFixed(2)).join(', ')})`);
    console.log(`  ratio ours/ffmpeg: ${ratio.toFixed(2)} of the medians, ${paired.toFixed(2)} median of the paired runs (target ≤ 0.8): ${Math.max(ratio, paired) <= 0.8 ? 'met' : 'NOT MET'}`);
    const cpu = median(runs.map((r) => r.cpuS));
    const ffc = median(ffCpu);
    const cpuPaired = median(runs.map((r, i) => r.cpuS / ffCpu[i]));
    console.log(
      `  CPU time (user + system): ours ${cpu.toFixed(2)} s, ffmpeg ${ffc.toFixed(2)} s (medians); ratio ${(cpu / ffc).toFixed(2)} of the medians, ${cpuPaired.toFixed(2)} median of the paired runs (target ≤ 1.2): ${Math.max(cpu / ffc, cpuPaired) <= 1.2 ? 'met' : 'NOT MET'}`,
    );
  } else {
    console.log('ffmpeg not on PATH: ratio not measured (apt-get install -y ffmpeg to compare)');
  }

  interface Run { totalMs: number; decodeMs: number; sourcePart: { where: string; startMs: number; endMs: number }; maxRssMiB: number }
  const once = (...extra: string[]): Run =>
    JSON.parse(execFileSync(process.execPath, [join(here, 'child.mjs'), join(here, 'analyze-once.ts'), wav, ...extra], { encoding: 'utf8' }));
  const show = (r: Run) =>
    `${(r.totalMs / 1000).toFixed(3)} s; decoding with the channel part to ${(r.decodeMs / 1000).toFixed(3)} s, ` +
    `source part on the ${r.sourcePart.where} thread ${(r.sourcePart.startMs / 1000).toFixed(3)}–${(r.sourcePart.endMs / 1000).toFixed(3)} s; peak RSS ${r.maxRssMiB.toFixed(1)} MiB`;
  console.log(`in process, through tsx (analyze-once.ts): ${show(once())}`);
  console.log(`one thread, for comparison: ${show(once('--sequential'))}`);

  if (part('plan')) await runPlanBench(wav);
  if (part('engine')) await runEngineBench(dir, wav);
  if (part('server')) await runServerBench(wav, totalS);
  if (part('web')) printWebBench();
  }
} finally {
  rmSync(dir, { recursive: true, force: true });
}
