/**
 * Kept public PAGE data (loaded once per standings change counter value, lib/standings/publicCache.ts)
 * against the built app: the class standings page, the entry page, the season page and the home page
 * show each kind of write on the very next request — a judge's verification, the entrant's
 * withdrawal, a re-inspection's new figures, a season transition. The first test proves that the
 * data really is kept (a write that leaves the counter unchanged does not show), so that the others
 * can fail.
 */
import { describe, it, expect, inject, beforeAll } from 'vitest';
import { Client } from '../support/client';
import { sql, sqlTransaction } from '../support/db';
import { DEMO_PASSWORD, demoEmail, freshEntrant } from '../support/demo';
import { addPhoto, idOf, inspectEntryWithFixture, seasonId, sqlDate } from '../support/judging-fixtures';
import { insertEntrant, insertEntry, insertInspection, insertMachine, insertSeason, setSeasonState } from '../support/standings-fixtures';

const base = inject('baseUrl');
const db = inject('dbFile');
const anonymous = new Client(base);

/** As a browser loads a document (public pages are kept only for requests that ask for HTML). */
const HTML = { accept: 'text/html,application/xhtml+xml,*/*;q=0.8' };

async function page(path: string, client = anonymous): Promise<{ status: number; html: string; kept: string | null }> {
  const res = await client.request(path, { headers: HTML });
  return { status: res.status, html: await res.text(), kept: res.headers.get('x-hotlap-kept') };
}

/** The page is answered at the HTTP server ahead of Next.js (lib/server/keptFront.ts), so the write that follows must reach that layer too. */
async function frontAnswers(path: string) {
  expect((await page(path)).kept, path).toBe('hit');
}

describe('kept page data', () => {
  it('is reused while the counter is unchanged, and reloaded as soon as it moves', async () => {
    const s = await insertSeason(db, { classes: ['open'] });
    const who = await insertEntrant(db, 'Ivo Marchetti-Kell');
    const machine = await insertMachine(db, who, 'Slate Gantry');
    await insertEntry(db, { seasonId: s.seasonId, classId: s.classIds.open, entrantId: who, machineId: machine, timeMs: 1_300_000, submittedAt: '2026-11-06T10:00:00Z', peak: 18 });
    const path = `/seasons/${s.slug}/classes/open`;
    expect((await page(path)).html).toContain('Ivo Marchetti-Kell');
    // A rename whose counter bump is taken back in the same transaction: invisible to the cache by design.
    await sqlTransaction(db, [`UPDATE users SET name = 'Ivo Renamed' WHERE id = ${who}`, 'UPDATE standings_version SET version = version - 1 WHERE id = 1']);
    const kept = await page(path);
    expect(kept.kept).toBe('hit');
    expect(kept.html).toContain('Ivo Marchetti-Kell');
    expect(kept.html).not.toContain('Ivo Renamed');
    // Any counted write: the very next request loads afresh.
    await sql(db, 'UPDATE users SET name = ? WHERE id = ?', ['Ivo Renamed', who]);
    const fresh = await page(path);
    expect(fresh.html).toContain('Ivo Renamed');
    expect(fresh.html).not.toContain('Ivo Marchetti-Kell');
  });
});

