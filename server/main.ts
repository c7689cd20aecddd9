/**
 * `npm start`: reads the configuration from the environment (server/config.ts), builds the app,
 * listens, prints the address to open, and on SIGTERM/SIGINT closes gracefully (running jobs get
 * a few seconds, the rest go back to the queue; the database closes last).
 */
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

main().then(
  (code) => {
    if (code !== 0) process.exit(code);
  },
  (e) => {
    process.stderr.write(`coilcue server: could not start: ${e instanceof Error ? e.message : String(e)}\n`);
    process.exit(1);
  },
);
