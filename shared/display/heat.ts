/**
 * The spectrogram as a heat map: its grid with the 0 Hz row dropped (a log axis cannot show it),
 * levels normalised to 0…1 over a fixed 80 dB window below the loudest cell, and a colour scale.
 */

/** Decibels shown below the loudest cell. */
export const HEAT_RANGE_DB = 80;

export interface HeatGrid {
  times: number;
  /** Positive frequencies, Hz (ascending). */
  freqs: number[];
  highDb: number;
  lowDb: number;
  /** Level of cell (time index, frequency index into `freqs`), 0 (lowDb or below) … 1 (highDb). */
  level: (t: number, f: number) => number;
}

/**
 * Reads `powerDb` as rows by time (powerDb[t][f]); a grid stored by frequency (powerDb[f][t]) is
 * recognised by its lengths and read the other way. Null when empty.
 */
export function spectrogramGrid(timeS: number[], freqHz: number[], powerDb: number[][]): HeatGrid | null {
  if (timeS.length === 0 || freqHz.length === 0 || powerDb.length === 0) return null;
  const byTime = powerDb.length === timeS.length && (powerDb[0]?.length ?? 0) === freqHz.length;
  const at = byTime ? (t: number, f: number) => powerDb[t][f] : (t: number, f: number) => powerDb[f]?.[t];
  const first = freqHz.findIndex((f) => f > 0);
  if (first < 0) return null;
  const freqs = freqHz.slice(first);
  let high = -Infinity;
  for (let t = 0; t < timeS.length; t++) for (let f = first; f < freqHz.length; f++) {
    const v = at(t, f);
    if (typeof v === 'number' && v > high) high = v;
  }
  if (!Number.isFinite(high)) high = 0;
  const low = high - HEAT_RANGE_DB;
  return {
    times: timeS.length,
    freqs,
    highDb: high,
    lowDb: low,
    level: (t, f) => {
      const v = at(t, f + first);
      if (typeof v !== 'number' || !Number.isFinite(v)) return 0;
      return Math.min(1, Math.max(0, (v - low) / HEAT_RANGE_DB));
    },
  };
}

/**
 * Colour of a level 0…1: a ramp from near black through purple and orange to pale yellow, whose
 * lightness rises monotonically (so it reads in grey and for colour-blind eyes), by linear
 * interpolation between five stops taken from the "inferno" map of Smith & van der Walt (2015,
 * matplotlib) [recalled].
 */
export function heatColour(level: number): [number, number, number] {
  const stops: [number, number, number][] = [
    [0, 0, 4],
    [87, 16, 110],
    [188, 55, 84],
    [249, 142, 9],
    [252, 255, 164],
  ];
  const x = Math.min(1, Math.max(0, level)) * (stops.length - 1);
  const i = Math.min(stops.length - 2, Math.floor(x));
  const u = x - i;
  const a = stops[i];
  const b = stops[i + 1];
  return [Math.round(a[0] + (b[0] - a[0]) * u), Math.round(a[1] + (b[1] - a[1]) * u), Math.round(a[2] + (b[2] - a[2]) * u)];
}