describe('a judge’s verification and the entrant’s withdrawal', () => {
  let judge: Client;
  let maker: Awaited<ReturnType<typeof freshEntrant>>;
  let entryId: number;
  const classPage = '/seasons/frostbite-sprint/classes/compact-04?per_page=100&q=page%20cache%20rig';

  beforeAll(async () => {
    judge = new Client(base);
    expect((await judge.signIn(demoEmail('judge'), DEMO_PASSWORD)).status).toBe(200);
    maker = await freshEntrant(base, db, 'Page Cache Checker');
    const [{ id: makerId }] = await sql<{ id: number }>(db, 'SELECT id FROM users WHERE email = ?', [maker.email]);
    const sId = await seasonId(db, 'frostbite-sprint');
    const cId = await idOf(db, 'classes', 'season_id = ? AND slug = ?', [sId, 'compact-04']);
    const machineId = await insertMachine(db, makerId, 'Page Cache Rig 3');
    entryId = await insertEntry(db, { seasonId: sId, classId: cId, entrantId: makerId, machineId, timeMs: 1_640_000, submittedAt: new Date().toISOString(), state: 'submitted' });
    const [piece] = await sql<{ size_x_mm: number; size_y_mm: number; size_z_mm: number }>(db, 'SELECT size_x_mm, size_y_mm, size_z_mm FROM test_pieces WHERE season_id = ?', [sId]);
    await sql(db, 'UPDATE entries SET evidence_url = ?, measured_x_mm = ?, measured_y_mm = ?, measured_z_mm = ?, material_name = ?, submitted_at = ? WHERE id = ?', [
      'https://video.example.org/page-cache-check', piece?.size_x_mm ?? null, piece?.size_y_mm ?? null, piece?.size_z_mm ?? null, 'Plain PLA', sqlDate(), entryId,
    ]);
    await inspectEntryWithFixture(db, entryId);
    await addPhoto(db, entryId);
    await addPhoto(db, entryId, '2026-11-25T18:05:02');
  });

  it('the verified entry is on the very next class page and its entry page exists at once', async () => {
    // Asked twice, so that the second answer comes from kept data.
    for (let i = 0; i < 2; i++) expect((await page(classPage)).html).not.toContain('Page Cache Rig 3');
    expect((await page(`/entries/${entryId}`)).status).toBe(404);
    await frontAnswers(classPage);
    const res = await judge.post(`/api/judging/entries/${entryId}/decisions`, { decision: 'verify', reasonCodes: ['evidence_consistent'], note: 'Clean run, timing matches the video.' });
    expect(res.status, await res.clone().text()).toBe(201);
    expect((await page(classPage)).html).toContain('Page Cache Rig 3');
    const entry = await page(`/entries/${entryId}`);
    expect(entry.status).toBe(200);
    expect(entry.html).toContain('Page Cache Rig 3');
  });

  it('the withdrawn entry is gone from the very next class page and entry page', async () => {
    for (let i = 0; i < 2; i++) expect((await page(classPage)).html).toContain('Page Cache Rig 3');
    expect((await page(`/entries/${entryId}`)).status).toBe(200);
    await frontAnswers(classPage);
    await frontAnswers(`/entries/${entryId}`);
    const res = await maker.post(`/api/entries/${entryId}/withdraw`, {});
    expect(res.status, await res.clone().text()).toBe(200);
    expect((await page(classPage)).html).not.toContain('Page Cache Rig 3');
    expect((await page(`/entries/${entryId}`)).status).toBe(404);
  });
});

describe('a re-inspection and a season transition', () => {
  let s: Awaited<ReturnType<typeof insertSeason>>;
  let entryId: number;
  let classPage: string;

  beforeAll(async () => {
    s = await insertSeason(db, { classes: ['open'], name: 'Page cache season' });
    const who = await insertEntrant(db, 'Tove Ashgrove');
    const machine = await insertMachine(db, who, 'Amber Tower');
    entryId = await insertEntry(db, { seasonId: s.seasonId, classId: s.classIds.open, entrantId: who, machineId: machine, timeMs: 1_200_000, submittedAt: '2026-11-05T10:00:00Z', peak: 20 });
    classPage = `/seasons/${s.slug}/classes/open`;
  });

  it('the figures of a new finished inspection are on the very next entry page and class page', async () => {
    for (let i = 0; i < 2; i++) {
      expect((await page(`/entries/${entryId}`)).html).not.toContain('37.9');
      expect((await page(classPage)).html).not.toContain('37.9');
    }
    await frontAnswers(`/entries/${entryId}`);
    await frontAnswers(classPage);
    // What a re-inspection job stores: a newer finished inspection of the same entry.
    await insertInspection(db, entryId, { peak: 37.9, p95: 31, layerMm: 0.25, createdAt: new Date(Date.now() + 1000).toISOString() });
    expect((await page(`/entries/${entryId}`)).html).toContain('37.9');
    expect((await page(classPage)).html).toContain('37.9');
  });

  it('a season moving to final standings shows on the very next class, season and home page', async () => {
    for (let i = 0; i < 2; i++) {
      expect((await page(classPage)).html).toContain('Live standings');
      expect(stateNear((await page(`/seasons/${s.slug}`)).html, 'Page cache season')).toMatch(/\bopen\b/);
      expect(stateNear((await page('/')).html, 'Page cache season')).toMatch(/\bopen\b/);
    }
    for (const p of [classPage, `/seasons/${s.slug}`, '/']) await frontAnswers(p);
    // The row the organizer's transition writes.
    await setSeasonState(db, s.seasonId, 'final');
    const cls = await page(classPage);
    expect(cls.html).toContain('Final standings');
    expect(cls.html).not.toContain('Live standings');
    // The state pill beside the season's name, on its own page and on the home page.
    expect(stateNear((await page(`/seasons/${s.slug}`)).html, 'Page cache season')).toMatch(/\bfinal\b/);
    expect(stateNear((await page('/')).html, 'Page cache season')).toMatch(/\bfinal\b/);
  });
});

