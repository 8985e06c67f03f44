/**
 * Against the built app: the season's one-file results and its overview charts' data (public, kept
 * per standings version, 304 on its ETag, rebuilt after a change, no parameters, drafts hidden), and the audit log's filters,
 * paging and the client address recorded from the request.
 */
import { describe, it, expect, inject, beforeAll } from 'vitest';
import { Client } from '../support/client';
import { sql } from '../support/db';
import { DEMO_PASSWORD, demoEmail, freshEntrant } from '../support/demo';
import { insertEntrant, insertEntry, insertMachine, insertSeason } from '../support/standings-fixtures';
import { parseCsv } from '@/lib/standings/csv';

const base = inject('baseUrl');
const db = inject('dbFile');
const anon = new Client(base);

let s: Awaited<ReturnType<typeof insertSeason>>;
let who: number;
let machine: number;

beforeAll(async () => {
  s = await insertSeason(db, { classes: ['open', 'small'] });
  who = await insertEntrant(db, 'Export Tester');
  machine = await insertMachine(db, who, 'Export Rig');
  await insertEntry(db, { seasonId: s.seasonId, classId: s.classIds.open, entrantId: who, machineId: machine, timeMs: 1_650_000, submittedAt: '2026-11-03T10:00:00Z', peak: 20 });
  await insertEntry(db, { seasonId: s.seasonId, classId: s.classIds.small, entrantId: who, machineId: machine, timeMs: 1_200_000, submittedAt: '2026-11-03T11:00:00Z', peak: 12 });
});

describe('GET /api/v1/seasons/{season}/results', () => {
  it('is every class in one CSV, public, kept per standings version and revalidated with its ETag', async () => {
    const path = `/api/v1/seasons/${s.slug}/results`;
    const first = await anon.get(path);
    expect(first.status).toBe(200);
    expect(first.headers.get('content-type')).toMatch(/^text\/csv/);
    expect(first.headers.get('content-disposition')).toBe(`attachment; filename="${s.slug}-results.csv"`);
    expect(first.headers.get('x-cache')).toBe('MISS');
    const [head, ...rows] = parseCsv(await first.text());
    expect(head.slice(0, 3)).toEqual(['class', 'class_name', 'rank']);
    expect(rows.map((r) => [r[0], r[2], r[4]])).toEqual([['open', '1', 'Export Tester'], ['small', '1', 'Export Tester']]);
    // estimate 1500 s in the fixture inspections: 1650 s is +10 %, 1200 s is −20 % (arithmetic).
    expect(rows.map((r) => r.at(-1))).toEqual(['10', '-20']);

    const again = await anon.get(path);
    expect(again.headers.get('x-cache')).toBe('HIT');
    const etag = again.headers.get('etag')!;
    expect((await anon.request(path, { headers: { 'if-none-match': etag } })).status).toBe(304);

    // A new verified entry bumps the standings version: the next answer is built again and holds it.
    const other = await insertEntrant(db, 'Late Tester');
    await insertEntry(db, { seasonId: s.seasonId, classId: s.classIds.small, entrantId: other, machineId: await insertMachine(db, other, 'Late Rig'), timeMs: 1_100_000, submittedAt: '2026-11-04T10:00:00Z', peak: 14 });
    const fresh = await anon.request(path, { headers: { 'if-none-match': etag } });
    expect(fresh.status).toBe(200);
    expect(fresh.headers.get('x-cache')).toBe('MISS');
    expect(parseCsv(await fresh.text()).filter((r) => r[0] === 'small').map((r) => r[4])).toEqual(['Late Tester', 'Export Tester']);
  });

  it('takes no parameters, and hides drafts', async () => {
    const bad = await anon.get(`/api/v1/seasons/${s.slug}/results?format=json`);
    expect(bad.status).toBe(400);
    expect((await bad.json()).error).toMatch(/take no parameters/);
    const draft = await insertSeason(db, { state: 'draft' });
    expect((await anon.get(`/api/v1/seasons/${draft.slug}/results`)).status).toBe(404);
    expect((await anon.get('/api/v1/seasons/NOT_A_SLUG/results')).status).toBe(400);
  });

  it('the overview API gives the charts their data, kept per standings version, with no parameters and no drafts', async () => {
    const path = `/api/v1/seasons/${s.slug}/overview`;
    const first = await anon.get(path);
    expect(first.status).toBe(200);
    expect(first.headers.get('content-type')).toMatch(/^application\/json/);
    const o = await first.json();
    expect(o.season.slug).toBe(s.slug);
    expect(o.classes.map((c: { slug: string; ranked: number }) => [c.slug, c.ranked])).toEqual(expect.arrayContaining([['small', expect.any(Number)], ['open', 1]]));
    // Each ranked print is counted once in the histogram, in its class's column.
    const small = o.classes.find((c: { slug: string }) => c.slug === 'small').ranked;
    expect(o.histogram.reduce((n: number, b: Record<string, number>) => n + b.small, 0)).toBe(small);
    expect(o.scatter.find((c: { slug: string }) => c.slug === 'open').points).toEqual([{ time_s: 1650, peak_flow_mm3s: 20, entrant: 'Export Tester', rank: 1 }]);
    const again = await anon.get(path);
    expect(again.headers.get('x-cache')).toBe('HIT');
    expect((await anon.request(path, { headers: { 'if-none-match': again.headers.get('etag')! } })).status).toBe(304);
    const bad = await anon.get(`${path}?class=open`);
    expect(bad.status).toBe(400);
    expect((await bad.json()).error).toMatch(/takes no parameters/);
    const draft = await insertSeason(db, { state: 'draft' });
    expect((await anon.get(`/api/v1/seasons/${draft.slug}/overview`)).status).toBe(404);
  });

  it('standings rows carry the estimate and the over-estimate figure', async () => {
    const res = await anon.get(`/api/v1/seasons/${s.slug}/classes/open/standings`);
    const body = await res.json();
    expect(body.rows[0]).toMatchObject({ estimated_time_s: 1500, over_estimate_percent: 10 });
  });
});

