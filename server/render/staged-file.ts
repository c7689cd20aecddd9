/**
 * An output file written as it is made, and put under its name only when it is judged fit: the
 * bytes go to a temporary file (in the final name's folder, or at a path the caller names, on the
 * same file system), the header can be patched at the end, and `commit` flushes the file to disk
 * (fsync), renames it over the final name (POSIX rename(2): one step) and flushes the folder;
 * `discard` removes it. Until `commit`, nothing exists under the final name (an existing file
 * there is left as it was); after `discard` nothing is left at all. Memory: none of the file's
 * bytes are kept.
 *
 * Writes are synchronous: the render and the preview produce their bytes in synchronous loops (the
 * command line, and the server's job threads, which serve no requests). A temporary file still
 * pending when the process exits (Ctrl-C) is removed; one left by a kill that runs no handler
 * (SIGKILL) is a hidden `.name….tmp` beside the output, or, for the server, swept from tmp/ at start.
 */
import { randomBytes } from 'node:crypto';
import { closeSync, fsyncSync, ftruncateSync, openSync, renameSync, unlinkSync, writeSync } from 'node:fs';
import { basename, dirname, join } from 'node:path';
import { writeError } from '../audio/wav.ts';

/** Temporary files not yet committed or discarded: removed if the process exits first (Ctrl-C ends the command line with process.exit). */
const pending = new Set<string>();
let exitHook = false;
function track(path: string): void {
  pending.add(path);
  if (exitHook) return;
  exitHook = true;
  process.once('exit', () => {
    for (const p of pending) {
      try {
        unlinkSync(p);
      } catch {
        /* already gone */
      }
    }
  });
}

/** Where a render's or a preview's bytes go, in order; `rewind` starts the file over (a pass replaced by the next). */
export interface ByteSink {
  write(bytes: Uint8Array): void;
  /** Overwrites bytes at `offset` (< bytes written so far), as a header patched at the end. */
  patch(offset: number, bytes: Uint8Array): void;
  rewind(): void;
}

/** How a StagedFile reports file-system errors: 'input' as InputError `unwritable` where a person can fix them (the command line's output path), 'as-is' unchanged (the server's own folders). */
export interface StagedFileOptions {
  fileSystemErrors?: 'input' | 'as-is';
}

/**
 * A temporary file that becomes `finalPath` on commit (module comment). `tmpPath` defaults to a
 * hidden name beside the final one (`.name.pid.random.tmp`). File-system refusals a person can fix
 * (missing folder, permissions, full disk…) are InputError `unwritable` naming the final path,
 * unless `fileSystemErrors: 'as-is'`.
 *
 * @example const f = StagedFile.create('out.wav'); f.write(bytes); safe ? f.commit() : f.discard()
 */
export class StagedFile implements ByteSink {
  private fd: number | null;
  private at = 0;
  private end = 0;

  private constructor(
    readonly finalPath: string,
    readonly tmpPath: string,
    fd: number,
    private readonly asInput: boolean,
  ) {
    this.fd = fd;
  }

  static create(finalPath: string, tmpPath?: string, opts: StagedFileOptions = {}): StagedFile {
    const tmp = tmpPath ?? join(dirname(finalPath), `.${basename(finalPath)}.${process.pid}.${randomBytes(6).toString('hex')}.tmp`);
    const asInput = (opts.fileSystemErrors ?? 'input') === 'input';
    try {
      const f = new StagedFile(finalPath, tmp, openSync(tmp, 'wx', 0o644), asInput);
      track(tmp);
      return f;
    } catch (e) {
      throw asInput ? writeError(e, finalPath) : e;
    }
  }

  private failure(e: unknown): unknown {
    return this.asInput ? writeError(e, this.finalPath) : e;
  }

  /** Bytes in the file (the furthest written). */
  get size(): number {
    return this.end;
  }

  write(bytes: Uint8Array): void {
    this.writeAt(this.at, bytes);
    this.at += bytes.length;
  }

