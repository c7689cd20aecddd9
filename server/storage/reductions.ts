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
import { readFile, writeFile } from 'node:fs/promises';

const MAGIC = 'CCR1';
type TA = Float64Array | Float32Array | Int32Array | Uint32Array | Uint8Array | Int16Array | Uint16Array | Int8Array;
const CTORS = { Float64Array, Float32Array, Int32Array, Uint32Array, Uint8Array, Int16Array, Uint16Array, Int8Array } as const;
type TAName = keyof typeof CTORS;

const isTA = (v: unknown): v is TA => ArrayBuffer.isView(v) && !(v instanceof DataView);
const pad8 = (n: number): number => (n + 7) & ~7;

/** Encodes `value` (plain objects, arrays, numbers, strings, booleans, null and typed arrays). */
export function encodeReductions(value: unknown): Uint8Array {
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
  const start = pad8(8 + header.length);
  const out = new Uint8Array(start + offset);
  out.set(new TextEncoder().encode(MAGIC), 0);
  new DataView(out.buffer).setUint32(4, header.length, true);
  out.set(header, 8);
  arrays.forEach((a, i) => out.set(new Uint8Array(a.buffer, a.byteOffset, a.byteLength), start + table[i].offset));
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

export const writeReductions = (path: string, value: unknown): Promise<void> => writeFile(path, encodeReductions(value));
export const readReductions = async <T>(path: string): Promise<T> => decodeReductions<T>(await readFile(path));
