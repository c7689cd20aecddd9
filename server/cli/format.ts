import type { PlanCautions } from '../../shared/plan/cautions.ts';

/** Text formatting shared by the commands' readable output. */

const PREFIXES: ReadonlyArray<[number, string]> = [
  [-15, 'f'], [-12, 'p'], [-9, 'n'], [-6, 'µ'], [-3, 'm'], [0, ''], [3, 'k'], [6, 'M'], [9, 'G'],
];

/**
 * Engineering notation with three significant figures and an SI prefix: 0.0287 H → "28.7 mH",
 * 6.1e-12 F → "6.10 pF", 380400 Hz → "380 kHz". Null → "—". Exported for tests.
 */
export function formatEng(value: number | null, unit: string): string {
  if (value === null || !Number.isFinite(value)) return '—';
  if (value === 0) return `0 ${unit}`;
  let exp = Math.floor(Math.log10(Math.abs(value)) / 3) * 3;
  exp = Math.min(9, Math.max(-15, exp));
  let mant = Number((value / 10 ** exp).toPrecision(3));
  if (Math.abs(mant) >= 1000 && exp < 9) {
    exp += 3;
    mant = Number((value / 10 ** exp).toPrecision(3));
  }
  const prefix = PREFIXES.find(([e]) => e === exp)?.[1] ?? '';
  const digits = Math.abs(mant) >= 100 ? 0 : Math.abs(mant) >= 10 ? 1 : 2;
  return `${mant.toFixed(digits)} ${prefix}${unit}`;
}

/** Rows of (label, value) as an aligned two-column block, each line prefixed by `indent`. */
export function alignRows(rows: readonly (readonly [string, string])[], indent = ''): string[] {
  const w = Math.max(...rows.map(([k]) => k.length));
  return rows.map(([k, v]) => `${indent}${k.padEnd(w)}  ${v}`);
}

/** The cautions of a plan or a render, as lines of text. */
export function cautionLines(c: PlanCautions): string[] {
  return ['Before you trust these figures', `  ${c.profile}`, '  Estimated, not measured:', ...c.estimated.map((e) => `  - ${e}`), `  ${c.keepOut}`];
}

