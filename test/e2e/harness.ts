/**
 * What the end-to-end tests need around the page: the client built by Vite, a server on a free
 * loopback port with a fresh DATA_DIR (the real one, server/main.ts; or, for developing the page
 * before the server exists, the stand-in of fake-api.ts when COILCUE_E2E_SERVER=fake), and Debian's
 * Chromium driven by playwright-core with a fresh profile and every request off the machine
 * refused.
 */
import { spawn, type ChildProcess } from 'node:child_process';
import { existsSync, mkdtempSync, readdirSync, readFileSync, rmSync, statSync } from 'node:fs';
import { createServer } from 'node:net';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { gzipSync } from 'node:zlib';
import { fileURLToPath } from 'node:url';
import { chromium, type BrowserContext } from 'playwright-core';

export const ROOT = fileURLToPath(new URL('../..', import.meta.url));
export const CHROMIUM = '/usr/bin/chromium';
export const ARTIFACTS = join(ROOT, 'test-artifacts');
export const CHROMIUM_ARGS = [
  '--no-sandbox',
  '--disable-gpu',
  '--disable-quic',
  '--disable-background-networking',
  '--disable-component-update',
  '--disable-sync',
  '--no-first-run',
  '--autoplay-policy=no-user-gesture-required',
];


/** Builds the client into client/dist (vite build, in a child so its config loads as in `npm run build:client`). */
export async function buildClient(): Promise<void> {
  await run(process.execPath, [join(ROOT, 'node_modules', 'vite', 'bin', 'vite.js'), 'build', '--logLevel', 'warn'], ROOT);
}

/** Gzipped size of the built JavaScript, bytes. */
export function builtJsGzipBytes(): number {
  const dir = join(ROOT, 'client', 'dist', 'assets');
  return readdirSync(dir)
    .filter((f) => f.endsWith('.js'))
    .reduce((sum, f) => sum + gzipSync(readFileSync(join(dir, f)), { level: 9 }).length, 0);
}

function run(cmd: string, args: string[], cwd: string): Promise<void> {
  return new Promise((resolve, reject) => {
    const p = spawn(cmd, args, { cwd, stdio: ['ignore', 'ignore', 'pipe'] });
    let err = '';
    p.stderr.on('data', (d) => (err += d));
    p.on('exit', (code) => (code === 0 ? resolve() : reject(new Error(`${cmd} ${args.join(' ')} exited ${code}: ${err}`))));
  });
}

/** A free TCP port on the loopback interface. */
export function freePort(): Promise<number> {
  return new Promise((resolve, reject) => {
    const s = createServer();
    s.unref();
    s.on('error', reject);
    s.listen(0, '127.0.0.1', () => {
      const port = (s.address() as { port: number }).port;
      s.close(() => resolve(port));
    });
  });
}

export interface RunningServer {
  origin: string;
  dataDir: string;
  stop: () => Promise<void>;
}

/**
 * Starts the server in a child process on a free port with a fresh DATA_DIR (PORT, HOST and
 * DATA_DIR in its environment) and waits for GET /api/health. COILCUE_E2E_SERVER=fake starts the
 * stand-in instead.
 */
export async function startServer(): Promise<RunningServer> {
  const port = await freePort();
  const dataDir = mkdtempSync(join(tmpdir(), 'coilcue-e2e-data-'));
  const fake = process.env.COILCUE_E2E_SERVER === 'fake';
  const entry = fake ? join(ROOT, 'test', 'e2e', 'fake-api.ts') : join(ROOT, 'server', 'main.ts');
  const child: ChildProcess = spawn(process.execPath, ['--import', 'tsx', entry, ...(fake ? [String(port)] : [])], {
    cwd: ROOT,
    env: { ...process.env, PORT: String(port), HOST: '127.0.0.1', DATA_DIR: dataDir, NODE_ENV: 'production', LOG_LEVEL: 'warn' },
    stdio: ['ignore', 'ignore', 'pipe'],
  });
  let stderr = '';
  child.stderr!.on('data', (d) => (stderr += d));
  const origin = `http://127.0.0.1:${port}`;
  const deadline = Date.now() + 90_000;
  for (;;) {
    if (child.exitCode !== null) throw new Error(`the server exited with ${child.exitCode} before answering: ${stderr}`);
    try {
      const r = await fetch(`${origin}/api/health`);
      if (r.ok) break;
    } catch {
      // not listening yet
    }
    if (Date.now() > deadline) {
      child.kill('SIGKILL');
      throw new Error(`the server did not answer ${origin}/api/health within 90 s: ${stderr}`);
    }
    await new Promise((r) => setTimeout(r, 200));
  }
  return {
    origin,
    dataDir,
    stop: async () => {
      if (child.exitCode === null) {
        const gone = new Promise((r) => child.once('exit', r));
        child.kill('SIGTERM');
        await Promise.race([gone, new Promise((r) => setTimeout(r, 5000))]);
        if (child.exitCode === null) child.kill('SIGKILL');
      }
      rmSync(dataDir, { recursive: true, force: true });
    },
  };
}

export interface Browser {
  context: BrowserContext;
  /** Requests the page tried to send off the machine (refused). */
  offMachine: string[];
  close: () => Promise<void>;
}

/**
 * Debian's Chromium with a fresh profile. A missing Chromium throws (a failure, never a skip).
 * Every request to anything but 127.0.0.1 is refused and recorded.
 */
export async function launchBrowser(viewport = { width: 1280, height: 800 }): Promise<Browser> {
  if (!existsSync(CHROMIUM) || !statSync(CHROMIUM).isFile()) {
    throw new Error(`Chromium is not installed at ${CHROMIUM}: install it (apt-get install -y chromium); the end-to-end tests need a real browser`);
  }
  const profile = mkdtempSync(join(tmpdir(), 'coilcue-e2e-chromium-'));
  const context = await chromium.launchPersistentContext(profile, {
    executablePath: CHROMIUM,
    headless: true,
    args: CHROMIUM_ARGS,
    viewport,
    acceptDownloads: true,
  });
  const offMachine: string[] = [];
  await context.route('**/*', (route) => {
    const url = new URL(route.request().url());
    if (url.protocol === 'data:' || url.protocol === 'blob:' || url.hostname === '127.0.0.1') return route.continue();
    offMachine.push(url.href);
    return route.abort();
  });
  return {
    context,
    offMachine,
    close: async () => {
      await context.close();
      rmSync(profile, { recursive: true, force: true });
    },
  };
}

/** axe-core's source, to inject into a page. */
export const axeSource = (): string => readFileSync(join(ROOT, 'node_modules', 'axe-core', 'axe.min.js'), 'utf8');
