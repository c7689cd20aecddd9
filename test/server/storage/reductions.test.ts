import { mkdtempSync, readFileSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { decodeReductions, encodeReductions, readReductions, writeReductions } from '../../../server/storage/reductions.ts';

const dir = mkdtempSync(join(tmpdir(), 'coilcue-reductions-'));
afterAll(() => rmSync(dir, { recursive: true, force: true }));

describe('the reductions file', () => {
  // Odd lengths (padding after each array), an empty array, a view into a larger buffer, non-finite
  // numbers and more arrays than one writev call takes (512 a call, IOV_MAX is 1024 on Linux).
  const backing = new Float64Array([9, 8, 7, 6, 5]);
  const value = {
    name: 'clip',
    level: -Infinity,
    nan: Number.NaN,
    nested: { a: new Float32Array([1.5, -2.25, 3]), b: new Uint8Array([1, 2, 3, 4, 5]), empty: new Int16Array(0), view: backing.subarray(1, 4) },
    many: Array.from({ length: 700 }, (_, i) => new Int32Array([i, -i, i * 3])),
  };

  it('written straight from the arrays is the same bytes as the encoded buffer, and reads back bit for bit', async () => {
    const path = join(dir, 'r.bin');
    await writeReductions(path, value);
    const bytes = new Uint8Array(readFileSync(path));
    expect(Buffer.from(bytes).equals(Buffer.from(encodeReductions(value)))).toBe(true);
    const back = await readReductions<typeof value>(path);
    expect(back.level).toBe(-Infinity);
    expect(back.nan).toBeNaN();
    expect(Array.from(back.nested.a)).toEqual([1.5, -2.25, 3]);
    expect(Array.from(back.nested.b)).toEqual([1, 2, 3, 4, 5]);
    expect(back.nested.empty.length).toBe(0);
    expect(Array.from(back.nested.view)).toEqual([8, 7, 6]);
    expect(back.many.length).toBe(700);
    expect(Array.from(back.many[699])).toEqual([699, -699, 2097]);
    expect(decodeReductions<typeof value>(bytes).name).toBe('clip');
  });

  it('refuses to write over a file that exists', async () => {
    const path = join(dir, 'exists.bin');
    await writeReductions(path, { a: 1 });
    await expect(writeReductions(path, { a: 2 })).rejects.toThrow(/EEXIST/);
    expect((await readReductions<{ a: number }>(path)).a).toBe(1);
  });
});
