/**
 * Test helper: builds WAV files byte by byte, independently of server/audio/wav.ts, so reader tests do
 * not depend on our writer. Layout per the Microsoft RIFF/WAVE specification (1991) and
 * "Multiple Channel Audio Data and WAVE Files" (2001).
 */

export interface WavSpec {
  /** Format tag in the fmt chunk (1 PCM, 3 float, 0xFFFE extensible, others for error cases). */
  tag?: number;
  /** SubFormat tag when tag is 0xFFFE. */
  subTag?: number;
  channels: number;
  sampleRate: number;
  /** Bytes per sample per channel (container). */
  containerBytes: number;
  /** wBitsPerSample; default 8·containerBytes. */
  bits?: number;
  /** wValidBitsPerSample for EXTENSIBLE; default bits. */
  validBits?: number;
  /** Interleaved sample payload. */
  data: Uint8Array;
  /** Chunks placed between fmt and data: [id, body]. */
  extraChunks?: [string, Uint8Array][];
  /** Overrides the data chunk's size field. */
  dataSizeField?: number;
  /** Overrides the RIFF size field. */
  riffSizeField?: number;
}

const enc = (s: string) => Uint8Array.from(s, (c) => c.charCodeAt(0));

function chunk(id: string, body: Uint8Array, sizeField = body.length): Uint8Array {
  const out = new Uint8Array(8 + body.length + (body.length & 1));
  out.set(enc(id), 0);
  new DataView(out.buffer).setUint32(4, sizeField >>> 0, true);
  out.set(body, 8);
  return out;
}

const concat = (parts: Uint8Array[]): Uint8Array => {
  const out = new Uint8Array(parts.reduce((s, p) => s + p.length, 0));
  let o = 0;
  for (const p of parts) {
    out.set(p, o);
    o += p.length;
  }
  return out;
};

export function buildWav(s: WavSpec): Uint8Array {
  const tag = s.tag ?? 1;
  const ext = tag === 0xfffe;
  const fmt = new Uint8Array(ext ? 40 : 16);
  const dv = new DataView(fmt.buffer);
  const blockAlign = s.channels * s.containerBytes;
  dv.setUint16(0, tag, true);
  dv.setUint16(2, s.channels, true);
  dv.setUint32(4, s.sampleRate, true);
  dv.setUint32(8, s.sampleRate * blockAlign, true);
  dv.setUint16(12, blockAlign, true);
  dv.setUint16(14, s.bits ?? 8 * s.containerBytes, true);
  if (ext) {
    dv.setUint16(16, 22, true);
    dv.setUint16(18, s.validBits ?? s.bits ?? 8 * s.containerBytes, true);
    dv.setUint32(20, 0, true);
    dv.setUint16(24, s.subTag ?? 1, true);
    fmt.set([0x00, 0x00, 0x00, 0x00, 0x10, 0x00, 0x80, 0x00, 0x00, 0xaa, 0x00, 0x38, 0x9b, 0x71], 26);
  }
  const body = concat([
    enc('WAVE'),
    chunk('fmt ', fmt),
    ...(s.extraChunks ?? []).map(([id, b]) => chunk(id, b)),
    chunk('data', s.data, s.dataSizeField ?? s.data.length),
  ]);
  const head = new Uint8Array(8);
  head.set(enc('RIFF'));
  new DataView(head.buffer).setUint32(4, (s.riffSizeField ?? body.length) >>> 0, true);
  return concat([head, body]);
}

/** Little-endian integer codes of `bytesPer` bytes each (two's complement; 8-bit as given, unsigned). */
export function intBytes(codes: number[], bytesPer: number): Uint8Array {
  const out = new Uint8Array(codes.length * bytesPer);
  codes.forEach((c, i) => {
    for (let b = 0; b < bytesPer; b++) out[i * bytesPer + b] = (c >> (8 * b)) & 0xff;
  });
  return out;
}

export function floatBytes(values: number[], bytesPer: 4 | 8): Uint8Array {
  const out = new Uint8Array(values.length * bytesPer);
  const dv = new DataView(out.buffer);
  values.forEach((v, i) => (bytesPer === 4 ? dv.setFloat32(i * 4, v, true) : dv.setFloat64(i * 8, v, true)));
  return out;
}

/** Expect a promise to reject with InputError of `code`; returns the error for message checks. */
export async function rejectsWithCode(p: Promise<unknown>, code: string): Promise<Error & { code: string }> {
  try {
    await p;
  } catch (e) {
    const err = e as Error & { code?: string };
    if (err.name !== 'InputError' || err.code !== code) {
      throw new Error(`expected InputError(${code}), got ${err.name}(${err.code ?? ''}): ${err.message}`);
    }
    return err as Error & { code: string };
  }
  throw new Error(`expected InputError(${code}), but it resolved`);
}
