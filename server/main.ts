/**
 * `npm start`: reads the configuration from the environment (server/config.ts), builds the app,
 * listens, prints the address to open, and on SIGTERM/SIGINT closes gracefully (running jobs get
 * a few seconds, the rest go back to the queue; the database closes last).
 */
import { appendFileSync, readFileSync, writeFileSync } from 'node:fs';
import { monitorEventLoopDelay } from 'node:perf_hooks';
import { buildApp } from './app.ts';
import { ConfigError, configFromEnv, isLoopback } from './config.ts';

async function main(): Promise<number> {
  let config;
  try {
    config = configFromEnv(process.env, process.cwd());
  } catch (e) {
    if (e instanceof ConfigError) {
      process.stderr.write(`coilcue server: ${e.message}\n`);
      return 2;
    }
    throw e;
  }
  const app = await buildApp(config);
  await app.listen({ host: config.host, port: config.port });
  const addr = app.server.address();
  const port = typeof addr === 'object' && addr ? addr.port : config.port;
  const shown = config.host.includes(':') ? `[${config.host}]` : config.host;
  process.stdout.write(
    `coilcue server: open http://${shown === '0.0.0.0' ? '127.0.0.1' : shown}:${port}/ (data in ${config.dataDir})\n` +
      (isLoopback(config.host) ? '' : 'coilcue server: reachable from other machines; every API request needs the access token (sign in at /signin)\n'),
  );
  if (process.env.COILCUE_BENCH_REPORT) benchReport(process.env.COILCUE_BENCH_REPORT);
  let closing = false;
  const stop = (signal: string) => {
    if (closing) return;
    closing = true;
    process.stdout.write(`coilcue server: ${signal}, closing\n`);
    const force = setTimeout(() => process.exit(1), 15_000);
    force.unref();
    app.close().then(
      () => process.exit(0),
      () => process.exit(1),
    );
  };
  process.on('SIGTERM', () => stop('SIGTERM'));
  process.on('SIGINT', () => stop('SIGINT'));
  return 0;
}

/**
 * For `npm run bench` only: on SIGUSR2, appends one JSON line to `file` with the event loop's delay
 * (p99 and max since the last report, ms) and the peak and current resident memory (MiB, from
 * /proc/self/status), then resets both (Linux: writing 5 to /proc/self/clear_refs resets the peak).
 */
function benchReport(file: string): void {
  const h = monitorEventLoopDelay({ resolution: 10 });
  h.enable();
  const kib = (key: string) => Number(/(\d+) kB/.exec(readFileSync('/proc/self/status', 'utf8').split('\n').find((l) => l.startsWith(key)) ?? '')?.[1] ?? NaN);
  process.on('SIGUSR2', () => {
    const line = { loopP99Ms: h.percentile(99) / 1e6, loopMaxMs: h.max / 1e6, peakRssMiB: kib('VmHWM') / 1024, rssMiB: kib('VmRSS') / 1024 };
    appendFileSync(file, JSON.stringify(line) + '\n');
    h.reset();
    try {
      writeFileSync('/proc/self/clear_refs', '5');
    } catch {
      /* not Linux */
    }
  });
}

main().then(
  (code) => {
    if (code !== 0) process.exit(code);
  },
  (e) => {
    process.stderr.write(`coilcue server: could not start: ${e instanceof Error ? e.message : String(e)}\n`);
    process.exit(1);
  },
);
