/** Pure parts of the standings: parameter parsing, sorting and filtering rules, CSV, ETags, chart bins, plain-words summary. */
import { describe, it, expect } from 'vitest';
import { parseStandingsQuery, standingsSearchParams, DEFAULT_QUERY } from '@/lib/standings/params';
import { filterRows, sortRows, type StandingsRow } from '@/lib/standings/query';
import { csvField, parseCsv, standingsCsv } from '@/lib/standings/csv';
import { etagOf, matchesEtag } from '@/lib/standings/http';
import { niceStep, sample, timeHistogram } from '@/lib/standings/overview';
import { flowSeriesPoints, inspectionSummary } from '@/lib/standings/summary';
import { blankReport, reportWith } from '../support/reports';
import { HttpError } from '@/lib/errors';

const row = (rank: number, o: Partial<StandingsRow> = {}): StandingsRow => ({
  rank, entry_id: rank * 10, entrant_id: rank, entrant: `E${rank}`, machine_id: rank, machine: `M${rank}`, motion: 'corexy', material: 'pla', nozzle_mm: 0.4,
  time_ms: 1_000_000 + rank, peak_flow_mm3s: 20, p95_flow_mm3s: 16, layer_height_mm: 0.25, date: '2026-11-20T12:00:00.000Z', verified_entries: 1, ...o,
});

describe('parseStandingsQuery', () => {
  it('gives the defaults for no parameters', () => {
    expect(parseStandingsQuery(new URLSearchParams())).toEqual(DEFAULT_QUERY);
  });
  it('reads every parameter and the sort direction', () => {
    const q = parseStandingsQuery(new URLSearchParams('page=3&per_page=50&sort=-peak_flow&material=petg&motion=delta&q=%20heron%20&format=csv'));
    expect(q).toEqual({ page: 3, perPage: 50, sort: 'peak_flow', desc: true, material: 'petg', motion: 'delta', q: 'heron', format: 'csv', paged: true });
  });
  it('accepts a page object as Next passes searchParams', () => {
    expect(parseStandingsQuery({ sort: 'time', material: undefined }).sort).toBe('time');
  });
  it('refuses bad values with a 400 naming the parameter', () => {
    for (const [qs, field] of [['per_page=101', 'per_page'], ['page=0', 'page'], ['sort=fast', 'sort'], ['motion=scara', 'motion'], ['zzz=1', 'zzz'], ['q=a&q=b', 'q']]) {
      try {
        parseStandingsQuery(new URLSearchParams(qs));
        expect.unreachable(qs);
      } catch (err) {
        expect(err).toBeInstanceOf(HttpError);
        expect((err as HttpError).status).toBe(400);
        expect(Object.keys((err as HttpError).fields ?? {})).toContain(field);
      }
    }
  });
  it('writes URLs without defaults, so equal views have equal links, and round-trips', () => {
    expect(standingsSearchParams(DEFAULT_QUERY).toString()).toBe('');
    const q = parseStandingsQuery(new URLSearchParams('sort=-p95_flow&page=2&material=abs&q=a b'));
    const again = parseStandingsQuery(standingsSearchParams(q));
    expect(again).toEqual(q);
    expect(standingsSearchParams(q, { format: 'csv', withPaging: false }).toString()).toBe('sort=-p95_flow&material=abs&q=a+b&format=csv');
  });
});

describe('sortRows and filterRows', () => {
  const rows = [row(1, { peak_flow_mm3s: 18 }), row(2, { peak_flow_mm3s: null, machine: 'Swift one' }), row(3, { peak_flow_mm3s: 30, material: 'petg' }), row(4, { peak_flow_mm3s: 18, motion: 'delta', machine: 'swift TWO' })];
  it('puts rows without the figure last in both directions, equal values in rank order', () => {
    expect(sortRows(rows, { sort: 'peak_flow', desc: true }).map((r) => r.rank)).toEqual([3, 1, 4, 2]);
    expect(sortRows(rows, { sort: 'peak_flow', desc: false }).map((r) => r.rank)).toEqual([1, 4, 3, 2]);
  });
  it('sorts names without regard to case and leaves the input alone', () => {
    const byMachine = sortRows(rows, { sort: 'machine', desc: false }).map((r) => r.machine);
    expect(byMachine).toEqual(['M1', 'M3', 'Swift one', 'swift TWO']);
    expect(rows.map((r) => r.rank)).toEqual([1, 2, 3, 4]);
  });
  it('filters by material, motion and a case-insensitive machine substring', () => {
    expect(filterRows(rows, { material: 'petg' }).map((r) => r.rank)).toEqual([3]);
    expect(filterRows(rows, { motion: 'delta' }).map((r) => r.rank)).toEqual([4]);
    expect(filterRows(rows, { q: 'SWIFT' }).map((r) => r.rank)).toEqual([2, 4]);
    expect(filterRows(rows, { q: 'swift', motion: 'corexy' }).map((r) => r.rank)).toEqual([2]);
  });
});

