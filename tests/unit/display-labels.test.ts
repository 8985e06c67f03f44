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

describe('layer preview legend and readout', () => {
  it('lists every flow band between the lowest and highest used, with no holes', async () => {
    const { legendBands } = await import('@/components/judging/flowScale');
    expect(legendBands([0, 1200, 0, 300, 0])).toEqual([{ i: 1, len: 1200 }, { i: 2, len: 0 }, { i: 3, len: 300 }]);
    expect(legendBands([0, 0])).toEqual([]);
  });
  it('numbers layers as the report counts them; a level the report skips says so', async () => {
    const { layerLabel } = await import('@/components/judging/flowScale');
    const report = { zMm: [0.2, 0.4, 0.6], count: 3 };
    // Preview levels: 0.2, 0.3 (a prime line the report leaves out), 0.4, 0.6.
    expect(layerLabel(0.2, 0, 4, report)).toBe('Layer 1 / 3');
    expect(layerLabel(0.3, 1, 4, report)).toBe('Not one of the 3 counted layers (prime line or purge)');
    expect(layerLabel(0.6, 3, 4, report)).toBe('Layer 3 / 3');
    expect(layerLabel(0.6, 3, 4, null)).toBe('Layer 4 / 4');
    // A report whose Z list was cut short falls back to the preview's own numbering.
    expect(layerLabel(0.6, 3, 4, { zMm: [0.2], count: 3 })).toBe('Layer 4 / 4');
  });
});

describe('early season steps ask first', () => {
  const season = { opensAt: '2027-03-01T17:00:00.000Z', closesAt: '2027-04-30T16:00:00.000Z', timeZone: 'Europe/Berlin' };
  it('asks before opening or closing ahead of the planned time, naming that time in the season zone', async () => {
    const { earlyTransitionQuestion } = await import('@/components/organizer/earlyTransition');
    // 17:00 UTC on 1 Mar is 18:00 in Berlin (CET = UTC+1, IANA tz database).
    expect(earlyTransitionQuestion('open', new Date('2027-02-20T00:00:00Z'), season)).toBe('Open entries now, before the planned opening on 1 Mar 2027, 18:00 (Europe/Berlin)? Entrants can submit from this moment.');
    expect(earlyTransitionQuestion('judging', new Date('2027-04-01T00:00:00Z'), season)).toMatch(/^Close entries now, before the planned close on 30 Apr 2027, 18:00 \(Europe\/Berlin\)\?/);
  });
  it('does not ask on or after the planned time, nor for other steps', async () => {
    const { earlyTransitionQuestion } = await import('@/components/organizer/earlyTransition');
    expect(earlyTransitionQuestion('open', new Date('2027-03-01T17:00:00Z'), season)).toBeNull();
    expect(earlyTransitionQuestion('judging', new Date('2027-05-01T00:00:00Z'), season)).toBeNull();
    expect(earlyTransitionQuestion('final', new Date('2027-01-01T00:00:00Z'), season)).toBeNull();
  });
});