  patch(offset: number, bytes: Uint8Array): void {
    if (!(Number.isInteger(offset) && offset >= 0 && offset + bytes.length <= this.end)) {
      throw new RangeError(`StagedFile.patch: bytes ${offset}…${offset + bytes.length} lie outside the ${this.end} written`);
    }
    this.writeAt(offset, bytes);
  }

  rewind(): void {
    this.at = 0;
    this.end = 0;
  }

  private writeAt(position: number, bytes: Uint8Array): void {
    const fd = this.open();
    try {
      for (let off = 0; off < bytes.length; ) off += writeSync(fd, bytes, off, bytes.length - off, position + off);
    } catch (e) {
      throw this.failure(e);
    }
    if (position + bytes.length > this.end) this.end = position + bytes.length;
  }

  private open(): number {
    if (this.fd === null) throw new RangeError(`StagedFile: ${this.finalPath} was already committed or discarded`);
    return this.fd;
  }

  /** Cuts the file to the bytes written, flushes it, renames it to the final name and flushes the folder. On failure the temporary file is removed. */
  commit(): void {
    const fd = this.open();
    try {
      ftruncateSync(fd, this.end);
      fsyncSync(fd);
      closeSync(fd);
      this.fd = null;
      renameSync(this.tmpPath, this.finalPath);
      pending.delete(this.tmpPath);
    } catch (e) {
      this.discard();
      throw this.failure(e);
    }
    try {
      const dir = openSync(dirname(this.finalPath), 'r');
      try {
        fsyncSync(dir);
      } finally {
        closeSync(dir);
      }
    } catch {
      /* not every platform can flush a folder */
    }
  }

  /** Closes and removes the temporary file; the final name is untouched. Safe to call twice. */
  discard(): void {
    if (this.fd !== null) {
      closeSync(this.fd);
      this.fd = null;
    }
    try {
      unlinkSync(this.tmpPath);
    } catch {
      /* already gone */
    }
    pending.delete(this.tmpPath);
  }
}

/**
 * Makes a file through a staged sink: `make` writes it, then it is committed under its final name
 * if `keep` says so of the result (default: always) or discarded; discarded too if `make` throws.
 *
 * @example const s = await writeStaged(StagedFile.create(out), (sink) => renderJob(job, o, sink), (r) => r.summary.safe)
 */
export async function writeStaged<T>(file: StagedFile, make: (sink: StagedFile) => T | Promise<T>, keep: (result: T) => boolean = () => true): Promise<T> {
  let result: T;
  try {
    result = await make(file);
  } catch (e) {
    file.discard();
    throw e;
  }
  if (keep(result)) file.commit();
  else file.discard();
  return result;
}

/**
 * A ByteSink into memory, for tests and for callers that want the bytes (short clips only: it holds
 * the whole file).
 *
 * @example const m = new MemorySink(); await renderJob(job, opts, m); m.bytes()
 */
export class MemorySink implements ByteSink {
  private buf = new Uint8Array(1 << 16);
  private at = 0;
  private end = 0;

  write(bytes: Uint8Array): void {
    this.put(this.at, bytes);
    this.at += bytes.length;
  }

  patch(offset: number, bytes: Uint8Array): void {
    if (!(offset >= 0 && offset + bytes.length <= this.end)) throw new RangeError(`MemorySink.patch: bytes ${offset}…${offset + bytes.length} lie outside the ${this.end} written`);
    this.put(offset, bytes);
  }

  rewind(): void {
    this.at = 0;
    this.end = 0;
  }

  /** A copy of the bytes written. */
  bytes(): Uint8Array {
    return this.buf.slice(0, this.end);
  }

  private put(at: number, bytes: Uint8Array): void {
    if (at + bytes.length > this.buf.length) {
      const grown = new Uint8Array(Math.max(at + bytes.length, 2 * this.buf.length));
      grown.set(this.buf.subarray(0, this.end));
      this.buf = grown;
    }
    this.buf.set(bytes, at);
    if (at + bytes.length > this.end) this.end = at + bytes.length;
  }
}
