/** The v1 standings API against the built app: ranking, ties, best-per-entrant, filters, CSV, ETags, frozen seasons, validation. */
import { describe, it, expect, inject, beforeAll } from 'vitest';
import { Client } from '../support/client';
import { dataDirOf } from '../support/server';
import { insertEntrant, insertEntry, insertMachine, insertSeason, setSeasonState } from '../support/standings-fixtures';
import { parseCsv } from '@/lib/standings/csv';

const base = inject('baseUrl');
const db = inject('dbFile');
const client = new Client(base);

interface Row { rank: number; entry_id: number; entrant: string; machine: string; motion: string; material: string; time_ms: number; peak_flow_mm3s: number | null; verified_entries: number }
interface Page { rows: Row[]; total: number; page: number; per_page: number; pages: number; frozen: boolean }

let s: Awaited<ReturnType<typeof insertSeason>>;
const ids: Record<string, number> = {};
let path: string;

beforeAll(async () => {
  s = await insertSeason(db, { classes: ['open', 'other'] });
  path = `/api/v1/seasons/${s.slug}/classes/open/standings`;
  const who: Record<string, number> = {};
  const mach: Record<string, number> = {};
  for (const [name, machine, motion] of [
    ['Ada Quill', 'Swift Kestrel', 'corexy'],
    ['Bo Marlin', 'Old Anvil', 'cartesian'],
    ['Cy Ferro', 'Swift Heron', 'corexy'],
    ['Di Ostrow', 'Tri Spire', 'delta'],
    ['Ed Vance', 'Box Wren', 'corexy'],
    ['Fay Lumen', 'Box_Owl 100%', 'corexy'],
  ] as const) {
    who[name] = await insertEntrant(db, name);
    mach[name] = await insertMachine(db, who[name], machine, motion);
  }
  const e = (key: string, name: string, timeMs: number, submittedAt: string, extra: Partial<Parameters<typeof insertEntry>[1]> = {}) =>
    insertEntry(db, { seasonId: s.seasonId, classId: s.classIds.open, entrantId: who[name], machineId: mach[name], timeMs, submittedAt, peak: 20, ...extra }).then((id) => (ids[key] = id));
  await e('adaBest', 'Ada Quill', 1_000_000, '2026-11-05T10:00:00Z', { peak: 31.5, material: 'petg' });
  await e('adaSlow', 'Ada Quill', 1_100_000, '2026-11-02T10:00:00Z', { peak: 28, material: 'pla' });
  await e('adaRejected', 'Ada Quill', 900_000, '2026-11-01T10:00:00Z', { state: 'rejected' });
  await e('bo', 'Bo Marlin', 1_000_000, '2026-11-03T10:00:00Z', { peak: 18.2 });
  await e('cy', 'Cy Ferro', 950_000, '2026-11-04T10:00:00Z', { peak: 24.9, material: 'petg' });
  await e('diPending', 'Di Ostrow', 800_000, '2026-11-04T11:00:00Z', { state: 'submitted' });
  await e('diVerified', 'Di Ostrow', 1_400_000, '2026-11-06T11:00:00Z', { peak: null });
  await insertEntry(db, { seasonId: s.seasonId, classId: s.classIds.other, entrantId: who['Ed Vance'], machineId: mach['Ed Vance'], timeMs: 700_000, submittedAt: '2026-11-02T10:00:00Z', peak: 40 });
  // Two runs of equal time submitted at the same instant: the lower entry id is the ranked one.
  await e('fayFirst', 'Fay Lumen', 1_300_000, '2026-11-07T10:00:00Z', { peak: 22 });
  await e('faySecond', 'Fay Lumen', 1_300_000, '2026-11-07T10:00:00Z', { peak: 35 });
});

const get = async (p: string, headers: Record<string, string> = {}) => client.request(p, { headers });
const page = async (query = ''): Promise<Page> => {
  const res = await get(`${path}${query}`);
  expect(res.status, await res.clone().text()).toBe(200);
  return res.json();
};

