/** Small display formatters: pager status, season windows, rule sentences, setting labels and tolerances. */
import { describe, it, expect } from 'vitest';
import { formatPageStatus, formatSeasonWindow } from '@/lib/format';
import { ruleSentence } from '@/lib/inspection/rules';
import { settingLabel, settingOutOfTolerance } from '@/lib/reviews/report';

describe('formatPageStatus', () => {
  it('reads "Page n of m" inside the range and says so past the end', () => {
    expect(formatPageStatus(2, 2, 15)).toBe('Page 2 of 2 · 15 ranked');
    expect(formatPageStatus(99, 1, 3)).toBe('Page 99 does not exist: the last page is 1 · 3 ranked');
    // An empty class still has one (empty) page, never "of 0".
    expect(formatPageStatus(1, 0, 0)).toBe('Page 1 of 1 · 0 ranked');
  });
});

describe('formatSeasonWindow', () => {
  it('names the season time zone and shows local times there', () => {
    // 17:00 UTC on 12 Feb is 18:00 in Berlin (CET = UTC+1, IANA tz database).
    expect(formatSeasonWindow('2027-02-12T17:00:00Z', '2027-02-26T17:00:00Z', 'Europe/Berlin')).toBe('12 Feb 2027, 18:00 – 26 Feb 2027, 18:00 (Europe/Berlin)');
    expect(formatSeasonWindow('2027-02-12T17:00:00Z', '2027-02-26T17:00:00Z', 'UTC', false)).toBe('12 Feb 2027 – 26 Feb 2027 (UTC)');
  });
});

describe('ruleSentence', () => {
  it('reads a range with equal ends as the one value', () => {
    expect(ruleSentence({ metric: 'feed_override_percent_max', comparator: 'between', value: 110, valueMax: 110, tolerance: null, severity: 'advisory' } as never)).toBe('Speed override (max) must be 110 %.');
    expect(ruleSentence({ metric: 'feed_override_percent_max', comparator: 'between', value: 100, valueMax: 110, tolerance: null, severity: 'advisory' } as never)).toBe('Speed override (max) must be between 100 and 110 %.');
  });
});

describe('settings table labels and highlighting', () => {
  it('labels report keys in words with their unit', () => {
    expect(settingLabel('layer_height_mm')).toBe('Layer height, mm');
    expect(settingLabel('infill_percent')).toBe('Sparse infill, %');
  });
  it('marks a row only beyond the same tolerance the mismatch flag uses', () => {
    // Infill ±3 points and layer height ±0.01 mm (lib/inspection/toolpath/mismatch.ts).
    expect(settingOutOfTolerance({ key: 'infill_percent', declared: 15, measured: 16.4 })).toBe(false);
    expect(settingOutOfTolerance({ key: 'infill_percent', declared: 15, measured: 19 })).toBe(true);
    expect(settingOutOfTolerance({ key: 'layer_height_mm', declared: 0.2, measured: 0.205 })).toBe(false);
    expect(settingOutOfTolerance({ key: 'walls', declared: 3, measured: 4 })).toBe(true);
    expect(settingOutOfTolerance({ key: 'walls', declared: 3, measured: null })).toBe(false);
    expect(settingOutOfTolerance({ key: 'line_width_mm', declared: 0.45, measured: 0.5 })).toBe(false);
  });
});
