/**
 * Kept public API answers (built once per standings change counter value) against the built app:
 * each kind of write that moves the standings shows on the very next request — a judge's
 * verification, the entrant's withdrawal, a re-inspection's new figures, a season transition — and
 * an unchanged answer is sent again from memory, or as 304 to a client that holds its ETag.
 */
import { describe, it, expect, inject, beforeAll } from 'vitest';
import { Client } from '../support/client';
import { sql } from '../support/db';
import { DEMO_PASSWORD, demoEmail, freshEntrant } from '../support/demo';
import { addPhoto, idOf, inspectEntryWithFixture, seasonId, sqlDate } from '../support/judging-fixtures';
import { insertEntrant, insertEntry, insertInspection, insertMachine, insertSeason, setSeasonState } from '../support/standings-fixtures';

const base = inject('baseUrl');
const db = inject('dbFile');
const anonymous = new Client(base);

interface Row { entry_id: number; entrant: string; peak_flow_mm3s: number | null }
interface Standings { season: { state: string; frozen: boolean }; rows: Row[]; total: number }

const get = (path: string, etag?: string) => anonymous.request(path, { headers: etag ? { 'if-none-match': etag } : {} });

/** Asks twice: the second answer must be the kept one, and a revalidation with its ETag a 304. Returns the body and ETag. */
async function settled<T>(path: string): Promise<{ body: T; etag: string }> {
  const first = await get(path);
  expect(first.status, await first.clone().text()).toBe(200);
  await first.arrayBuffer();
  const again = await get(path);
  expect(again.status).toBe(200);
  expect(again.headers.get('x-cache')).toBe('HIT');
  // Answered at the HTTP server ahead of Next.js (lib/server/keptFront.ts), so the writes below must reach it too.
  expect(again.headers.get('x-hotlap-kept')).toBe('hit');
  const etag = again.headers.get('etag')!;
  expect(etag).toBe(first.headers.get('etag'));
  const revalidated = await get(path, etag);
  expect(revalidated.status).toBe(304);
  expect(revalidated.headers.get('x-cache')).toBe('HIT');
  expect(await revalidated.text()).toBe('');
  return { body: (await again.json()) as T, etag };
}

/** The very next request after a write, revalidating with the ETag held before it: a new 200 answer. */
async function nextAnswer<T>(path: string, oldEtag: string): Promise<T> {
  const res = await get(path, oldEtag);
  expect(res.status).toBe(200);
  expect(res.headers.get('x-cache')).toBe('MISS');
  expect(res.headers.get('etag')).not.toBe(oldEtag);
  return (await res.json()) as T;
}

describe('a judge’s verification and the entrant’s withdrawal', () => {
  let judge: Client;
  let maker: Awaited<ReturnType<typeof freshEntrant>>;
  let entryId: number;
  let path: string;

  beforeAll(async () => {
    judge = new Client(base);
    expect((await judge.signIn(demoEmail('judge'), DEMO_PASSWORD)).status).toBe(200);
    maker = await freshEntrant(base, db, 'Cache Checker');
    const [{ id: makerId }] = await sql<{ id: number }>(db, 'SELECT id FROM users WHERE email = ?', [maker.email]);
    const sId = await seasonId(db, 'frostbite-sprint');
    const cId = await idOf(db, 'classes', 'season_id = ? AND slug = ?', [sId, 'compact-04']);
    const machineId = await insertMachine(db, makerId, 'Cache Rig 7');
    entryId = await insertEntry(db, { seasonId: sId, classId: cId, entrantId: makerId, machineId, timeMs: 1_650_000, submittedAt: new Date().toISOString(), state: 'submitted' });
    const [piece] = await sql<{ size_x_mm: number; size_y_mm: number; size_z_mm: number }>(db, 'SELECT size_x_mm, size_y_mm, size_z_mm FROM test_pieces WHERE season_id = ?', [sId]);
    await sql(db, 'UPDATE entries SET evidence_url = ?, measured_x_mm = ?, measured_y_mm = ?, measured_z_mm = ?, material_name = ?, submitted_at = ? WHERE id = ?', [
      'https://video.example.org/cache-check', piece?.size_x_mm ?? null, piece?.size_y_mm ?? null, piece?.size_z_mm ?? null, 'Plain PLA', sqlDate(), entryId,
    ]);
    await inspectEntryWithFixture(db, entryId);
    await addPhoto(db, entryId);
    await addPhoto(db, entryId, '2026-11-25T18:05:02');
    path = `/api/v1/seasons/frostbite-sprint/classes/compact-04/standings?per_page=100&q=cache%20rig`;
  });

  it('the verified entry is in the very next answer', async () => {
    const before = await settled<Standings>(path);
    expect(before.body.rows.map((r) => r.entry_id)).not.toContain(entryId);
    const res = await judge.post(`/api/judging/entries/${entryId}/decisions`, { decision: 'verify', reasonCodes: ['evidence_consistent'], note: 'Clean run, timing matches the video.' });
    expect(res.status, await res.clone().text()).toBe(201);
    const after = await nextAnswer<Standings>(path, before.etag);
    expect(after.rows.map((r) => r.entry_id)).toContain(entryId);
  });

  it('the withdrawn entry is gone from the very next answer', async () => {
    const before = await settled<Standings>(path);
    expect(before.body.rows.map((r) => r.entry_id)).toContain(entryId);
    const res = await maker.post(`/api/entries/${entryId}/withdraw`, {});
    expect(res.status, await res.clone().text()).toBe(200);
    const after = await nextAnswer<Standings>(path, before.etag);
    expect(after.rows.map((r) => r.entry_id)).not.toContain(entryId);
  });
});

