/**
 * Numbers as a person reads them on the page: SI prefixes with three significant figures, fixed
 * decimals for levels, and times as m:ss. Pure; used by the web client.
 */

/** SI prefixes from giga to femto, largest first. */
export const PREFIXES: readonly [number, string][] = [
  [1e9, 'G'],
  [1e6, 'M'],
  [1e3, 'k'],
  [1, ''],
  [1e-3, 'm'],
  [1e-6, 'µ'],
  [1e-9, 'n'],
  [1e-12, 'p'],
  [1e-15, 'f'],
];

/**
 * `value` in `unit` with an SI prefix and `digits` significant figures: formatSi(152300, 'Hz') →
 * "152 kHz"; formatSi(2.2e-11, 'F') → "22.0 pF". Null or non-finite → "—". Units a prefix does not
 * suit (°C, %, dB, none) are written without one.
 */
export function formatSi(value: number | null | undefined, unit: string, digits = 3): string {
  if (value === null || value === undefined || !Number.isFinite(value)) return '—';
  if (unit === '°C' || unit === '%' || unit.startsWith('dB') || unit === 'LUFS' || unit === 'LU' || unit === '') {
    return `${+value.toPrecision(digits)}${unit ? ` ${unit}` : ''}`;
  }
  if (value === 0) return `0 ${unit}`;
  const a = Math.abs(value);
  for (const [f, p] of PREFIXES) {
    if (a >= f * (1 - 5 * 10 ** -(digits + 1))) return `${(value / f).toPrecision(digits)} ${p}${unit}`;
  }
  return `${value.toExponential(digits - 1)} ${unit}`;
}

/** A level in dB with one decimal and an explicit sign for gains: formatDb(3, true) → "+3.0 dB". */
export function formatDb(value: number | null | undefined, unit = 'dB', signed = false): string {
  if (value === null || value === undefined || !Number.isFinite(value)) return '—';
  const s = value.toFixed(1);
  return `${signed && value > 0 ? '+' : ''}${s === '-0.0' ? '0.0' : s} ${unit}`;
}

/** Seconds as m:ss.s (under an hour) or h:mm:ss: formatClock(75.25) → "1:15.3". */
export function formatClock(s: number | null | undefined): string {
  if (s === null || s === undefined || !Number.isFinite(s)) return '—';
  const neg = s < 0;
  let t = Math.abs(s);
  const h = Math.floor(t / 3600);
  t -= h * 3600;
  const m = Math.floor(t / 60);
  const sec = t - m * 60;
  const secText = sec.toFixed(1).padStart(4, '0');
  const body = h > 0 ? `${h}:${String(m).padStart(2, '0')}:${secText.split('.')[0].padStart(2, '0')}` : `${m}:${secText}`;
  return `${neg ? '−' : ''}${body}`;
}

/** A share 0…1 as a percentage with `digits` decimals: formatShare(0.0123) → "1.2 %". */
export function formatShare(x: number | null | undefined, digits = 1): string {
  if (x === null || x === undefined || !Number.isFinite(x)) return '—';
  return `${(x * 100).toFixed(digits)} %`;
}
