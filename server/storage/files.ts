/**
 * The files under DATA_DIR, beside the database:
 *   clips/<sha256>        the uploaded bytes, named by their SHA-256 only (never by a user's name)
 *   analyses/<id>.bin     an analysis's reductions (reductions.ts)
 *   renders/<id>.wav      a render's or preview's WAV
 *   tmp/                  files being written; emptied at every start
 * Order of writes, so a crash at any instant leaves no row pointing at a missing file: a file is
 * written under tmp/, flushed, renamed to its final name, and only then is its row written; a row
 * is deleted first and its file after. What a crash can leave is a file no row names, which the
 * start-up sweep removes.
 */
import { createHash, randomBytes } from 'node:crypto';
import { createWriteStream } from 'node:fs';
import { mkdir, open, readdir, rename, rm, unlink } from 'node:fs/promises';
import { join } from 'node:path';
import type { Readable } from 'node:stream';

export interface DataPaths {
  root: string;
  db: string;
  clips: string;
  analyses: string;
  renders: string;
  tmp: string;
}

export function dataPaths(root: string): DataPaths {
  return { root, db: join(root, 'coilcue.sqlite'), clips: join(root, 'clips'), analyses: join(root, 'analyses'), renders: join(root, 'renders'), tmp: join(root, 'tmp') };
}

export async function ensureDirs(p: DataPaths): Promise<void> {
  for (const d of [p.root, p.clips, p.analyses, p.renders, p.tmp]) await mkdir(d, { recursive: true });
}

/** A fresh name under tmp/. */
export const tempPath = (p: DataPaths, ext = '.part'): string => join(p.tmp, `${Date.now().toString(36)}-${randomBytes(6).toString('hex')}${ext}`);

/** Flushes a file's contents to the disk. */
export async function fsyncFile(path: string): Promise<void> {
  const fh = await open(path, 'r+');
  try {
    await fh.sync();
  } finally {
    await fh.close();
  }
}

/** Flushes a directory (a rename in it) to the disk; ignored where the platform cannot. */
export async function fsyncDir(path: string): Promise<void> {
  try {
    const fh = await open(path, 'r');
    try {
      await fh.sync();
    } finally {
      await fh.close();
    }
  } catch {
    /* not supported on every platform */
  }
}

/** Flushes `tmp`, renames it to `final` and flushes the folder. */
export async function commitFile(tmp: string, final: string): Promise<void> {
  await fsyncFile(tmp);
  await rename(tmp, final);
  await fsyncDir(join(final, '..'));
}

export const removeQuietly = (path: string): Promise<void> => unlink(path).catch(() => undefined);

/** Why a stream was stopped: thrown out of streamToFile by `inspect`. */
export type StreamCheck = (head: Uint8Array, bytesSoFar: number) => void;

/**
 * Streams `source` into `path`, hashing it (SHA-256) as it goes. `maxBytes` is enforced while it
 * streams (`onTooLarge` makes the error); `inspect` sees the first bytes (up to `headBytes`) and
 * the count so far after every chunk, and may throw to stop. On any error the partial file is
 * removed. Memory: one chunk and the head.
 */
export async function streamToFile(
  source: Readable,
  path: string,
  opts: { maxBytes: number; headBytes: number; onTooLarge: (bytes: number) => Error; inspect?: StreamCheck },
): Promise<{ sha256: string; sizeBytes: number; head: Uint8Array }> {
  const hash = createHash('sha256');
  const out = createWriteStream(path, { flags: 'wx', highWaterMark: 1 << 20 }); // fewer waits for 'drain' than the default 16 KiB
  const head = new Uint8Array(opts.headBytes);
  let headLen = 0;
  let size = 0;
  const closed = new Promise<void>((resolve, reject) => {
    out.on('close', resolve);
    out.on('error', reject);
  });
  try {
    for await (const chunk of source) {
      const b = chunk as Buffer;
      size += b.length;
      if (size > opts.maxBytes) throw opts.onTooLarge(size);
      if (headLen < head.length) {
        const n = Math.min(head.length - headLen, b.length);
        head.set(b.subarray(0, n), headLen);
        headLen += n;
      }
      opts.inspect?.(head.subarray(0, headLen), size);
      hash.update(b);
      if (!out.write(b)) await new Promise<void>((r) => out.once('drain', () => r()));
    }
    out.end();
    await closed;
    return { sha256: hash.digest('hex'), sizeBytes: size, head: head.subarray(0, headLen) };
  } catch (e) {
    out.destroy();
    await closed.catch(() => undefined);
    await removeQuietly(path);
    source.resume(); // drain the rest of the request so the connection can answer
    throw e;
  }
}

/**
 * The start-up sweep: empties tmp/, and removes from clips/, analyses/ and renders/ every file no
 * row names (`keep` answers for each folder). Returns the names removed, for the log.
 */
export async function sweep(p: DataPaths, keep: { clips: Set<string>; analyses: Set<string>; renders: Set<string> }): Promise<string[]> {
  const removed: string[] = [];
  for (const f of await readdir(p.tmp)) {
    await rm(join(p.tmp, f), { recursive: true, force: true });
    removed.push(`tmp/${f}`);
  }
  for (const [dir, names, label] of [
    [p.clips, keep.clips, 'clips'],
    [p.analyses, keep.analyses, 'analyses'],
    [p.renders, keep.renders, 'renders'],
  ] as const) {
    for (const f of await readdir(dir)) {
      if (!names.has(f)) {
        await rm(join(dir, f), { recursive: true, force: true });
        removed.push(`${label}/${f}`);
      }
    }
  }
  return removed;
}