describe('CSV', () => {
  // RFC 4180 §2: fields with commas, quotes or line breaks are quoted; quotes are doubled; lines end in CRLF.
  it('quotes per RFC 4180 and reads its own output back', () => {
    expect(csvField('plain')).toBe('plain');
    expect(csvField('a,b')).toBe('"a,b"');
    expect(csvField('say "hi"')).toBe('"say ""hi"""');
    expect(csvField(null)).toBe('');
    const text = standingsCsv([row(1, { entrant: 'Doe, "Jo"', machine: 'Line\nbreak' })]);
    expect(text.endsWith('\r\n')).toBe(true);
    const [header, first] = parseCsv(text);
    expect(header[0]).toBe('rank');
    expect(first[2]).toBe('Doe, "Jo"');
    expect(first[3]).toBe('Line\nbreak');
  });
  // OWASP "CSV Injection": cells starting with = + - @ run as formulas in spreadsheets.
  it('defuses text cells that a spreadsheet would run as a formula, not numbers', () => {
    expect(csvField('=HYPERLINK("x")')).toBe(`"'=HYPERLINK(""x"")"`);
    expect(csvField('@cmd')).toBe("'@cmd");
    expect(csvField(-1.5)).toBe('-1.5');
  });
});

describe('ETags', () => {
  // RFC 9110 §13.1.2: If-None-Match uses the weak comparison; "*" matches any current representation.
  it('matches strong and weak forms, lists and *', () => {
    const e = etagOf('{"a":1}');
    expect(e).toMatch(/^"[\w-]+"$/);
    expect(etagOf('{"a":1}')).toBe(e);
    expect(etagOf('{"a":2}')).not.toBe(e);
    expect(matchesEtag(e, e)).toBe(true);
    expect(matchesEtag(`W/${e}`, e)).toBe(true);
    expect(matchesEtag(`"x", ${e}`, e)).toBe(true);
    expect(matchesEtag('*', e)).toBe(true);
    expect(matchesEtag('"x"', e)).toBe(false);
    expect(matchesEtag(null, e)).toBe(false);
  });
});

describe('overview figures', () => {
  // Heckbert, "Nice numbers for graph labels", Graphics Gems (1990): steps of 1, 2 or 5 × 10ⁿ.
  it('picks nice bin widths', () => {
    expect(niceStep(0.7)).toBe(1);
    expect(niceStep(13)).toBe(20);
    expect(niceStep(37)).toBe(50);
    expect(niceStep(61)).toBe(100);
    expect(niceStep(0)).toBe(1);
  });
  it('bins every time once, per class, over shared edges', () => {
    const bins = timeHistogram({ a: [1500, 1510, 1620], b: [1555, 1790] }, 12);
    expect(bins[0].from_s).toBe(1500);
    expect(bins[1].from_s - bins[0].from_s).toBe(50); // (1790 − 1500) / 12 ≈ 24 → 50
    expect(bins.reduce((s, b) => s + b.a, 0)).toBe(3);
    expect(bins.reduce((s, b) => s + b.b, 0)).toBe(2);
    expect(bins.at(-1)!.to_s).toBeGreaterThan(1790);
    expect(timeHistogram({})).toEqual([]);
  });
  it('samples evenly and keeps short lists whole', () => {
    expect(sample([1, 2, 3], 5)).toEqual([1, 2, 3]);
    expect(sample(Array.from({ length: 100 }, (_, i) => i), 4)).toEqual([0, 25, 50, 75]);
  });
});

describe('entry summary', () => {
  const report = reportWith({
    layers: { count: 160, height_mm: 0.25, first_height_mm: 0.3 },
    flow: { peak_mm3s: 28.4, p95_mm3s: 22.1, mean_mm3s: 15.02, time_series: { bucket_s: 2, max_mm3s: Array.from({ length: 1500 }, (_, i) => (i === 700 ? 28.4 : 10)), mean_mm3s: Array.from({ length: 1500 }, () => 8) } },
    filament: { length_mm: 4210, mass_g: 12.56 },
    time: { estimated_s: 1500 },
  });
  it('says what the inspection measured in sentences', () => {
    const s = inspectionSummary({ report, claimedTimeMs: 1_470_000, rules: { pass: 8, fail: 0, unknown: 1 }, flags: 1 });
    expect(s[0]).toBe('The G-code prints 160 layers of 0.25 mm (first layer 0.3 mm).');
    expect(s[1]).toContain('28.4 mm³/s');
    expect(s[1]).toContain('22.1 mm³/s');
    expect(s[2]).toBe('It extrudes 4.21 m of filament (about 12.6 g).');
    // 1470 s claimed vs 1500 s estimated: 2 % shorter.
    expect(s[3]).toMatch(/needs 25 min 00 s .*0:24:30\.0 is 2 % shorter/);
    expect(s[4]).toMatch(/8 of 9 rules pass, 1 could not be measured/);
    expect(s[5]).toMatch(/1 flag /);
  });
  it('leaves out what the report lacks and never throws on odd input', () => {
    expect(inspectionSummary({ report: null, claimedTimeMs: 1000, rules: { pass: 0, fail: 0, unknown: 0 }, flags: 0 })).toEqual(['The inspection raised no flags.']);
    expect(inspectionSummary({ report: blankReport(), claimedTimeMs: 1000, rules: { pass: 1, fail: 0, unknown: 0 }, flags: 0 })).toEqual([
      'It extrudes 0 m of filament (about 0 g).',
      'All 1 rules of the rulebook pass.',
      'The inspection raised no flags.',
    ]);
  });
  it('thins a long flow series to at most ~600 points, keeping the peak', () => {
    const f = flowSeriesPoints(report)!;
    expect(f.points.length).toBeLessThanOrEqual(600);
    expect(f.bucket_s).toBe(6);
    expect(Math.max(...f.points.map((p) => p.max_mm3s))).toBe(28.4);
    expect(flowSeriesPoints(reportWith({ flow: { time_series: { bucket_s: 0, max_mm3s: [1], mean_mm3s: [1] } } }))).toBeNull();
    expect(flowSeriesPoints(null)).toBeNull();
  });
});
