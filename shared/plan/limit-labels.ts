/**
 * The names a person reads for the planner's limits, the same in text and JSON (`label`): each
 * says what is counted. Two of the pulse limits count pulses the driver's limits had to cut, not a
 * duty cycle: "pulses clamped by the duty limit: 0.123 % of pulses, allowed 0.100 %". The duty
 * cycle itself is reported beside them (shared/plan/duty-cycle.ts).
 *
 * Shares are fractions 0…1 in JSON and percentages with their base ("% of pulses", "% of the
 * time") in text.
 */
import type { DeviceRole } from '../schemas/driver.ts';
import { tooSlowLabel } from '../physics/driver/transition.ts';
import type { LimitCheck, LimitName } from './evaluate.ts';

export const LIMIT_LABELS: Record<LimitName, string> = {
  'junction-temperature': 'junction temperature',
  'over-modulation': 'over-modulated time',
  'supply-current': 'supply current',
  'on-time': 'pulses cut to the longest on-time',
  duty: 'pulses clamped by the duty limit',
  'switching-speed': 'switching speed',
};

/** What a share limit is a share of. */
export const SHARE_BASE: Partial<Record<LimitName, string>> = {
  'over-modulation': 'of the time',
  'on-time': 'of pulses',
  duty: 'of pulses',
};

/**
 * "junction temperature (pass)", "pulses clamped by the duty limit", … A switching-speed limit
 * names its frequency, and past its edge reads as the advice words it: "bridge switch: too slow
 * for 3.1 MHz" (shared/physics/driver/transition.ts).
 */
export function limitLabel(l: { limit: LimitName; role: DeviceRole | null; value?: number; allowed?: number; frequencyHz?: number }): string {
  if (l.limit === 'switching-speed' && l.role && l.frequencyHz !== undefined) {
    if (l.value !== undefined && l.allowed !== undefined && l.value > l.allowed) return tooSlowLabel({ role: l.role, switchingHz: l.frequencyHz });
    return `switching speed (${l.role}) at ${formatHz(l.frequencyHz)}`;
  }
  return `${LIMIT_LABELS[l.limit] ?? l.limit}${l.role ? ` (${l.role})` : ''}`;
}

const formatHz = (hz: number): string => (hz >= 1e6 ? `${(hz / 1e6).toPrecision(3)} MHz` : `${(hz / 1e3).toPrecision(3)} kHz`);

/** A value in the limit's unit as a person reads it: "71.3 °C", "2.40 A", "0.123 % of pulses". */
export function limitValueText(value: number, unit: LimitCheck['unit'], limit?: LimitName): string {
  if (!Number.isFinite(value)) return '—';
  if (unit === 'C') return `${value.toFixed(1)} °C`;
  if (unit === 'A') return `${value.toFixed(2)} A`;
  const base = limit ? SHARE_BASE[limit] : undefined;
  return `${(value * 100).toFixed(3)} %${base ? ` ${base}` : ''}`;
}

/** "pulses clamped by the duty limit: 0.123 % of pulses, allowed 0.100 %". */
export function limitText(l: { limit: LimitName; role: DeviceRole | null; value: number; allowed: number; unit: LimitCheck['unit']; frequencyHz?: number }): string {
  if (l.limit === 'switching-speed') {
    return `${limitLabel(l)}: transitions ${(l.value * 100).toFixed(1)} % of each cycle (at most ${(l.allowed * 100).toFixed(0)} %)`;
  }
  const allowed = limitValueText(l.allowed, l.unit);
  return `${limitLabel(l)}: ${limitValueText(l.value, l.unit, l.limit)}, allowed ${allowed}`;
}
