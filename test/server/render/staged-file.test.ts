/**
 * The staged output file (server/render/staged-file.ts): bytes go to a temporary file and appear
 * under the final name only on commit; a discard, or a failure while the file is made, leaves
 * nothing behind and an existing file under the final name as it was.
 */
import { spawnSync } from 'node:child_process';
import { existsSync, mkdtempSync, readFileSync, readdirSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { afterAll, describe, expect, it } from 'vitest';
import { MemorySink, StagedFile } from '../../../server/render/staged-file.ts';

const dir = mkdtempSync(join(tmpdir(), 'coilcue-staged-'));
afterAll(() => rmSync(dir, { recursive: true, force: true }));

const bytes = (...xs: number[]) => Uint8Array.from(xs);
const leftovers = (d: string) => readdirSync(d).filter((f) => f.endsWith('.tmp'));

describe('StagedFile', () => {
  it('writes under a temporary name and puts the bytes under the final name on commit', () => {
    const final = join(dir, 'a.wav');
    const f = StagedFile.create(final);
    f.write(bytes(0, 0, 3));
    f.write(bytes(4, 5));
    expect(existsSync(final)).toBe(false);
    expect(existsSync(f.tmpPath)).toBe(true);
    f.patch(0, bytes(1, 2));
    f.commit();
    expect(Array.from(readFileSync(final))).toEqual([1, 2, 3, 4, 5]);
    expect(existsSync(f.tmpPath)).toBe(false);
    expect(leftovers(dir)).toEqual([]);
    expect(() => f.write(bytes(1))).toThrow(RangeError);
  });

  it('starts over on rewind and keeps only what the last pass wrote (a shorter pass cuts the file)', () => {
    const final = join(dir, 'b.wav');
    const f = StagedFile.create(final);
    f.write(bytes(9, 9, 9, 9, 9, 9));
    f.rewind();
    f.write(bytes(7, 8));
    expect(f.size).toBe(2);
    expect(() => f.patch(1, bytes(0, 0))).toThrow(RangeError); // beyond what was written
    f.commit();
    expect(Array.from(readFileSync(final))).toEqual([7, 8]);
  });

  it('discard removes the temporary file and leaves an existing file under the final name untouched', () => {
    const final = join(dir, 'c.wav');
    writeFileSync(final, 'the earlier render');
    const f = StagedFile.create(final);
    f.write(bytes(1, 2, 3));
    f.discard();
    f.discard(); // twice is harmless
    expect(readFileSync(final, 'utf8')).toBe('the earlier render');
    expect(leftovers(dir)).toEqual([]);
  });

  it('a failure while the file is made leaves nothing (the caller discards)', () => {
    const final = join(dir, 'd.wav');
    const f = StagedFile.create(final);
    const make = () => {
      f.write(bytes(1, 2, 3));
      throw new Error('the render failed halfway');
    };
    try {
      make();
      f.commit();
    } catch {
      f.discard();
    }
    expect(existsSync(final)).toBe(false);
    expect(leftovers(dir)).toEqual([]);
  });

  it('names a folder that does not exist as unwritable, or passes the error on as it is when asked', () => {
    const final = join(dir, 'no-such-folder', 'e.wav');
    expect(() => StagedFile.create(final)).toThrow(expect.objectContaining({ code: 'unwritable' }));
    expect(() => StagedFile.create(final, undefined, { fileSystemErrors: 'as-is' })).toThrow(expect.objectContaining({ code: 'ENOENT' }));
  });

  it('writes to a temporary path the caller names (the server’s tmp/ folder)', () => {
    const tmp = mkdtempSync(join(dir, 'tmp-'));
    const f = StagedFile.create(join(dir, 'f.wav'), join(tmp, 'x.part'));
    f.write(bytes(5));
    expect(readdirSync(tmp)).toEqual(['x.part']);
    f.commit();
    expect(readdirSync(tmp)).toEqual([]);
    expect(Array.from(readFileSync(join(dir, 'f.wav')))).toEqual([5]);
  });
});

describe('StagedFile when the process exits first', () => {
  it('removes its temporary file on exit (Ctrl-C ends the command line with process.exit)', () => {
    const script = join(dir, 'exits.mts');
    const module = fileURLToPath(new URL('../../../server/render/staged-file.ts', import.meta.url));
    writeFileSync(
      script,
      `import { StagedFile } from ${JSON.stringify(module)};\nconst f = StagedFile.create(${JSON.stringify(join(dir, 'g.wav'))});\nf.write(new Uint8Array(10));\nconsole.log(f.tmpPath);\nprocess.exit(130);\n`,
    );
    const r = spawnSync(process.execPath, ['--import', 'tsx', script], { encoding: 'utf8' });
    expect(r.status).toBe(130);
    const tmp = r.stdout.trim();
    expect(tmp).toMatch(/\.g\.wav\..*\.tmp$/);
    expect(existsSync(tmp)).toBe(false);
    expect(existsSync(join(dir, 'g.wav'))).toBe(false);
  });
});

describe('MemorySink', () => {
  it('holds what a StagedFile would write', () => {
    const m = new MemorySink();
    m.write(new Uint8Array(70000).fill(1));
    m.rewind();
    m.write(bytes(0, 0, 3));
    m.patch(0, bytes(1, 2));
    expect(Array.from(m.bytes())).toEqual([1, 2, 3]);
  });
});
