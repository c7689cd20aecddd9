import { spawnSync } from 'node:child_process';
import { fileURLToPath } from 'node:url';
import { describe, expect, it } from 'vitest';

// The executable as a user runs it (`npx coilcue …` runs bin/coilcue.cjs): tsx's CommonJS hook, where
// command modules load through `require` (server/cli/commands/index.ts), not through Vitest's loader.
const bin = fileURLToPath(new URL('../../../bin/coilcue.cjs', import.meta.url));
const run = (...args: string[]) => spawnSync(process.execPath, [bin, ...args], { encoding: 'utf8', timeout: 60_000 });

describe('bin/coilcue.cjs', () => {
  it('lists every command without loading them, and exits 2 with no command', () => {
    const r = run();
    expect(r.status).toBe(2);
    for (const name of ['analyze', 'coil', 'plan', 'demo', 'render', 'preview']) expect(r.stdout).toMatch(new RegExp(`^  ${name} `, 'm'));
    expect(r.stdout).toMatch(/Caution: resonant coils make high voltage/);
  });

  it("loads a command's module when it runs: its usage, and a real result", () => {
    const help = run('analyze', '--help');
    expect(help.status).toBe(0);
    expect(help.stdout).toMatch(/^Usage: coilcue analyze <file>/m);
    const coil = run('coil', '--demo', 'desk-lantern', '--json');
    expect(coil.stderr).toBe('');
    expect(coil.status).toBe(0);
    const report = JSON.parse(coil.stdout) as Record<string, unknown>;
    expect(Object.keys(report).length).toBeGreaterThan(0);
  });

  it('an unknown command exits 2 with one line naming the known ones, even a name objects inherit', () => {
    for (const name of ['sing', 'toString', 'constructor']) {
      const r = run(name);
      expect(r.status).toBe(2);
      expect(r.stderr.trim().split('\n')).toHaveLength(1);
      expect(r.stderr).toMatch(new RegExp(`unknown command "${name}"; known: analyze, coil`));
    }
  });
});