describe('ranking', () => {
  it('ranks the best verified entry of each entrant by claimed time; ties go to the earlier submission, then the lower id', async () => {
    const p = await page();
    expect(p.rows.map((r) => [r.rank, r.entrant, r.time_ms])).toEqual([
      [1, 'Cy Ferro', 950_000],
      [2, 'Bo Marlin', 1_000_000], // same time as Ada, submitted two days earlier
      [3, 'Ada Quill', 1_000_000],
      [4, 'Fay Lumen', 1_300_000],
      [5, 'Di Ostrow', 1_400_000], // the faster submitted run is not verified and does not count
    ]);
    expect(p.total).toBe(5);
    expect(p.frozen).toBe(false);
    const ada = p.rows.find((r) => r.entrant === 'Ada Quill')!;
    expect(ada.entry_id).toBe(ids.adaBest); // the rejected 900 s run is ignored
    expect(ada.verified_entries).toBe(2);
    expect(p.rows.find((r) => r.entrant === 'Fay Lumen')!.entry_id).toBe(Math.min(ids.fayFirst, ids.faySecond));
  });

  it('rows carry the published fields', async () => {
    const [row] = (await page()).rows;
    for (const k of ['rank', 'entry_id', 'entrant', 'machine', 'time_ms', 'peak_flow_mm3s', 'p95_flow_mm3s', 'layer_height_mm', 'motion', 'material', 'nozzle_mm', 'date']) expect(row).toHaveProperty(k);
    expect(row).toMatchObject({ machine: 'Swift Heron', motion: 'corexy', material: 'petg', peak_flow_mm3s: 24.9, layer_height_mm: 0.25, date: '2026-11-04T10:00:00.000Z' });
  });

  it('another class ranks its own entries only', async () => {
    const res = await get(`/api/v1/seasons/${s.slug}/classes/other/standings`);
    const p: Page = await res.json();
    expect(p.rows.map((r) => r.entrant)).toEqual(['Ed Vance']);
  });

  it('lists the older verified runs of an entrant, the ranked one carrying its rank', async () => {
    const ada = (await page()).rows.find((r) => r.entrant === 'Ada Quill')!;
    const res = await get(`/api/v1/seasons/${s.slug}/classes/open/entrants/${await entrantIdOf(ada.entry_id)}/entries`);
    expect(res.status).toBe(200);
    const { entries } = await res.json();
    expect(entries.map((e: { entry_id: number; rank: number | null }) => [e.entry_id, e.rank])).toEqual([[ids.adaBest, 3], [ids.adaSlow, null]]);
  });
});

async function entrantIdOf(entryId: number): Promise<number> {
  const { sql } = await import('../support/db');
  return (await sql<{ entrant_id: number }>(db, 'SELECT entrant_id FROM entries WHERE id = ?', [entryId]))[0].entrant_id;
}

describe('sorting, filters and paging', () => {
  it('sorts by peak flow either way, rows without a figure last; rank stays the class rank', async () => {
    const desc = await page('?sort=-peak_flow');
    expect(desc.rows.map((r) => r.peak_flow_mm3s)).toEqual([31.5, 24.9, 22, 18.2, null]);
    expect(desc.rows[0].rank).toBe(3);
    const asc = await page('?sort=peak_flow');
    expect(asc.rows.map((r) => r.peak_flow_mm3s)).toEqual([18.2, 22, 24.9, 31.5, null]);
  });

  it('sorts by entrant name and by time descending', async () => {
    expect((await page('?sort=entrant')).rows.map((r) => r.entrant)).toEqual(['Ada Quill', 'Bo Marlin', 'Cy Ferro', 'Di Ostrow', 'Fay Lumen']);
    // Bo and Ada share 1 000 000 ms: equal values keep the standings order in either direction.
    expect((await page('?sort=-time')).rows.map((r) => r.rank)).toEqual([5, 4, 2, 3, 1]);
  });

  it('filters by material, motion system and machine name, keeping class ranks', async () => {
    expect((await page('?material=petg')).rows.map((r) => [r.rank, r.entrant])).toEqual([[1, 'Cy Ferro'], [3, 'Ada Quill']]);
    expect((await page('?motion=cartesian')).rows.map((r) => r.entrant)).toEqual(['Bo Marlin']);
    expect((await page('?q=swift')).rows.map((r) => r.machine)).toEqual(['Swift Heron', 'Swift Kestrel']);
    // % and _ are searched literally, not as wildcards.
    expect((await page('?q=' + encodeURIComponent('_owl 100%'))).rows.map((r) => r.machine)).toEqual(['Box_Owl 100%']);
    expect((await page('?q=' + encodeURIComponent('%'))).rows.map((r) => r.machine)).toEqual(['Box_Owl 100%']);
    const none = await page('?material=abs');
    expect(none).toMatchObject({ rows: [], total: 0, pages: 1 });
  });

  it('pages with per_page and reports totals, also past the last page', async () => {
    const p2 = await page('?per_page=2&page=2');
    expect(p2).toMatchObject({ total: 5, page: 2, per_page: 2, pages: 3 });
    expect(p2.rows.map((r) => r.rank)).toEqual([3, 4]);
    const past = await page('?per_page=2&page=9');
    expect(past).toMatchObject({ rows: [], total: 5, pages: 3 });
  });
});