describe('a re-inspection and a season transition', () => {
  let s: Awaited<ReturnType<typeof insertSeason>>;
  let entryId: number;
  let path: string;

  beforeAll(async () => {
    s = await insertSeason(db, { classes: ['open'] });
    const who = await insertEntrant(db, 'Rae Corbel');
    const machine = await insertMachine(db, who, 'Quiet Lathe');
    entryId = await insertEntry(db, { seasonId: s.seasonId, classId: s.classIds.open, entrantId: who, machineId: machine, timeMs: 1_200_000, submittedAt: '2026-11-05T10:00:00Z', peak: 20 });
    path = `/api/v1/seasons/${s.slug}/classes/open/standings`;
  });

  it('the figures of a new finished inspection are in the very next answer', async () => {
    const before = await settled<Standings>(path);
    expect(before.body.rows[0]).toMatchObject({ entry_id: entryId, peak_flow_mm3s: 20 });
    // What a re-inspection job stores: a newer finished inspection of the same entry.
    await insertInspection(db, entryId, { peak: 33.5, p95: 28, layerMm: 0.25, createdAt: new Date(Date.now() + 1000).toISOString() });
    const after = await nextAnswer<Standings>(path, before.etag);
    expect(after.rows[0]).toMatchObject({ entry_id: entryId, peak_flow_mm3s: 33.5 });
  });

  it('a season moving to final standings shows in the very next answers of the standings, the season and the list', async () => {
    const standings = await settled<Standings>(path);
    const season = await settled<{ season: { state: string } }>(`/api/v1/seasons/${s.slug}`);
    const list = await settled<{ seasons: { slug: string; state: string }[] }>('/api/v1/seasons');
    expect(standings.body.season).toMatchObject({ state: 'open', frozen: false });
    expect(list.body.seasons.find((x) => x.slug === s.slug)?.state).toBe('open');
    // The row the organizer's transition writes.
    await setSeasonState(db, s.seasonId, 'final');
    expect((await nextAnswer<Standings>(path, standings.etag)).season).toMatchObject({ state: 'final', frozen: true });
    expect((await nextAnswer<{ season: { state: string } }>(`/api/v1/seasons/${s.slug}`, season.etag)).season.state).toBe('final');
    const nextList = await nextAnswer<{ seasons: { slug: string; state: string }[] }>('/api/v1/seasons', list.etag);
    expect(nextList.seasons.find((x) => x.slug === s.slug)?.state).toBe('final');
  });

  it('a renamed season and class show at once too (any edit of a season, class, rule or test piece counts)', async () => {
    const list = await settled<{ seasons: { slug: string; name: string; classes: { name: string }[] }[] }>('/api/v1/seasons');
    await sql(db, 'UPDATE seasons SET name = ? WHERE id = ?', ['Renamed cache season', s.seasonId]);
    const renamed = await nextAnswer<{ seasons: { slug: string; name: string }[] }>('/api/v1/seasons', list.etag);
    expect(renamed.seasons.find((x) => x.slug === s.slug)?.name).toBe('Renamed cache season');
    const again = await settled<{ seasons: { slug: string; classes: { name: string }[] }[] }>('/api/v1/seasons');
    await sql(db, 'UPDATE classes SET name = ? WHERE id = ?', ['Renamed class', s.classIds.open]);
    const cls = await nextAnswer<{ seasons: { slug: string; classes: { name: string }[] }[] }>('/api/v1/seasons', again.etag);
    expect(cls.seasons.find((x) => x.slug === s.slug)?.classes[0].name).toBe('Renamed class');
  });
});

describe('the session plays no part', () => {
  it('a signed-in member gets the same kept answer and ETag as an anonymous visitor, and no cookie is set', async () => {
    const path = '/api/v1/seasons/frostbite-sprint/classes/open-04/standings';
    const { etag } = await settled<Standings>(path);
    const judge = new Client(base);
    expect((await judge.signIn(demoEmail('judge'), DEMO_PASSWORD)).status).toBe(200);
    const res = await judge.request(path, { headers: { 'if-none-match': etag } });
    expect(res.status).toBe(304);
    expect(res.headers.get('x-cache')).toBe('HIT');
    expect(res.headers.get('set-cookie')).toBeNull();
    expect(res.headers.get('vary') ?? '').not.toMatch(/cookie/i);
  });
});

describe('what is never kept', () => {
  it('an error answer is built each time, and a season that appears is found at once', async () => {
    const s = await insertSeason(db, { state: 'draft', classes: ['open'] });
    const path = `/api/v1/seasons/${s.slug}`;
    expect((await get(path)).status).toBe(404);
    await setSeasonState(db, s.seasonId, 'open');
    const res = await get(path);
    expect(res.status).toBe(200);
    expect(res.headers.get('x-cache')).toBe('MISS');
  });
});
