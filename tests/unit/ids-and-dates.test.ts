import { describe, it, expect } from 'vitest';
import { idSchema, parseId } from '@/lib/ids';
import { isRealLocalDateTime, zonedLocalToUtc } from '@/lib/seasons/time';
import { entryWindowProblem } from '@/lib/seasons/window';

describe('ids are plain positive whole numbers', () => {
  it('accepts digits and JSON integers', () => {
    expect(parseId('7')).toBe(7);
    expect(parseId('123456789012345')).toBe(123456789012345);
    expect(parseId(42)).toBe(42);
    expect(idSchema().parse('10')).toBe(10);
  });

  it('refuses what Number() would stretch into an id', () => {
    for (const v of ['1e1', '0x7', ' 7', '7 ', '07', '+7', '7.0', '-7', '0', '', '1_000', '１２', '1234567890123456', 7.5, -1, 0, Number.MAX_SAFE_INTEGER + 1, null, undefined, true, [7]]) {
      expect(parseId(v), JSON.stringify(v)).toBeNull();
    }
    expect(idSchema('Choose a season.').safeParse('1e1').error?.issues[0].message).toBe('Choose a season.');
  });
});

describe('season dates are real dates', () => {
  it('refuses impossible dates instead of rolling them over', () => {
    for (const d of ['2026-13-45T99:99', '2026-02-29T10:00', '2026-04-31T10:00', '2026-00-10T10:00', '2026-01-00T10:00', '2026-01-10T24:00', '2026-01-10T23:60'])
      expect(isRealLocalDateTime(d), d).toBe(false);
    expect(() => zonedLocalToUtc('2026-13-45T99:99', 'UTC')).toThrow(RangeError);
  });

  it('accepts real ones, leap days by the Gregorian rule (divisible by 4, not by 100 unless by 400; common practice, no source)', () => {
    for (const d of ['2028-02-29T00:00', '2000-02-29T23:59', '2026-12-31T23:59', '2026-01-01T00:00']) expect(isRealLocalDateTime(d), d).toBe(true);
    expect(isRealLocalDateTime('2100-02-29T12:00')).toBe(false);
  });
});

describe('the entry window', () => {
  const season = { name: 'Test Cup', state: 'open', opensAt: new Date('2026-12-10T18:00:00Z'), closesAt: new Date('2027-01-31T18:00:00Z'), timeZone: 'UTC' };

  it('an open season takes entries only between its published dates, and says when', () => {
    expect(entryWindowProblem(season, new Date('2026-12-09T12:00:00Z'))).toMatch(/^Test Cup takes entries from 10 Dec 2026, 18:00 UTC until 31 Jan 2027, 18:00 UTC; come back when it opens\.$/);
    expect(entryWindowProblem(season, new Date('2026-12-10T18:00:00Z'))).toBeNull();
    expect(entryWindowProblem(season, new Date('2027-01-31T18:00:00Z'))).toMatch(/took entries until 31 Jan 2027, 18:00 UTC; the entry window has closed/);
    expect(entryWindowProblem({ ...season, state: 'judging' }, new Date('2026-12-20T00:00:00Z'))).toMatch(/not open for entries \(it is judging\)/);
  });
});
