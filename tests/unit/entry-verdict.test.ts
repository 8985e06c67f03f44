/** The one-line inspection verdict at the top of the public entry page. */
import { describe, it, expect } from 'vitest';
import { inspectionVerdict } from '@/lib/standings/summary';

const v = (pass: number, fail: number, unknown: number, flags = 0) => inspectionVerdict({ rules: { pass, fail, unknown }, flags });

describe('inspectionVerdict', () => {
  it('says every rule passes only when none fails or is unmeasured', () => {
    expect(v(12, 0, 0)).toEqual({ tone: 'pass', headline: 'All 12 rules pass', flags: 'No flags' });
    expect(v(1, 0, 0).headline).toBe('The one rule passes');
  });
  it('puts a failing rule ahead of an unmeasured one, with the right verb and plural', () => {
    expect(v(10, 1, 1, 2)).toEqual({ tone: 'fail', headline: '1 of 12 rules fails', flags: '2 flags for the judges' });
    expect(v(9, 3, 0, 1)).toEqual({ tone: 'fail', headline: '3 of 12 rules fail', flags: '1 flag for the judges' });
    expect(v(11, 0, 1)).toMatchObject({ tone: 'open', headline: '11 of 12 rules pass; 1 could not be measured' });
  });
  it('is plain about a class without rules and about a missing inspection', () => {
    expect(v(0, 0, 0).tone).toBe('none');
    expect(inspectionVerdict(null)).toEqual({ tone: 'none', headline: 'No finished inspection on record', flags: '' });
  });
});