/** The text just after a season's name shown as an element's content (its state pill follows the name). */
function stateNear(html: string, name: string): string {
  const at = html.indexOf(`>${name}<`);
  expect(at).toBeGreaterThan(-1);
  return html.slice(at, at + 400).replace(/<[^>]+>/g, ' ');
}

describe('the header and the session', () => {
  it('a signed-in member still sees their account in the header of a public page; a visitor sees Sign in', async () => {
    const judge = new Client(base);
    expect((await judge.signIn(demoEmail('judge'), DEMO_PASSWORD)).status).toBe(200);
    const member = await page('/seasons/frostbite-sprint/classes/open-04', judge);
    expect(member.html).toContain('data-testid="signed-in-as"');
    const visitor = await page('/seasons/frostbite-sprint/classes/open-04');
    expect(visitor.html).not.toContain('data-testid="signed-in-as"');
    expect(visitor.html).toContain('Sign in');
  });
});

describe('kept whole pages keep the per-request nonce', () => {
  const path = '/seasons/frostbite-sprint/classes/open-04';
  const nonceOf = (csp: string | null) => csp?.match(/'nonce-([^']+)'/)?.[1];

  it('a repeated anonymous request is a HIT whose every script carries that response’s own, new nonce', async () => {
    const seen = new Set<string>();
    const states: string[] = [];
    for (let i = 0; i < 3; i++) {
      const res = await fetch(base + path, { headers: HTML });
      states.push(res.headers.get('x-page-cache') ?? '');
      const nonce = nonceOf(res.headers.get('content-security-policy'));
      expect(nonce).toBeTruthy();
      seen.add(nonce!);
      const html = await res.text();
      const scripts = [...html.matchAll(/<script\b[^>]*>/g)].map((m) => m[0]);
      expect(scripts.length).toBeGreaterThan(0);
      for (const s of scripts) expect(s, s).toContain(`nonce="${nonce}"`);
      // No other nonce (the one the page was rendered with) is left anywhere in the page.
      expect([...html.matchAll(/nonce="([^"]+)"/g)].every((m) => m[1] === nonce)).toBe(true);
      // The security headers once each (not doubled by the kept copy).
      expect(res.headers.get('x-frame-options')).toBe('DENY');
      expect(res.headers.get('x-content-type-options')).toBe('nosniff');
      expect(res.headers.get('set-cookie')).toBeNull();
    }
    expect(seen.size).toBe(3);
    expect(states.at(-1)).toBe('HIT');
  });

  it('members, client-side navigation (RSC) and other methods are rendered for themselves', async () => {
    const judge = new Client(base);
    expect((await judge.signIn(demoEmail('judge'), DEMO_PASSWORD)).status).toBe(200);
    expect((await judge.request(path, { headers: HTML })).headers.get('x-page-cache')).toBeNull();
    // What the router sends for a client-side navigation (no text/html in Accept).
    const rsc = await fetch(base + path, { headers: { rsc: '1', accept: '*/*' } });
    expect(rsc.headers.get('x-page-cache')).toBeNull();
    expect(rsc.headers.get('content-type')).not.toMatch(/text\/html/);
    // HEAD: the kept page's headers without a body, from the HTTP server's front layer.
    const head = await fetch(base + path, { method: 'HEAD', headers: HTML });
    expect(head.headers.get('x-hotlap-kept')).toBe('hit');
    expect(await head.text()).toBe('');
    // A forged render marker is not the server's secret: the visitor still gets the kept page.
    const forged = await fetch(base + path, { headers: { ...HTML, 'x-hotlap-page-render': 'guess' } });
    expect(forged.headers.get('x-page-cache')).toBe('HIT');
  });
});
