import type { CliIo } from './io.ts';

/**
 * A one-line progress bar on stderr, drawn only when stderr is a terminal (never into logs or
 * pipes). `update(fraction, label)` redraws at most every 100 ms; `done()` clears the line.
 */
export function progressBar(io: CliIo, title: string): { update(fraction: number, label?: string): void; done(): void } {
  if (!io.errIsTty) return { update() {}, done() {} };
  let last = 0;
  const width = 30;
  return {
    update(fraction, label = '') {
      const now = Date.now();
      if (now - last < 100 && fraction < 1) return;
      last = now;
      const f = Math.max(0, Math.min(1, fraction));
      const filled = Math.round(f * width);
      io.err(`\r${title} [${'#'.repeat(filled)}${'-'.repeat(width - filled)}] ${(f * 100).toFixed(0).padStart(3)}% ${label.padEnd(12)}`);
    },
    done() {
      io.err(`\r${' '.repeat(title.length + width + 20)}\r`);
    },
  };
}

/** Runs `work` with a progress bar on stderr (a terminal only), cleared when the work ends, however it ends. */
export async function withProgress<T>(io: CliIo, title: string, work: (onProgress: (fraction: number, stage: string) => void) => Promise<T>): Promise<T> {
  const bar = progressBar(io, title);
  try {
    return await work((f, stage) => bar.update(f, stage));
  } finally {
    bar.done();
  }
}
