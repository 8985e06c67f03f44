/** Season editor inputs: dates in the season's time zone, overlapping dates, slugs, safe Markdown. */
import { describe, expect, it } from 'vitest';
import { SeasonInputSchema, ClassInputSchema } from '@/lib/seasons/schemas';
import { fieldErrors } from '@/lib/http';
import { isTimeZone, utcToZonedLocal, zonedLocalToUtc } from '@/lib/seasons/time';

const valid = {
  name: 'Thaw Dash', slug: 'thaw-dash', hostName: 'Millbrook Makers', description: '',
  opensAt: '2027-03-01T18:00', closesAt: '2027-04-30T18:00', timeZone: 'Europe/Berlin',
  timingConvention: 'First extrusion to last extrusion', photosRequired: 2, photoKinds: ['Top view'], videoRequired: true, entryLimit: 3, verificationsRequired: 1,
};

describe('SeasonInputSchema', () => {
  it('accepts a complete season', () => {
    expect(SeasonInputSchema.safeParse(valid).success).toBe(true);
  });
  it('refuses a close before the opening, on the closing field', () => {
    const f = fieldErrors(SeasonInputSchema.safeParse({ ...valid, closesAt: '2027-02-28T18:00' }).error!);
    expect(f.closesAt).toMatch(/close after it opens/);
  });
  it('refuses equal open and close times', () => {
    expect(fieldErrors(SeasonInputSchema.safeParse({ ...valid, closesAt: valid.opensAt }).error!).closesAt).toBeDefined();
  });
  it('refuses a slug with capitals or spaces and says what to use', () => {
    expect(fieldErrors(SeasonInputSchema.safeParse({ ...valid, slug: 'Thaw Dash' }).error!).slug).toMatch(/lower-case letters/);
  });
  it('refuses an unknown time zone', () => {
    expect(fieldErrors(SeasonInputSchema.safeParse({ ...valid, timeZone: 'Mars/Olympus' }).error!).timeZone).toMatch(/IANA/);
  });
  it('refuses more photo descriptions than photos', () => {
    expect(fieldErrors(SeasonInputSchema.safeParse({ ...valid, photosRequired: 0 }).error!).photoKinds).toMatch(/at most as many/);
  });
});

describe('ClassInputSchema', () => {
  it('reads a comma-separated nozzle list and names a word that is not a number', () => {
    expect(ClassInputSchema.parse({ name: 'Open', slug: 'open', nozzleDiametersMm: '0.4, 0.5' }).nozzleDiametersMm).toEqual([0.4, 0.5]);
    const f = fieldErrors(ClassInputSchema.safeParse({ name: 'Open', slug: 'open', nozzleDiametersMm: '0.4, big' }).error!);
    expect(f['nozzleDiametersMm.1']).toMatch(/"big" is not a number/);
  });
  it('refuses a build-volume band upside down', () => {
    const f = fieldErrors(ClassInputSchema.safeParse({ name: 'Open', slug: 'open', buildVolumeMinMm: '300', buildVolumeMaxMm: '200' }).error!);
    expect(f.buildVolumeMaxMm).toMatch(/must not be below/);
  });
});

describe('season dates in the season time zone', () => {
  // IANA tz database: Europe/Berlin is UTC+1 (CET) in winter and UTC+2 (CEST) in summer; EU
  // summer time starts on the last Sunday of March at 01:00 UTC (Directive 2000/84/EC, art. 2),
  // i.e. 2027-03-28.
  it('converts winter and summer wall-clock times', () => {
    expect(zonedLocalToUtc('2027-01-15T18:00', 'Europe/Berlin').toISOString()).toBe('2027-01-15T17:00:00.000Z');
    expect(zonedLocalToUtc('2027-07-15T18:00', 'Europe/Berlin').toISOString()).toBe('2027-07-15T16:00:00.000Z');
  });
  it('handles the morning of the change', () => {
    expect(zonedLocalToUtc('2027-03-28T01:30', 'Europe/Berlin').toISOString()).toBe('2027-03-28T00:30:00.000Z');
    expect(zonedLocalToUtc('2027-03-28T03:30', 'Europe/Berlin').toISOString()).toBe('2027-03-28T01:30:00.000Z');
  });
  // US daylight time starts the second Sunday of March (Energy Policy Act of 2005, §110):
  // 2027-03-14; America/Chicago is UTC−6 before, UTC−5 after.
  it('converts a US zone across its change', () => {
    expect(zonedLocalToUtc('2027-03-13T12:00', 'America/Chicago').toISOString()).toBe('2027-03-13T18:00:00.000Z');
    expect(zonedLocalToUtc('2027-03-15T12:00', 'America/Chicago').toISOString()).toBe('2027-03-15T17:00:00.000Z');
  });
  it('round-trips to the wall clock the organizer typed', () => {
    for (const tz of ['UTC', 'Europe/Berlin', 'America/Chicago', 'Asia/Kolkata', 'Pacific/Auckland']) {
      expect(utcToZonedLocal(zonedLocalToUtc('2027-02-10T09:45', tz), tz)).toBe('2027-02-10T09:45');
    }
    // Asia/Kolkata is UTC+5:30 all year (IANA tz database).
    expect(zonedLocalToUtc('2027-02-10T09:45', 'Asia/Kolkata').toISOString()).toBe('2027-02-10T04:15:00.000Z');
  });
  it('knows real zones from made-up ones', () => {
    expect(isTimeZone('Europe/Berlin')).toBe(true);
    expect(isTimeZone('Nowhere/Land')).toBe(false);
    expect(isTimeZone('')).toBe(false);
  });
});
