/**
 * Reordering a list (the clips of a set): pure, returns a new array.
 */

/**
 * `items` with the entry at `from` moved to index `to` (both clamped to the list); the others
 * keep their order. Example: moveItem(['a', 'b', 'c'], 0, 2) → ['b', 'c', 'a'].
 */
export function moveItem<T>(items: readonly T[], from: number, to: number): T[] {
  const out = [...items];
  if (out.length === 0) return out;
  const f = Math.max(0, Math.min(out.length - 1, from));
  const t = Math.max(0, Math.min(out.length - 1, to));
  const [x] = out.splice(f, 1);
  out.splice(t, 0, x);
  return out;
}

/** A gap rounded up to whole seconds for a person to type: the shortest safe gap offered. */
export const roundGapUpS = (s: number): number => Math.ceil(s - 1e-9);
