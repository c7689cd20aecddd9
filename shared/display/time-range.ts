/**
 * Zoom and pan of a time window inside a clip, s. Pure; the charts call these for their buttons.
 */
export interface TimeRange {
  fromS: number;
  toS: number;
}

/** Shortest span the charts zoom to, s (a few analysis frames). */
export const MIN_SPAN_S = 0.01;

/** Keeps a window of its own span inside [0, durationS] (shrinking it only if it is longer). */
export function clampRange(r: TimeRange, durationS: number): TimeRange {
  const span = Math.min(Math.max(r.toS - r.fromS, Math.min(MIN_SPAN_S, durationS)), durationS);
  let from = r.fromS;
  if (from < 0) from = 0;
  if (from + span > durationS) from = durationS - span;
  return { fromS: from, toS: from + span };
}

/**
 * The window `factor` times as long with the same centre (0.5 zooms in, 2 zooms out), inside
 * the clip. Example: zoomRange({ fromS: 10, toS: 20 }, 0.5, 60) → { fromS: 12.5, toS: 17.5 }.
 */
export function zoomRange(r: TimeRange, factor: number, durationS: number): TimeRange {
  if (!(factor > 0)) throw new RangeError(`zoomRange: factor must be > 0, got ${factor}`);
  const mid = (r.fromS + r.toS) / 2;
  const half = ((r.toS - r.fromS) * factor) / 2;
  return clampRange({ fromS: mid - half, toS: mid + half }, durationS);
}

/**
 * The window moved by `fraction` of its span (negative: earlier), stopping at the clip's ends.
 * Example: panRange({ fromS: 10, toS: 20 }, 0.5, 60) → { fromS: 15, toS: 25 }.
 */
export function panRange(r: TimeRange, fraction: number, durationS: number): TimeRange {
  const shift = (r.toS - r.fromS) * fraction;
  return clampRange({ fromS: r.fromS + shift, toS: r.toS + shift }, durationS);
}