describe('CSV', () => {
  it('exports the whole filtered, sorted view with the same rows as the JSON', async () => {
    const res = await get(`${path}?format=csv&sort=-peak_flow&motion=corexy`);
    expect(res.status).toBe(200);
    expect(res.headers.get('content-type')).toMatch(/^text\/csv/);
    expect(res.headers.get('content-disposition')).toMatch(/attachment; filename=".*-open-standings\.csv"/);
    const [header, ...rows] = parseCsv(await res.text());
    expect(header.slice(0, 4)).toEqual(['rank', 'entry_id', 'entrant', 'machine']);
    const json = await page('?sort=-peak_flow&motion=corexy&per_page=100');
    expect(rows.map((r) => Number(r[1]))).toEqual(json.rows.map((r) => r.entry_id));
    expect(rows.map((r) => r[3])).toEqual(json.rows.map((r) => r.machine));
  });

  it('exports one page when page or per_page is given', async () => {
    const res = await get(`${path}?format=csv&per_page=2&page=2`);
    const [, ...rows] = parseCsv(await res.text());
    expect(rows.map((r) => Number(r[0]))).toEqual([3, 4]);
  });
});

describe('caching', () => {
  it('sends an ETag and Cache-Control, and answers 304 to If-None-Match with the current ETag (RFC 9110 §13.1.2)', async () => {
    const first = await get(path);
    const etag = first.headers.get('etag')!;
    expect(etag).toMatch(/^"[A-Za-z0-9_-]+"$/);
    expect(first.headers.get('cache-control')).toMatch(/public, max-age=\d+/);
    const again = await get(path, { 'If-None-Match': etag });
    expect(again.status).toBe(304);
    expect(await again.text()).toBe('');
    const weak = await get(path, { 'If-None-Match': `"other", W/${etag}` });
    expect(weak.status).toBe(304);
    const stale = await get(path, { 'If-None-Match': '"not-this-one"' });
    expect(stale.status).toBe(200);
    // Another view has another ETag.
    expect((await get(`${path}?sort=-time`)).headers.get('etag')).not.toBe(etag);
  });

  it('the ETag changes when a decision changes the standings', async () => {
    const t = await insertSeason(db, { classes: ['open'] });
    const p = `/api/v1/seasons/${t.slug}/classes/open/standings`;
    const who = await insertEntrant(db, 'Gil Tandem');
    const m = await insertMachine(db, who, 'Gil Box');
    const before = (await get(p)).headers.get('etag')!;
    await insertEntry(db, { seasonId: t.seasonId, classId: t.classIds.open, entrantId: who, machineId: m, timeMs: 999_000, submittedAt: '2026-11-09T10:00:00Z', peak: 20 });
    const after = await get(p, { 'If-None-Match': before });
    expect(after.status).toBe(200);
  });
});

