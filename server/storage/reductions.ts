/**
 * A compact file for an analysis's reductions (the ClipAnalysis with its frame statistics,
 * envelopes, histogram, spectrum, spectrogram and pitch track, plus the pulse candidates), so that
 * planning a stored clip at another gain never decodes it again.
 *
 * Layout: "CCR1", a little-endian u32 header length, the header (UTF-8 JSON), zero padding to a
 * multiple of 8, then each typed array's bytes, each starting at a multiple of 8. In the header's
 * `value`, a typed array is `{ "$ta": index }` into `arrays` ({ type, offset, length }), and a
 * non-finite number is `{ "$n": "NaN" | "Infinity" | "-Infinity" }` (JSON has neither), so the
 * value read back equals the value written, bit for bit.
 */
import { open, readFile } from 'node:fs/promises';

const MAGIC = 'CCR1';
type TA = Float64Array | Float32Array | Int32Array | Uint32Array | Uint8Array | Int16Array | Uint16Array | Int8Array;
const CTORS = { Float64Array, Float32Array, Int32Array, Uint32Array, Uint8Array, Int16Array, Uint16Array, Int8Array } as const;
type TAName = keyof typeof CTORS;

const isTA = (v: unknown): v is TA => ArrayBuffer.isView(v) && !(v instanceof DataView);
const pad8 = (n: number): number => (n + 7) & ~7;

/**
 * The file's bytes as pieces in order: magic, length and header (padded), then each typed array's
 * own bytes (views, not copies) with the padding after it. Written with one writev, no copy of
 * the arrays is made.
 */
function reductionParts(value: unknown): Uint8Array[] {
  const arrays: TA[] = [];
  const walk = (v: unknown): unknown => {
    if (typeof v === 'number') return Number.isFinite(v) ? v : { $n: String(v) };
    if (v === null || typeof v !== 'object') return v;
    if (isTA(v)) {
      arrays.push(v);
      return { $ta: arrays.length - 1 };
    }
    if (Array.isArray(v)) return v.map(walk);
    const o: Record<string, unknown> = {};
    for (const [k, x] of Object.entries(v)) if (x !== undefined) o[k] = walk(x);
    return o;
  };
  const json = walk(value);
  const table: { type: TAName; offset: number; length: number }[] = [];
  let offset = 0;
  for (const a of arrays) {
    table.push({ type: a.constructor.name as TAName, offset, length: a.length });
    offset = pad8(offset + a.byteLength);
  }
  const header = new TextEncoder().encode(JSON.stringify({ value: json, arrays: table }));
  const first = new Uint8Array(pad8(8 + header.length));
  first.set(new TextEncoder().encode(MAGIC), 0);
  new DataView(first.buffer).setUint32(4, header.length, true);
  first.set(header, 8);
  const parts: Uint8Array[] = [first];
  const zeros = new Uint8Array(8);
  for (const a of arrays) {
    if (a.byteLength > 0) parts.push(new Uint8Array(a.buffer, a.byteOffset, a.byteLength));
    const pad = pad8(a.byteLength) - a.byteLength;
    if (pad > 0) parts.push(zeros.subarray(0, pad));
  }
  return parts;
}

/** Encodes `value` (plain objects, arrays, numbers, strings, booleans, null and typed arrays). */
export function encodeReductions(value: unknown): Uint8Array {
  const parts = reductionParts(value);
  const out = new Uint8Array(parts.reduce((n, p) => n + p.length, 0));
  let at = 0;
  for (const p of parts) {
    out.set(p, at);
    at += p.length;
  }
  return out;
}

/** Decodes what encodeReductions wrote. Throws RangeError for a file that is not one. */
export function decodeReductions<T = unknown>(bytes: Uint8Array): T {
  if (bytes.length < 8 || new TextDecoder().decode(bytes.subarray(0, 4)) !== MAGIC) throw new RangeError('decodeReductions: not a reductions file');
  let b = bytes;
  if (b.byteOffset % 8 !== 0) b = b.slice(); // typed-array views need aligned offsets
  const len = new DataView(b.buffer, b.byteOffset).getUint32(4, true);
  const { value, arrays } = JSON.parse(new TextDecoder().decode(b.subarray(8, 8 + len))) as { value: unknown; arrays: { type: TAName; offset: number; length: number }[] };
  const start = pad8(8 + len);
  const views = arrays.map((a) => {
    const C = CTORS[a.type];
    if (!C) throw new RangeError(`decodeReductions: unknown array type ${a.type}`);
    return new C(b.buffer as ArrayBuffer, b.byteOffset + start + a.offset, a.length);
  });
  const walk = (v: unknown): unknown => {
    if (v === null || typeof v !== 'object') return v;
    if (Array.isArray(v)) return v.map(walk);
    const o = v as Record<string, unknown>;
    if (typeof o.$ta === 'number') return views[o.$ta];
    if (typeof o.$n === 'string') return Number(o.$n);
    const r: Record<string, unknown> = {};
    for (const [k, x] of Object.entries(o)) r[k] = walk(x);
    return r;
  };
  return walk(value) as T;
}

/**
 * Writes encodeReductions(value)'s bytes to a new file at `path` (it must not exist) straight from
 * the arrays, without the whole file in memory first. Not flushed: commitFile does that.
 */
export async function writeReductions(path: string, value: unknown): Promise<void> {
  const parts = reductionParts(value);
  const fh = await open(path, 'wx');
  try {
    // writev takes at most IOV_MAX (1024 on Linux) pieces a call and may write fewer bytes than asked.
    for (let i = 0; i < parts.length; ) {
      const batch = parts.slice(i, i + 512);
      i += batch.length;
      let { bytesWritten } = await fh.writev(batch);
      for (const p of batch) {
        let done = Math.min(bytesWritten, p.length);
        bytesWritten -= done;
        while (done < p.length) done += (await fh.write(p, done)).bytesWritten;
      }
    }
  } finally {
    await fh.close();
  }
}
export const readReductions = async <T>(path: string): Promise<T> => decodeReductions<T>(await readFile(path));