describe('audit log', () => {
  let admin: Client;
  beforeAll(async () => {
    admin = new Client(base);
    expect((await admin.signIn(demoEmail('admin'), DEMO_PASSWORD)).status).toBe(200);
  });

  it('records the client address from the request for an event whose caller passes none', async () => {
    const maker = await freshEntrant(base, db, 'Audit Address Maker');
    const res = await maker.post('/api/entrant/machines', { name: 'Audit Rig', motionSystem: 'corexy', buildXMm: 200, buildYMm: 200, buildZMm: 200, nozzleMm: 0.4, hotend: 'Test hotend', isModified: false });
    expect(res.status).toBe(201);
    const id = (await res.json()).id;
    // TRUST_PROXY=1 in the test server: the last X-Forwarded-For entry is the client (tests/support/server.ts).
    const [row] = await sql<{ ip: string | null }>(db, "SELECT ip FROM audit_events WHERE action = 'machine.created' AND subject_id = ?", [String(id)]);
    expect(row.ip).toBe(maker.ip);
    const page = await (await admin.get('/api/admin/audit?action=machine.created&per_page=25')).json();
    const ev = page.events.find((e: { subject: string }) => e.subject === `machine ${id}`);
    expect(ev).toMatchObject({ ip: maker.ip, label: 'Machine added', sentence: 'Audit Address Maker added the machine Audit Rig.' });
  });

  it('filters by action, who and day, and pages', async () => {
    const roles = await (await admin.get('/api/admin/audit?action=user.signup&per_page=25')).json();
    expect(roles.events.length).toBeGreaterThan(0);
    expect(roles.events.every((e: { action: string }) => e.action === 'user.signup')).toBe(true);
    const mine = await (await admin.get(`/api/admin/audit?actor=${encodeURIComponent('audit address maker')}`)).json();
    expect(mine.events.length).toBeGreaterThan(0);
    expect(mine.events.every((e: { actor: string }) => e.actor.startsWith('Audit Address Maker'))).toBe(true);
    const none = await (await admin.get('/api/admin/audit?from=2001-01-01&to=2001-01-02')).json();
    expect(none).toMatchObject({ events: [], total: 0, pages: 1 });
    const p1 = await (await admin.get('/api/admin/audit?per_page=25')).json();
    const p2 = await (await admin.get('/api/admin/audit?per_page=25&page=2')).json();
    expect(p1.per_page).toBe(25);
    if (p1.total > 25) expect(p2.events[0].id).toBeLessThan(p1.events.at(-1).id);
  });

  it('refuses bad filters with a sentence naming them', async () => {
    for (const [qs, re] of [['action=nope', /action must be one of/], ['from=2026-13-45', /not a real date/], ['to=2026-02-30', /not a real date/], ['per_page=7', /per_page must be one of/], ['from=2026-12-05&to=2026-12-01', /before the start date/], ['zzz=1', /Unknown parameter/]] as const) {
      const res = await admin.get(`/api/admin/audit?${qs}`);
      expect(res.status, qs).toBe(400);
      expect((await res.json()).error, qs).toMatch(re);
    }
  });
});
