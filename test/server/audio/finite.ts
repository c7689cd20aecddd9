// Test helper: finds a number that is not finite anywhere in a JSON-like document.

/** Every number reachable in a JSON document: finite, or null (−∞ dB written as null by the summary). */
export function everyNumberFinite(doc: unknown, path = '$'): string | null {
  if (typeof doc === 'number') return Number.isFinite(doc) ? null : `${path} = ${doc}`;
  if (doc === null || typeof doc !== 'object') return null;
  if (ArrayBuffer.isView(doc)) return everyNumberFinite(Array.from(doc as Float64Array), path);
  for (const [k, v] of Object.entries(doc)) {
    const bad = everyNumberFinite(v, `${path}.${k}`);
    if (bad) return bad;
  }
  return null;
}
