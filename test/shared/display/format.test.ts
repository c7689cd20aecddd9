import { describe, expect, it } from 'vitest';
import { formatClock, formatDb, formatShare, formatSi } from '../../../shared/display/format.ts';

describe('formatSi', () => {
  it.each([
    [152300, 'Hz', '152 kHz'],
    [2.2e-11, 'F', '22.0 pF'],
    [0.0168, 'H', '16.8 mH'],
    [999.96, 'Hz', '1.00 kHz'],
    [1.04, 'm', '1.04 m'],
    [0, 'V', '0 V'],
    [125, '°C', '125 °C'],
    [0.163, '', '0.163'],
  ])('%d %s → %s', (v, unit, text) => expect(formatSi(v, unit)).toBe(text));
  it('writes — for what is not known', () => {
    expect(formatSi(null, 'm')).toBe('—');
    expect(formatSi(Number.NaN, 'm')).toBe('—');
  });
});

describe('levels, clocks and shares', () => {
  it('signs gains', () => {
    expect(formatDb(3, 'dB', true)).toBe('+3.0 dB');
    expect(formatDb(-0.04, 'dB', true)).toBe('0.0 dB');
    expect(formatDb(-6, 'dBFS')).toBe('-6.0 dBFS');
    expect(formatDb(null)).toBe('—');
  });
  it('writes m:ss.s', () => {
    expect(formatClock(75.25)).toBe('1:15.3');
    expect(formatClock(5)).toBe('0:05.0');
    expect(formatClock(3725)).toBe('1:02:05');
  });
  it('writes percentages', () => expect(formatShare(0.0123)).toBe('1.2 %'));
});
