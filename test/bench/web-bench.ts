/**
 * The web page's speed figures (issue targets: page usable — rig and verdict drawn — within
 * 1.5 s of navigation on loopback for the 5-minute benchmark clip; slider release to redrawn
 * verdict and temperature curves ≤ 200 ms; zoom and pan at ≥ 30 frames per second on the stacked
 * charts; built JavaScript ≤ 200 kB gzipped). The end-to-end run in Chromium (test/e2e/web.test.ts)
 * measures them and writes test-artifacts/web-bench.json; this prints that file beside the size
 * of the JavaScript now in client/dist. `node --import tsx test/bench/web-bench.ts` on its own, or
 * the end of `npm run bench`.
 */
import { existsSync, readdirSync, readFileSync } from 'node:fs';
import { join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { gzipSync } from 'node:zlib';

const root = fileURLToPath(new URL('../..', import.meta.url));

interface WebBench {
  measuredAt?: string;
  server?: string;
  clip?: string;
  pageUsableMs?: number;
  sliderToVerdictMs?: number;
  zoomPanFps?: number;
  zoomPanStepMs?: number;
  builtJsGzipKiB?: number;
}

const verdict = (ok: boolean | null): string => (ok === null ? 'not measured' : ok ? 'met' : 'NOT MET');

export function printWebBench(log: (line: string) => void = console.log): void {
  log('web page (from the last end-to-end run in Chromium, test-artifacts/web-bench.json):');
  const file = join(root, 'test-artifacts', 'web-bench.json');
  const dist = join(root, 'client', 'dist', 'assets');
  if (existsSync(dist)) {
    const bytes = readdirSync(dist)
      .filter((f) => f.endsWith('.js'))
      .reduce((s, f) => s + gzipSync(readFileSync(join(dist, f)), { level: 9 }).length, 0);
    log(`  built JavaScript now in client/dist: ${(bytes / 1024).toFixed(1)} KiB gzipped (target ≤ 200 kB): ${verdict(bytes <= 200_000)}`);
  } else {
    log('  client/dist is not built (npm run build:client)');
  }
  if (!existsSync(file)) {
    log('  no figures yet: run the end-to-end tests (npx vitest run test/e2e/web.test.ts) to measure them');
    return;
  }
  const b = JSON.parse(readFileSync(file, 'utf8')) as WebBench;
  log(`  measured ${b.measuredAt ?? '?'} against ${b.server ?? '?'} on ${b.clip ?? '?'}`);
  const fig = (v: number | undefined, unit: string) => (v === undefined ? '—' : `${v} ${unit}`);
  log(`  page usable (rig and verdict drawn) after navigation: ${fig(b.pageUsableMs, 'ms')} (target ≤ 1500 ms): ${verdict(b.pageUsableMs === undefined ? null : b.pageUsableMs <= 1500)}`);
  log(`  slider release to redrawn verdict and temperatures: ${fig(b.sliderToVerdictMs, 'ms')} (target ≤ 200 ms): ${verdict(b.sliderToVerdictMs === undefined ? null : b.sliderToVerdictMs <= 200)}`);
  log(`  zoom and pan on the stacked charts: ${fig(b.zoomPanFps, 'frames/s')} (target ≥ 30): ${verdict(b.zoomPanFps === undefined ? null : b.zoomPanFps >= 30)}`);
  log(`  one zoom or pan step of the three charts, work on the main thread: ${fig(b.zoomPanStepMs, 'ms')} (a frame at 30 frames/s is 33 ms)`);
  log(`  built JavaScript at that run: ${fig(b.builtJsGzipKiB, 'KiB gzipped')}`);
}

if (process.argv[1] && fileURLToPath(import.meta.url) === process.argv[1]) printWebBench();
