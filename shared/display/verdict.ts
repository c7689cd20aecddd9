/**
 * The verdict in words and bars: each limit of a plan with how much of it the clip uses, the
 * binding limit as a sentence, and the gain slider's range. Pure; the web client draws these.
 */
import type { LimitCheck, LimitName } from '../plan/evaluate.ts';
import { LIMIT_LABELS } from '../plan/limit-labels.ts';
import type { PlanReport } from '../plan/report.ts';
import { MAX_GAIN_DB, MIN_GAIN_DB } from '../plan/advise.ts';
import { formatClock } from './format.ts';

/** Plain names of the planner's limits: the planner's own labels, so the page and the command line say the same. */
export const LIMIT_WORDS: Record<LimitName, string> = LIMIT_LABELS;

const ROLE_WORDS: Record<string, string> = { bridge: 'bridge switches', pass: 'pass transistor', modulator: 'rail modulator switch' };

/** The device's plain name: "bridge switches". */
export const roleWords = (role: string | null): string => (role ? (ROLE_WORDS[role] ?? role) : '');

/** A value with its limit's unit: 112.3 °C, 0.12 % (shares), 3.4 A. */
export function limitValue(v: number, unit: LimitCheck['unit']): string {
  if (!Number.isFinite(v)) return '—';
  if (unit === 'C') return `${v.toFixed(1)} °C`;
  if (unit === 'A') return `${v.toFixed(2)} A`;
  return `${(v * 100).toFixed(2)} %`;
}

export interface HeadroomRow {
  key: string;
  /** "junction temperature — bridge switches". */
  name: string;
  /** Share of the allowance used: 0 … 1 within, above 1 over (temperatures: rise over ambient). */
  used: number;
  ok: boolean;
  /** "31.2 °C to spare" or "over by 4.0 °C". */
  words: string;
  value: string;
  allowed: string;
  atS: number | null;
}

/**
 * One row per limit. A temperature's use is its rise above ambient over the allowed rise
 * ((Tj − Ta)/(limit − Ta)), since 0 °C means nothing to a junction; others are value/allowed.
 */
export function headroomRows(limits: LimitCheck[], ambientC: number): HeadroomRow[] {
  return limits.map((l, i) => {
    const used =
      l.unit === 'C'
        ? l.allowed - ambientC > 0
          ? (l.value - ambientC) / (l.allowed - ambientC)
          : l.value > l.allowed
            ? 2
            : 0
        : l.allowed > 0
          ? l.value / l.allowed
          : l.value > 0
            ? 2
            : 0;
    const spare = l.allowed - l.value;
    return {
      key: `${l.limit}-${l.role ?? i}`,
      name: `${LIMIT_WORDS[l.limit]}${l.role ? ` — ${roleWords(l.role)}` : ''}`,
      used: Number.isFinite(used) ? Math.max(0, used) : 2,
      ok: l.ok,
      words: l.ok ? `${limitValue(spare, l.unit)} to spare` : `over by ${limitValue(-spare, l.unit)}`,
      value: limitValue(l.value, l.unit),
      allowed: limitValue(l.allowed, l.unit),
      atS: l.atS,
    };
  });
}

/** The binding limit as a sentence (without its time, which the page makes a button). */
export function bindingWords(doc: Pick<PlanReport, 'binding' | 'advisedGainDb' | 'unsafeOnSilence'>): string {
  const b = doc.binding;
  if (!b) return doc.advisedGainDb === null ? 'No gain keeps every limit.' : 'No limit binds within the gain range searched.';
  const what = `${LIMIT_WORDS[b.limit]}${b.role ? ` of the ${roleWords(b.role)}` : ''}`;
  if (doc.unsafeOnSilence) return `The ${what} fails even with no signal: ${limitValue(b.value, b.unit)} against ${limitValue(b.allowed, b.unit)}. Check the driver profile.`;
  return `The ${what} binds: ${limitValue(b.value, b.unit)} against its limit of ${limitValue(b.allowed, b.unit)}`;
}

/** "at 1:23.4" for a binding time. */
export const atWords = (s: number | null): string => (s === null ? '' : `at ${formatClock(s)}`);

/** The gain slider's range around the advice, dB, within the planner's search range. */
export function sliderRange(advisedDb: number | null): { minDb: number; maxDb: number; stepDb: number } {
  const centre = advisedDb ?? -20;
  return { minDb: Math.max(MIN_GAIN_DB, Math.floor(centre - 24)), maxDb: Math.min(MAX_GAIN_DB, Math.ceil(centre + 12)), stepDb: 0.5 };
}
