/**
 * `npm run bench`, second part: plan, render and preview end to end on the 5-minute clip with the
 * demo coil (desk-lantern) and the linear demo driver, and a render of a 20-minute clip: wall time
 * from spawn to exit and peak RSS of the child (rss-on-exit.cjs), each printed with its unit and its
 * ratio to the target (from the project's issue on bounded memory): plan ≤ 1.2 s and ≤ 200 MiB;
 * render and preview ≤ 3 s and ≤ 256 MiB; the 20-minute render ≤ 256 MiB.
 */
import { spawnSync } from 'node:child_process';
import { readFileSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { encodeWav, writeWavAtomic } from '../../server/audio/wav.ts';
import { synthLongDemo } from '../../shared/demo/clips.ts';
import { DEMO_COILS } from '../../shared/demo/coils.ts';
import { DEMO_DRIVER_LINEAR } from '../../shared/demo/drivers.ts';

const here = fileURLToPath(new URL('.', import.meta.url));
const bin = join(here, '..', '..', 'bin', 'coilcue.cjs');

export interface ChildRun {
  s: number;
  rssMiB: number;
  cpuS: number;
}

/** Runs `coilcue <args>` in `dir` as a user would; wall seconds, peak RSS (MiB) and CPU seconds of the child. */
export function runCoilcue(dir: string, args: string[]): ChildRun {
  const rssFile = join(dir, 'rss.json');
  const t0 = performance.now();
  const r = spawnSync(process.execPath, ['--require', join(here, 'rss-on-exit.cjs'), bin, ...args], {
    cwd: dir,
    env: { ...process.env, COILCUE_BENCH_RSS_FILE: rssFile },
    stdio: ['ignore', 'ignore', 'pipe'],
    encoding: 'utf8',
  });
  const s = (performance.now() - t0) / 1000;
  if (r.status !== 0) throw new Error(`coilcue ${args[0]} exited ${r.status}: ${r.stderr}`);
  const m = JSON.parse(readFileSync(rssFile, 'utf8')) as { rssKiB: number; cpuS: number };
  return { s, rssMiB: m.rssKiB / 1024, cpuS: m.cpuS };
}

export const median = (xs: number[]): number => [...xs].sort((a, b) => a - b)[Math.floor(xs.length / 2)];

/** "1.03 s (target ≤ 1.2 s, ratio 0.86): met". */
export const against = (value: number, unit: string, target: number, digits = 2): string =>
  `${value.toFixed(digits)} ${unit} (target ≤ ${target} ${unit}, ratio ${(value / target).toFixed(2)}): ${value <= target ? 'met' : 'NOT MET'}`;

/** Plan, render and preview on `wav` (the 5-minute clip), then the 20-minute render. */
export async function runEngineBench(dir: string, wav: string, runs = 5): Promise<void> {
  writeFileSync(join(dir, 'coil.json'), JSON.stringify(DEMO_COILS['desk-lantern']));
  writeFileSync(join(dir, 'driver.json'), JSON.stringify(DEMO_DRIVER_LINEAR));
  const common = ['--clip', wav, '--coil', 'coil.json', '--driver', 'driver.json', '--json'];
  const cases: { name: string; args: string[]; s: number; mib: number }[] = [
    { name: 'plan', args: ['plan', ...common], s: 1.2, mib: 200 },
    { name: 'render', args: ['render', ...common, '--out', 'render.wav'], s: 3, mib: 256 },
    { name: 'preview', args: ['preview', ...common, '--out', 'preview.wav'], s: 3, mib: 256 },
  ];
  console.log(`plan, render, preview on the same clip, demo coil desk-lantern, linear demo driver; median of ${runs} runs each, interleaved:`);
  const got = new Map<string, ChildRun[]>(cases.map((c) => [c.name, []]));
  for (const c of cases) runCoilcue(dir, c.args); // compile into tsx's cache first
  for (let i = 0; i < runs; i++) for (const c of cases) got.get(c.name)!.push(runCoilcue(dir, c.args));
  for (const c of cases) {
    const rs = got.get(c.name)!;
    const s = median(rs.map((r) => r.s));
    const rss = Math.max(...rs.map((r) => r.rssMiB));
    console.log(`  ${c.name.padEnd(8)} time ${against(s, 's', c.s)}; runs ${rs.map((r) => r.s.toFixed(2)).join(', ')}; CPU ${median(rs.map((r) => r.cpuS)).toFixed(2)} s`);
    console.log(`  ${''.padEnd(8)} peak RSS ${against(rss, 'MiB', c.mib, 1)} (highest of the runs)`);
  }
  // 20 minutes: the longest clip the decoder accepts by default. Mono 44.1 kHz 16-bit (106 MB; a
  // stereo file of that length is over the decoder's 200 MB file limit).
  const long = join(dir, 'twenty-minutes.wav');
  const clip = synthLongDemo(1200, 44100);
  const mono = new Float32Array(clip.channels[0].length);
  for (let i = 0; i < mono.length; i++) mono[i] = 0.5 * (clip.channels[0][i] + clip.channels[1][i]);
  await writeWavAtomic(long, encodeWav({ sampleRate: 44100, channels: [mono] }, { format: 's16', seed: 1 }));
  const r = runCoilcue(dir, ['render', '--clip', long, '--coil', 'coil.json', '--driver', 'driver.json', '--json', '--out', 'render-20.wav']);
  console.log(`  render of a 20-minute clip (mono 44.1 kHz 16-bit): ${r.s.toFixed(2)} s, CPU ${r.cpuS.toFixed(2)} s; peak RSS ${against(r.rssMiB, 'MiB', 256, 1)}`);
}