describe('frozen final seasons', () => {
  it('a final season keeps its standings whatever is decided later', async () => {
    const f = await insertSeason(db, { classes: ['open'] });
    const p = `/api/v1/seasons/${f.slug}/classes/open/standings`;
    const a = await insertEntrant(db, 'Hal Frost');
    const b = await insertEntrant(db, 'Ivy Frost');
    const ma = await insertMachine(db, a, 'Frost One');
    const mb = await insertMachine(db, b, 'Frost Two', 'delta');
    const ea = await insertEntry(db, { seasonId: f.seasonId, classId: f.classIds.open, entrantId: a, machineId: ma, timeMs: 1_200_000, submittedAt: '2026-11-02T10:00:00Z', peak: 21 });
    await insertEntry(db, { seasonId: f.seasonId, classId: f.classIds.open, entrantId: b, machineId: mb, timeMs: 1_250_000, submittedAt: '2026-11-03T10:00:00Z', peak: 19 });
    await setSeasonState(db, f.seasonId, 'final');
    const frozen = await (await get(p)).json();
    expect(frozen.frozen).toBe(true);
    expect(frozen.rows.map((r: Row) => r.entrant)).toEqual(['Hal Frost', 'Ivy Frost']);
    const { sql } = await import('../support/db');
    // Later decisions: Hal's run is rejected, a faster run of Ivy is verified, a machine is renamed.
    await sql(db, "UPDATE entries SET state = 'rejected' WHERE id = ?", [ea]);
    await insertEntry(db, { seasonId: f.seasonId, classId: f.classIds.open, entrantId: b, machineId: mb, timeMs: 900_000, submittedAt: '2026-11-04T10:00:00Z', peak: 30 });
    await sql(db, "UPDATE machines SET name = 'Renamed' WHERE id = ?", [ma]);
    const later = await (await get(p)).json();
    expect(later.rows).toEqual(frozen.rows);
    const res = await get(p);
    expect(res.headers.get('cache-control')).toContain('max-age=3600');
    // Filters and sorting still work on the frozen copy.
    expect((await (await get(`${p}?motion=delta`)).json()).rows.map((r: Row) => r.entrant)).toEqual(['Ivy Frost']);
    expect((await (await get(`${p}?sort=-peak_flow`)).json()).rows.map((r: Row) => r.peak_flow_mm3s)).toEqual([21, 19]);
    // Archiving keeps the same snapshot.
    await setSeasonState(db, f.seasonId, 'archived');
    expect((await (await get(p)).json()).rows).toEqual(frozen.rows);
  });

  it('the demo final season is served from its snapshot', async () => {
    const p: Page = await (await get('/api/v1/seasons/leaf-fall-dash/classes/open-04/standings')).json();
    expect(p.frozen).toBe(true);
    expect(p.rows.map((r) => r.entrant)).toEqual(['Pim Okafor']);
  });
});

describe('input validation', () => {
  const bad: [string, string, RegExp][] = [
    ['page=0', 'page', /page must be a whole number from 1/],
    ['page=abc', 'page', /page must be a whole number/],
    ['page=1.5', 'page', /page must be a whole number/],
    ['page=-1', 'page', /page must be a whole number/],
    ['per_page=101', 'per_page', /per_page must be a whole number from 1 to 100/],
    ['per_page=0', 'per_page', /per_page must be a whole number from 1 to 100/],
    ['per_page=', 'per_page', /per_page must be a whole number/],
    ['sort=speed', 'sort', /sort must be one of: rank, time, peak_flow/],
    ['sort=--time', 'sort', /sort must be one of/],
    ['material=wood', 'material', /material must be one of: pla, petg/],
    ['motion=hover', 'motion', /motion must be one of: corexy, cartesian, delta, other/],
    [`q=${'x'.repeat(81)}`, 'q', /at most 80 characters/],
    ['q=%01', 'q', /control characters/],
    ['format=xml', 'format', /format must be "json" or "csv"/],
    ['colour=red', 'colour', /Unknown parameter "colour"/],
    ['page=1&page=2', 'page', /more than once/],
  ];
  for (const [query, field, message] of bad) {
    it(`answers 400 with a message for ${query.slice(0, 30)}`, async () => {
      const res = await get(`${path}?${query}`);
      expect(res.status).toBe(400);
      const body = await res.json();
      expect(body.error).toMatch(message);
      expect(body.fields[field]).toMatch(message);
    });
  }

  it('accepts every valid value of each enumerated parameter', async () => {
    for (const q of ['sort=-rank', 'sort=nozzle', 'sort=-date', 'sort=machine', 'sort=layer_height', 'sort=-p95_flow', 'material=other', 'motion=other', 'format=json', 'per_page=100&page=1', 'q=%20']) {
      expect((await get(`${path}?${q}`)).status, q).toBe(200);
    }
  });

  it('answers 404 for unknown seasons, classes and entries, and 400 for malformed ids', async () => {
    expect((await get('/api/v1/seasons/no-such-season')).status).toBe(404);
    expect((await get('/api/v1/seasons/no-such-season/classes/open/standings')).status).toBe(404);
    expect((await get(`/api/v1/seasons/${s.slug}/classes/no-such-class/standings`)).status).toBe(404);
    const badSlug = await get('/api/v1/seasons/Not%20A%20Slug');
    expect(badSlug.status).toBe(400);
    expect((await badSlug.json()).error).toMatch(/slug/);
    expect((await get('/api/v1/entries/99999999')).status).toBe(404);
    const badId = await get('/api/v1/entries/abc');
    expect(badId.status).toBe(400);
    expect((await badId.json()).error).toMatch(/positive whole number/);
    expect((await get('/api/v1/seasons?x=1')).status).toBe(400);
  });
});

