/**
 * The server's configuration: what `buildApp(config)` needs, with defaults, and the reading of the
 * environment that only server/main.ts does. Every value is checked at start; a bad one stops the
 * server with a message that names the variable, the rule, the value and what to do.
 */
import { existsSync, readFileSync } from 'node:fs';
import { availableParallelism } from 'node:os';
import { join, resolve } from 'node:path';

export interface ServerConfig {
  /** Folder of the database, clip files, analyses and renders (created when absent). */
  dataDir: string;
  /** Address the server binds (main.ts only; the app itself never listens). */
  host: string;
  port: number;
  /** Largest upload, bytes (checked while the upload streams). */
  maxUploadBytes: number;
  /** Longest clip, s (checked from the header while the upload streams). */
  maxDurationS: number;
  /** Wall-clock limit of one job (decode, analysis, render, set plan), s. */
  jobTimeoutS: number;
  /** Jobs run at once (worker threads): at most the machine's cores. */
  jobThreads: number;
  /** Jobs waiting or running beyond which a new one is refused with 503. */
  queueLimit: number;
  /** Requests per client per minute on /api (the rate limit); 0 turns it off. */
  rateLimitPerMinute: number;
  /** Largest JSON request body, bytes. */
  bodyLimitBytes: number;
  /** Access token: null when none is configured (then only a loopback address may be bound). */
  token: string | null;
  /** Folder of the built web client (served at /). */
  clientDir: string;
  /** Seed the demo data into an empty data folder. */
  seedDemo: boolean;
  /** Fastify's logger: false, or a level. */
  logLevel: false | 'fatal' | 'error' | 'warn' | 'info' | 'debug';
}

/**
 * Jobs at once by default: half the cores (at least one). One analysis already keeps two threads
 * busy (server/analysis/analyze-stream.ts), so a second one at once on two cores would only
 * double the memory without finishing either sooner.
 */
export const defaultJobThreads = (): number => Math.max(1, Math.floor(availableParallelism() / 2));

const ROOT = resolve(new URL('..', import.meta.url).pathname);

/** Defaults for everything but the data folder (tests give a temporary one). */
export function defaultConfig(dataDir: string, over: Partial<ServerConfig> = {}): ServerConfig {
  return {
    dataDir: resolve(dataDir),
    host: '127.0.0.1',
    port: 8480,
    maxUploadBytes: 200e6,
    maxDurationS: 1200,
    jobTimeoutS: 600,
    jobThreads: defaultJobThreads(),
    queueLimit: 16,
    rateLimitPerMinute: 600,
    bodyLimitBytes: 1 << 20,
    token: null,
    clientDir: join(ROOT, 'client', 'dist'),
    seedDemo: true,
    logLevel: false,
    ...over,
  };
}

/** A configuration error: main.ts prints the message and exits 2. */
export class ConfigError extends Error {
  override readonly name = 'ConfigError';
}

/** Addresses that reach only this machine. */
export const isLoopback = (host: string): boolean => host === 'localhost' || host === '::1' || /^127\.\d+\.\d+\.\d+$/.test(host);

/** The token file in the data folder: its first line is the token. */
export const TOKEN_FILE = 'access-token';

function num(env: NodeJS.ProcessEnv, name: string, dflt: number, min: number, max: number, integer: boolean, what: string): number {
  const raw = env[name];
  if (raw === undefined || raw === '') return dflt;
  const v = Number(raw);
  if (!Number.isFinite(v) || v < min || v > max || (integer && !Number.isInteger(v))) {
    throw new ConfigError(`${name}=${JSON.stringify(raw)} is not valid: ${name} is ${what}, ${integer ? 'a whole number ' : 'a number '}from ${min} to ${max}; fix it or unset it for the default (${dflt}).`);
  }
  return v;
}

/**
 * Reads HOST, PORT, DATA_DIR, COILCUE_TOKEN, COILCUE_MAX_UPLOAD_MB, COILCUE_MAX_DURATION_S,
 * COILCUE_JOB_TIMEOUT_S, COILCUE_JOB_THREADS, COILCUE_QUEUE_LIMIT, COILCUE_RATE_LIMIT,
 * COILCUE_LOG, COILCUE_DEMO=0 (no demo data) (relative DATA_DIR against `cwd`). Throws ConfigError for a bad value, and for a
 * non-loopback HOST with no access token (COILCUE_TOKEN or DATA_DIR/access-token).
 */
export function configFromEnv(env: NodeJS.ProcessEnv, cwd: string): ServerConfig {
  const dataDir = resolve(cwd, env.DATA_DIR || './data');
  const host = env.HOST || '127.0.0.1';
  if (!/^[A-Za-z0-9.:-]+$/.test(host)) throw new ConfigError(`HOST=${JSON.stringify(host)} is not an address; give an IP address or a host name (default 127.0.0.1).`);
  const cores = Math.max(1, availableParallelism());
  const log = env.COILCUE_LOG || 'warn';
  const levels = ['off', 'fatal', 'error', 'warn', 'info', 'debug'];
  if (!levels.includes(log)) throw new ConfigError(`COILCUE_LOG=${JSON.stringify(log)} is not valid: give one of ${levels.join(', ')}.`);
  let token = env.COILCUE_TOKEN || null;
  const tokenFile = join(dataDir, TOKEN_FILE);
  if (!token && existsSync(tokenFile)) token = readFileSync(tokenFile, 'utf8').split('\n')[0].trim() || null;
  if (token !== null && token.length < 16) {
    throw new ConfigError('the access token (COILCUE_TOKEN or DATA_DIR/access-token) is shorter than 16 characters; use a long random one, e.g. `openssl rand -hex 24`.');
  }
  if (!isLoopback(host) && token === null) {
    throw new ConfigError(
      `HOST=${host} would let other machines reach the server, which writes files and burns CPU on request; ` +
        `set COILCUE_TOKEN (or put a token in ${tokenFile}) so every request must carry it, or bind 127.0.0.1.`,
    );
  }
  return defaultConfig(dataDir, {
    host,
    port: num(env, 'PORT', 8480, 0, 65535, true, 'the TCP port'),
    maxUploadBytes: num(env, 'COILCUE_MAX_UPLOAD_MB', 200, 1, 4000, false, 'the largest upload in MB') * 1e6,
    maxDurationS: num(env, 'COILCUE_MAX_DURATION_S', 1200, 1, 7200, false, 'the longest clip in seconds'),
    jobTimeoutS: num(env, 'COILCUE_JOB_TIMEOUT_S', 600, 1, 86400, false, 'the time limit of one job in seconds'),
    jobThreads: num(env, 'COILCUE_JOB_THREADS', defaultJobThreads(), 1, cores, true, `the number of jobs run at once (at most the ${cores} cores)`),
    queueLimit: num(env, 'COILCUE_QUEUE_LIMIT', 16, 1, 10000, true, 'the most jobs waiting or running'),
    rateLimitPerMinute: num(env, 'COILCUE_RATE_LIMIT', 600, 0, 1e6, true, 'the requests per client per minute (0: no limit)'),
    token,
    seedDemo: env.COILCUE_DEMO !== '0',
    logLevel: log === 'off' ? false : (log as ServerConfig['logLevel']),
  });
}
