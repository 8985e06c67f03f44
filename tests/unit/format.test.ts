/** The shared display formats: durations, figures, claimed times. */
import { describe, it, expect } from 'vitest';
import { formatDurationMs, formatDurationS, formatNumber } from '@/lib/format';

describe('formatDurationS', () => {
  // Arithmetic: 1 min = 60 s, 1 h = 3600 s, 1 d = 86 400 s (SI-accepted units of time).
  it('shows seconds below a minute', () => {
    expect(formatDurationS(0)).toBe('0 s');
    expect(formatDurationS(45)).toBe('45 s');
    expect(formatDurationS(44.6)).toBe('45 s');
  });
  it('shows minutes and seconds below an hour', () => {
    expect(formatDurationS(200)).toBe('3 min 20 s');
    expect(formatDurationS(65)).toBe('1 min 05 s');
    expect(formatDurationS(59.6)).toBe('1 min 00 s');
    expect(formatDurationS(3599)).toBe('59 min 59 s');
  });
  it('shows hours and minutes below a day, rounding to the minute', () => {
    expect(formatDurationS(3599.6)).toBe('1 h 00 min');
    expect(formatDurationS(3720)).toBe('1 h 02 min');
    expect(formatDurationS(3749)).toBe('1 h 02 min');
    expect(formatDurationS(3750)).toBe('1 h 03 min');
    expect(formatDurationS(23 * 3600 + 59 * 60)).toBe('23 h 59 min');
  });
  it('shows days and hours from a day on', () => {
    expect(formatDurationS(86_370)).toBe('1 d 00 h');
    expect(formatDurationS(2 * 86_400 + 5 * 3600)).toBe('2 d 05 h');
  });
  it('shows a dash for a missing, negative or non-finite duration', () => {
    expect(formatDurationS(null)).toBe('—');
    expect(formatDurationS(undefined)).toBe('—');
    expect(formatDurationS(-1)).toBe('—');
    expect(formatDurationS(Number.NaN)).toBe('—');
  });
});

describe('formatNumber', () => {
  it('rounds to the given decimals and adds the unit after a space', () => {
    expect(formatNumber(31.46, 1, 'mm³/s')).toBe('31.5 mm³/s');
    expect(formatNumber(0.2, 2, 'mm')).toBe('0.20 mm');
    expect(formatNumber(20.04, 1)).toBe('20.0');
  });
  it('shows a dash for a missing or non-finite figure', () => {
    expect(formatNumber(null, 1, 'g')).toBe('—');
    expect(formatNumber(undefined, 1)).toBe('—');
    expect(formatNumber(Number.POSITIVE_INFINITY, 1)).toBe('—');
  });
});

describe('formatDurationMs (claimed times)', () => {
  it('keeps the h:mm:ss.t form entrants type', () => {
    // 1 h 2 min 3.4 s = 3 723 400 ms.
    expect(formatDurationMs(3_723_400)).toBe('1:02:03.4');
    expect(formatDurationMs(1_510_000)).toBe('0:25:10.0');
    expect(formatDurationMs(null)).toBe('—');
  });
});