describe('seasons and entries', () => {
  it('lists published seasons with their classes, never drafts', async () => {
    const draft = await insertSeason(db, { state: 'draft' });
    const res = await get('/api/v1/seasons');
    expect(res.status).toBe(200);
    expect(res.headers.get('etag')).toBeTruthy();
    const { seasons } = await res.json();
    const frost = seasons.find((x: { slug: string }) => x.slug === 'frostbite-sprint');
    expect(frost.classes.map((c: { slug: string }) => c.slug)).toEqual(['compact-04', 'open-04', 'wide-06']);
    expect(seasons.some((x: { slug: string }) => x.slug === draft.slug)).toBe(false);
    expect((await get(`/api/v1/seasons/${draft.slug}`)).status).toBe(404);
  });

  it('gives a season with its classes and its rulebook in sentences', async () => {
    const { season } = await (await get('/api/v1/seasons/frostbite-sprint')).json();
    expect(season.classes).toHaveLength(3);
    expect(season.rulebook).toHaveLength(9);
    const walls = season.rulebook.find((r: { metric: string }) => r.metric === 'walls');
    expect(walls).toMatchObject({ comparator: 'eq', value: 2, severity: 'blocking' });
    expect(walls.sentence).toMatch(/Walls/);
    expect(season.test_piece.name).toBe('Beacon');
  });

  it('serves verified entries only', async () => {
    const ok = await get(`/api/v1/entries/${ids.adaBest}`);
    expect(ok.status).toBe(200);
    const { entry } = await ok.json();
    expect(entry).toMatchObject({ id: ids.adaBest, rank: 3, time_ms: 1_000_000, entrant: { name: 'Ada Quill' }, machine: { name: 'Swift Kestrel' } });
    expect(entry.inspection.peak_flow_mm3s).toBe(31.5);
    expect(entry.inspection.flow_series.points.length).toBeGreaterThan(10);
    expect(entry.inspection.summary.join(' ')).toMatch(/31\.5 mm³\/s/);
    expect((await get(`/api/v1/entries/${ids.diPending}`)).status).toBe(404);
    expect((await get(`/api/v1/entries/${ids.adaRejected}`)).status).toBe(404);
    const etag = ok.headers.get('etag')!;
    expect((await get(`/api/v1/entries/${ids.adaBest}`, { 'If-None-Match': etag })).status).toBe(304);
  });

  it('streams the photos of verified entries only', async () => {
    const path = await import('node:path');
    const { sql } = await import('../support/db');
    const { putTestFile } = await import('../support/storage');
    // The 8-byte PNG signature (PNG specification, ISO/IEC 15948 §5.2) plus a few bytes.
    const bytes = Buffer.from([0x89, 0x50, 0x4e, 0x47, 0x0d, 0x0a, 0x1a, 0x0a, 1, 2, 3]);
    const addFile = async (entryId: number, kind: string) => {
      const key = `entries/${entryId}/${kind}-${Date.now()}-${Math.random().toString(36).slice(2)}.png`;
      await putTestFile(dataDirOf(db), key, bytes);
      const t = new Date().toISOString().replace('T', ' ').replace('Z', ' +00:00');
      const [r] = await sql<{ id: number }>(db, "INSERT INTO stored_files (entry_id, kind, original_name, mime, size_bytes, sha256, storage_key, meta, created_at, updated_at) VALUES (?, ?, 'tower.png', 'image/png', ?, 'x', ?, '{}', ?, ?) RETURNING id", [entryId, kind, bytes.length, key, t, t]);
      return r.id;
    };
    const photo = await addFile(ids.adaBest, 'photo');
    const res = await get(`/api/v1/entries/${ids.adaBest}/photos/${photo}`);
    expect(res.status).toBe(200);
    expect(res.headers.get('content-type')).toBe('image/png');
    expect(Buffer.from(await res.arrayBuffer())).toEqual(bytes);
    const { entry } = await (await get(`/api/v1/entries/${ids.adaBest}`)).json();
    expect(entry.photos).toEqual([{ id: photo, name: 'tower.png', url: `/api/v1/entries/${ids.adaBest}/photos/${photo}` }]);
    // Another entry's id, an unverified entry, and a G-code file are not served.
    expect((await get(`/api/v1/entries/${ids.bo}/photos/${photo}`)).status).toBe(404);
    expect((await get(`/api/v1/entries/${ids.diPending}/photos/${await addFile(ids.diPending, 'photo')}`)).status).toBe(404);
    expect((await get(`/api/v1/entries/${ids.adaBest}/photos/${await addFile(ids.adaBest, 'gcode')}`)).status).toBe(404);
  });
});
