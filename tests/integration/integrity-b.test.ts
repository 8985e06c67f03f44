/**
 * Integrity, against the built app: one access rule for stored files, re-inspection that cannot
 * leave a rule-breaking entry ranked, conflicts of interest and organizer scope, and duplicate
 * G-code found through compression and edited comments. Each scenario gets its own season and
 * fresh entrants, so other test files on the same server do not interfere.
 */
import { dataDirOf } from '../support/server';
import fs from 'node:fs';
import path from 'node:path';
import crypto from 'node:crypto';
import zlib from 'node:zlib';
import { describe, it, expect, inject, beforeAll } from 'vitest';
import { Client } from '../support/client';
import { sql } from '../support/db';
import { DEMO_PASSWORD, demoEmail, freshEntrant } from '../support/demo';
import { addPhoto, FIXTURE_GCODE_DIR, inspectEntryWithFixture, sqlDate, userId } from '../support/judging-fixtures';
import { insertEntry, insertMachine, insertSeason } from '../support/standings-fixtures';
import { putTestFile } from '../support/storage';

const base = inject('baseUrl');
const dbFile = inject('dbFile');
const dataDir = dataDirOf(dbFile);

type Entrant = Client & { email: string; id: number; machineId: number };
const clients: Record<string, Client> = {};
const anonymous = new Client(base);
let organizerId: number;
let judgeId: number;
let judge2Id: number;

async function signedIn(key: string) {
  const c = new Client(base);
  expect((await c.signIn(demoEmail(key), DEMO_PASSWORD)).status, `sign in ${key}`).toBe(200);
  return c;
}

async function entrant(name: string): Promise<Entrant> {
  const c = await freshEntrant(base, dbFile, name);
  const [u] = await sql<{ id: number }>(dbFile, 'SELECT id FROM users WHERE email = ?', [c.email]);
  const machineId = await insertMachine(dbFile, u.id, `${name}'s rig`);
  return Object.assign(c, { id: u.id, machineId });
}

/** An open season created by the demo organizer, judged by the demo judge, with one blocking rule (2 walls). */
async function season(classes = ['alpha', 'beta']) {
  const s = await insertSeason(dbFile, { classes });
  const t = sqlDate();
  await sql(dbFile, 'UPDATE seasons SET created_by_id = ?, photos_required = 0, video_required = FALSE WHERE id = ?', [organizerId, s.seasonId]);
  await sql(dbFile, `INSERT INTO rules (season_id, class_id, metric, comparator, value, value_max, tolerance, severity, sentence, position, created_at, updated_at)
    VALUES (?, NULL, 'walls', 'eq', 2, NULL, 0, 'blocking', 'Walls must be 2.', 0, ?, ?)`, [s.seasonId, t, t]);
  await sql(dbFile, 'INSERT INTO season_judges (season_id, user_id, appointed_by_id, created_at, updated_at) VALUES (?, ?, ?, ?, ?)', [s.seasonId, judgeId, organizerId, t, t]);
  return s;
}

/** An entry of `who` in the season's class, in `state`, with the fixture G-code inspected under the season's rules. */
async function entry(s: { seasonId: number; classIds: Record<string, number> }, who: Entrant | { id: number; machineId: number }, state: string, opts: { cls?: string; fixture?: string } = {}) {
  const id = await insertEntry(dbFile, { seasonId: s.seasonId, classId: s.classIds[opts.cls ?? 'alpha'], entrantId: who.id, machineId: who.machineId, timeMs: 1_500_000, submittedAt: new Date().toISOString(), state });
  if (state === 'draft') await sql(dbFile, 'UPDATE entries SET submitted_at = NULL WHERE id = ?', [id]);
  await inspectEntryWithFixture(dbFile, id, opts.fixture ?? 'prusa-beacon-020.gcode.gz');
  const [g] = await sql<{ id: number }>(dbFile, "SELECT id FROM stored_files WHERE entry_id = ? AND kind = 'gcode'", [id]);
  return { id, gcodeId: g.id };
}

/** Server-rendered HTML without React's text separators. */
const textOf = (html: string) => html.replace(/<!-- -->/g, '');

async function until<T>(what: string, probe: () => Promise<T | null | undefined | false>, timeoutMs = 150_000): Promise<T> {
  const deadline = Date.now() + timeoutMs;
  for (;;) {
    const v = await probe();
    if (v) return v;
    if (Date.now() > deadline) throw new Error(`Timed out waiting for ${what}`);
    await new Promise((r) => setTimeout(r, 300));
  }
}

/** Waits until every inspection of the entry newer than `afterId` is finished. */
const inspectionDone = (entryId: number, afterId: number) =>
  until(`inspection of entry ${entryId}`, async () => {
    const rows = await sql<{ id: number; status: string; flags: string; blocking_failures: number }>(dbFile, 'SELECT id, status, flags, blocking_failures FROM inspections WHERE entry_id = ? AND id > ? ORDER BY id DESC', [entryId, afterId]);
    return rows.length && rows.every((r) => r.status === 'done' || r.status === 'failed') ? rows[0] : null;
  });

const lastInspectionId = async (entryId: number) => (await sql<{ id: number }>(dbFile, 'SELECT MAX(id) AS id FROM inspections WHERE entry_id = ?', [entryId]))[0].id;

beforeAll(async () => {
  for (const key of ['judge', 'judge2', 'organizer']) clients[key] = await signedIn(key);
  organizerId = await userId(dbFile, 'organizer');
  judgeId = await userId(dbFile, 'judge');
  judge2Id = await userId(dbFile, 'judge2');
});

describe('one access rule for stored files', () => {
  let s: Awaited<ReturnType<typeof season>>;
  let owner: Entrant;
  let draft: { id: number; gcodeId: number };
  let submitted: { id: number; gcodeId: number };
  let verified: { id: number; gcodeId: number };
  let verifiedPhoto: number;
  let submittedPhoto: number;

  beforeAll(async () => {
    s = await season();
    owner = await entrant('Wren Abbott');
    const rival = await entrant('Kit Marlowe');
    draft = await entry(s, owner, 'draft');
    submitted = await entry(s, rival, 'submitted');
    verified = await entry(s, rival, 'verified', { cls: 'beta' });
    verifiedPhoto = (await addPhoto(dbFile, verified.id)).photoId;
    submittedPhoto = (await addPhoto(dbFile, submitted.id)).photoId;
  });

  it("a judge cannot read another entrant's draft G-code through /api/files", async () => {
    expect((await clients.judge.get(`/api/files/${draft.gcodeId}`)).status).toBe(404);
    expect((await clients.judge.get(`/api/judging/entries/${draft.id}/files/${draft.gcodeId}`)).status).toBe(404);
    // The owner always can.
    const own = await owner.get(`/api/files/${draft.gcodeId}`);
    expect(own.status).toBe(200);
    expect(own.headers.get('cache-control')).toBe('private, no-store');
  });

  it('a judge of the season reads a submitted entry’s G-code through /api/files, and the view is audited like the review desk’s', async () => {
    const before = (await sql<{ n: number }>(dbFile, "SELECT COUNT(*) AS n FROM audit_events WHERE action = 'evidence.viewed' AND subject_id = ?", [String(submitted.id)]))[0].n;
    const res = await clients.judge.get(`/api/files/${submitted.gcodeId}`);
    expect(res.status).toBe(200);
    expect(res.headers.get('content-disposition')).toMatch(/^attachment/);
    const bytes = Buffer.from(await res.arrayBuffer());
    expect(zlib.gunzipSync(bytes).subarray(0, 1).length).toBe(1);
    const rows = await sql<{ actor_id: number; details: string }>(dbFile, "SELECT actor_id, details FROM audit_events WHERE action = 'evidence.viewed' AND subject_id = ? ORDER BY id", [String(submitted.id)]);
    expect(rows.length).toBe(before + 1);
    expect(rows.at(-1)!.actor_id).toBe(judgeId);
    expect(JSON.parse(rows.at(-1)!.details)).toMatchObject({ view: 'gcode', fileId: submitted.gcodeId });
  });

  it('the public reads photos of verified entries only; never G-code, never a submitted entry’s photos; organizers are not judges', async () => {
    const photo = await anonymous.get(`/api/files/${verifiedPhoto}`);
    expect(photo.status).toBe(200);
    expect(photo.headers.get('content-type')).toBe('image/png');
    expect((await anonymous.get(`/api/v1/entries/${verified.id}/photos/${verifiedPhoto}`)).status).toBe(200);
    expect((await anonymous.get(`/api/files/${verified.gcodeId}`)).status).toBe(404);
    expect((await anonymous.get(`/api/files/${submittedPhoto}`)).status).toBe(404);
    expect((await anonymous.get(`/api/v1/entries/${submitted.id}/photos/${submittedPhoto}`)).status).toBe(404);
    // The organizer runs the season but does not judge it: entry evidence is not theirs to read.
    expect((await clients.organizer.get(`/api/files/${submitted.gcodeId}`)).status).toBe(404);
  });

  it('sequential file ids reveal nothing: a private file, a missing one and a malformed one answer the same 404', async () => {
    const [max] = await sql<{ id: number }>(dbFile, 'SELECT MAX(id) AS id FROM stored_files');
    const privateFile = await anonymous.get(`/api/files/${draft.gcodeId}`);
    const missing = await anonymous.get(`/api/files/${max.id + 1000}`);
    expect(privateFile.status).toBe(404);
    expect(missing.status).toBe(404);
    expect(await privateFile.json()).toEqual(await missing.json());
    const judgeDraft = await clients.judge.get(`/api/files/${draft.gcodeId}`);
    expect(await judgeDraft.json()).toEqual({ error: 'No such file.' });
  });
});

describe('re-inspection after a tightened rule', () => {
  it('a verified entry that fails a tightened blocking rule leaves the standings and returns to the judges', async () => {
    const s = await season(['alpha']);
    const a = await entrant('Ansel Pike');
    const b = await entrant('Bryn Tolley');
    const ranked = await entry(s, a, 'verified');
    const draft = await entry(s, b, 'draft');
    const standings = `/api/v1/seasons/${s.slug}/classes/alpha/standings`;
    const before = await (await anonymous.get(standings)).json();
    expect(before.rows.map((r: { entry_id: number }) => r.entry_id)).toEqual([ranked.id]);
    const publicBefore = (await (await anonymous.get(`/api/v1/entries/${ranked.id}`)).json()).entry;
    expect(publicBefore.status).toBe('verified');
    const [rankedInsp, draftInsp] = [await lastInspectionId(ranked.id), await lastInspectionId(draft.id)];

    // The organizer tightens the walls rule (the fixture prints 2 walls; PrusaSlicer's settings, fixtures README).
    const res = await clients.organizer.put(`/api/organizer/seasons/${s.seasonId}/rules`, { rules: [{ metric: 'walls', comparator: 'eq', value: 3, severity: 'blocking', classId: null }], reinspect: true });
    expect(res.status, await res.clone().text()).toBe(200);
    const newRanked = await inspectionDone(ranked.id, rankedInsp);
    expect(newRanked.blocking_failures).toBeGreaterThan(0);
    await inspectionDone(draft.id, draftInsp);
    // The outcome is applied right after the report is stored.
    const [row] = await until('the entry to move', async () => {
      const r = await sql<{ state: string; reopened_at: string | null; decided_at: string | null }>(dbFile, 'SELECT state, reopened_at, decided_at FROM entries WHERE id = ?', [ranked.id]);
      return r[0].state !== 'verified' ? r : null;
    });
    expect(row.state).toBe('submitted');
    expect(row.reopened_at).not.toBeNull();
    expect(row.decided_at).toBeNull();

    // Out of the standings on the very next request.
    const after = await (await anonymous.get(standings)).json();
    expect(after.rows).toEqual([]);

    // Back on the judges' desk, counted by the blocking-failure filter, with what changed per rule.
    const q = await (await clients.judge.get(`/api/judging/queue?season=${s.seasonId}&flag=blocking_overridden`)).json();
    expect(q.flagCounts.blocking_overridden).toBe(1);
    const mine = q.entries.find((e: { id: number }) => e.id === ranked.id);
    expect(mine.reopened.changes).toEqual([expect.objectContaining({ metric: 'walls', sentence: 'Walls must be 3.', sentenceBefore: 'Walls must be 2.', before: 'pass', after: 'fail', severity: 'blocking' })]);
    const review = await (await clients.judge.get(`/api/judging/entries/${ranked.id}`)).json();
    expect(review.reinspection).toMatchObject({ reopened: true, rulebookChanged: true });

    // The entrant is told by mail.
    const [mail] = await sql<{ subject: string; text: string }>(dbFile, 'SELECT subject, text FROM sent_mails WHERE "to" = ? ORDER BY id DESC LIMIT 1', [a.email]);
    expect(mail.subject).toBe(`Your ${`Test season ${s.slug}`} entry #${ranked.id} is back with the judges`);
    expect(mail.text).toContain('after the rulebook changed');
    expect(mail.text).toContain('Walls must be 3.');
    expect(mail.text).toContain('pass → fail');

    // The public page states what happened, and claims nothing about what the judges saw.
    const pub = (await (await anonymous.get(`/api/v1/entries/${ranked.id}`)).json()).entry;
    expect(pub).toMatchObject({ status: 'back_with_judges', rank: null, reinspection: { reopened: true, rulebook_changed: true } });
    expect(pub.inspection.summary.join(' ')).not.toMatch(/weighed/);
    const html = textOf(await (await anonymous.get(`/entries/${ranked.id}`)).text());
    expect(html).toMatch(/Re-inspected on [^<]+ after the rulebook changed; back with the judges\./);
    expect(html).not.toMatch(/weighed/);

    // The draft was re-checked too: it now fails the blocking rule and cannot be submitted.
    const submit = await b.post(`/api/entries/${draft.id}/submit`, {});
    expect(submit.status).toBeGreaterThanOrEqual(400);
    expect(JSON.stringify(await submit.json())).toMatch(/blocking problem/);
    const [d] = await sql<{ state: string }>(dbFile, 'SELECT state FROM entries WHERE id = ?', [draft.id]);
    expect(d.state).toBe('draft');
  });

  it('after the pull-back a judge can verify the entry again in a new round', async () => {
    const s = await season(['alpha']);
    const a = await entrant('Cato Briggs');
    const e = await entry(s, a, 'submitted');
    // The judge verifies; then the rule tightens and a re-inspection takes it back.
    const ok = await clients.judge.post(`/api/judging/entries/${e.id}/decisions`, { decision: 'verify', reasonCodes: ['evidence_consistent'], note: 'Matches the video.', expectedState: 'submitted' });
    expect(ok.status, await ok.clone().text()).toBe(201);
    const prev = await lastInspectionId(e.id);
    expect((await clients.organizer.put(`/api/organizer/seasons/${s.seasonId}/rules`, { rules: [{ metric: 'walls', comparator: 'eq', value: 3, severity: 'blocking', classId: null }], reinspect: true })).status).toBe(200);
    await inspectionDone(e.id, prev);
    await until('the pull-back', async () => (await sql<{ state: string }>(dbFile, 'SELECT state FROM entries WHERE id = ?', [e.id]))[0].state === 'submitted');
    // The earlier verification belongs to the earlier round: the same judge may decide again.
    const again = await clients.judge.post(`/api/judging/entries/${e.id}/decisions`, { decision: 'return', reasonCodes: ['other'], note: 'The tightened wall rule fails; re-slice with 3 walls.', expectedState: 'submitted' });
    expect(again.status, await again.clone().text()).toBe(201);
  });

  it('a pulled-back entry cannot be verified while the re-inspection fails; once the rule is corrected and it passes again, it can', async () => {
    const s = await season(['alpha']);
    const a = await entrant('Della Marsh');
    // A fixture no other test uploads: a re-inspection also runs the duplicate check, and an earlier
    // upload of the same G-code by another entrant would block it (PrusaSlicer cube, 2 walls, fixtures README).
    const e = await entry(s, a, 'submitted', { fixture: 'prusa-cube20-relative-e.gcode.gz' });
    // Submitted through the app, the entry records the inspection it was submitted with.
    await sql(dbFile, 'UPDATE entries SET submitted_inspection_id = (SELECT MAX(id) FROM inspections WHERE entry_id = ?) WHERE id = ?', [e.id, e.id]);
    const verify = { decision: 'verify', reasonCodes: ['evidence_consistent'], note: 'Matches the video.', expectedState: 'submitted' };
    expect((await clients.judge.post(`/api/judging/entries/${e.id}/decisions`, verify)).status).toBe(201);
    const rules = (walls: number) => ({ rules: [{ metric: 'walls', comparator: 'eq', value: walls, severity: 'blocking', classId: null }], reinspect: true });
    let prev = await lastInspectionId(e.id);
    expect((await clients.organizer.put(`/api/organizer/seasons/${s.seasonId}/rules`, rules(3))).status).toBe(200);
    await inspectionDone(e.id, prev);
    await until('the pull-back', async () => (await sql<{ state: string }>(dbFile, 'SELECT state FROM entries WHERE id = ?', [e.id]))[0].state === 'submitted');
    // The current inspection fails a blocking rule: no verification.
    const refused = await clients.judge.post(`/api/judging/entries/${e.id}/decisions`, verify);
    expect(refused.status).toBe(409);
    // The organizer corrects the rule (the fixture prints 2 walls) and re-inspects.
    prev = await lastInspectionId(e.id);
    expect((await clients.organizer.put(`/api/organizer/seasons/${s.seasonId}/rules`, rules(2))).status).toBe(200);
    const passing = await inspectionDone(e.id, prev);
    expect(passing.blocking_failures).toBe(0);
    // The entrant changed nothing: the passing re-inspection of the submitted file is verifiable.
    const ok = await clients.judge.post(`/api/judging/entries/${e.id}/decisions`, verify);
    expect(ok.status, await ok.clone().text()).toBe(201);
  });
});

describe('conflicts of interest', () => {
  it('a judge who competes in a class neither sees nor decides its entries, and the refusal is a sentence', async () => {
    const s = await season();
    const rival = await entrant('Dara Quinn');
    const t = sqlDate();
    await sql(dbFile, 'INSERT INTO season_judges (season_id, user_id, appointed_by_id, created_at, updated_at) VALUES (?, ?, ?, ?, ?)', [s.seasonId, judge2Id, organizerId, t, t]);
    const [m] = await sql<{ id: number }>(dbFile, 'SELECT id FROM machines WHERE owner_id = ? LIMIT 1', [judge2Id]);
    // judge2 has only a draft in alpha: a draft already says they compete there.
    await entry(s, { id: judge2Id, machineId: m.id }, 'draft', { cls: 'alpha' });
    const inAlpha = await entry(s, rival, 'submitted', { cls: 'alpha' });
    const inBeta = await entry(s, rival, 'submitted', { cls: 'beta' });

    const q = await (await clients.judge2.get(`/api/judging/queue?season=${s.seasonId}`)).json();
    const ids = q.entries.map((e: { id: number }) => e.id);
    expect(ids).toContain(inBeta.id);
    expect(ids).not.toContain(inAlpha.id);
    expect(q.conflicts).toEqual({ count: 1, classes: ['Class alpha'] });
    // Not by the review desk, not by the file route, not by the decision path.
    const open = await clients.judge2.get(`/api/judging/entries/${inAlpha.id}`);
    expect(open.status).toBe(403);
    expect((await open.json()).error).toBe('You have an entry in Class alpha this season, so another judge of the season decides its entries.');
    expect((await clients.judge2.get(`/api/files/${inAlpha.gcodeId}`)).status).toBe(404);
    const decide = await clients.judge2.post(`/api/judging/entries/${inAlpha.id}/decisions`, { decision: 'reject', reasonCodes: ['other'], note: 'Rival entry.', expectedState: 'submitted' });
    expect(decide.status).toBe(403);
    expect((await decide.json()).error).toMatch(/another judge of the season decides/);
    const [row] = await sql<{ state: string }>(dbFile, 'SELECT state FROM entries WHERE id = ?', [inAlpha.id]);
    expect(row.state).toBe('submitted');
    expect((await sql(dbFile, 'SELECT id FROM reviews WHERE entry_id = ?', [inAlpha.id])).length).toBe(0);
    // The class they do not compete in is theirs to decide.
    const fine = await clients.judge2.post(`/api/judging/entries/${inBeta.id}/decisions`, { decision: 'verify', reasonCodes: ['evidence_consistent'], note: 'Clean.', expectedState: 'submitted' });
    expect(fine.status, await fine.clone().text()).toBe(201);
  });

  it('appointing a judge shows their conflicts; an organizer who competes cannot appoint or invite themselves', async () => {
    const s = await season();
    const [m] = await sql<{ id: number }>(dbFile, 'SELECT id FROM machines WHERE owner_id = ? LIMIT 1', [judge2Id]);
    await entry(s, { id: judge2Id, machineId: m.id }, 'submitted', { cls: 'beta' });
    const res = await clients.organizer.post(`/api/organizer/seasons/${s.seasonId}/judges`, { email: demoEmail('judge2') });
    expect(res.status).toBe(201);
    const body = await res.json();
    expect(body.judge.conflicts).toEqual([{ id: s.classIds.beta, name: 'Class beta' }]);
    expect(body.message).toMatch(/competes in Class beta/);
    const list = await (await clients.organizer.get(`/api/organizer/seasons/${s.seasonId}/judges`)).json();
    expect(list.judges.find((j: { userId: number }) => j.userId === judge2Id).conflicts).toEqual([{ id: s.classIds.beta, name: 'Class beta' }]);
    const page = textOf(await (await clients.organizer.get(`/organize/seasons/${s.seasonId}`)).text());
    expect(page).toContain('Competes in Class beta: those entries are decided by other judges.');

    // The organizer enters the season, then tries to judge it.
    const om = await insertMachine(dbFile, organizerId, 'Organizer rig');
    await entry(s, { id: organizerId, machineId: om }, 'draft', { cls: 'alpha' });
    const self = await clients.organizer.post(`/api/organizer/seasons/${s.seasonId}/judges`, { email: demoEmail('organizer') });
    expect(self.status).toBe(409);
    expect((await self.json()).fields.email).toBe('You have an entry in Class alpha this season, so you cannot judge it yourself. Appoint someone who does not compete.');
    const invite = await clients.organizer.post(`/api/organizer/seasons/${s.seasonId}/invitations`, { email: demoEmail('organizer') });
    expect(invite.status).toBe(409);
    expect((await sql(dbFile, 'SELECT 1 FROM season_judges WHERE season_id = ? AND user_id = ?', [s.seasonId, organizerId])).length).toBe(0);
  });
});

describe('organizers are scoped to their seasons', () => {
  it('another organizer gets 404 on every route of a season they do not run, until a co-organizer adds them', async () => {
    const s = await season();
    const other = await freshEntrant(base, dbFile, 'Ola Strand');
    await sql(dbFile, 'UPDATE users SET roles = \'["entrant","organizer"]\' WHERE email = ?', [other.email]);
    // An open invitation and a co-organizer the outsider must not be able to revoke or remove.
    const t = sqlDate();
    await sql(dbFile, `INSERT INTO judge_invitations (season_id, email, token_hash, invited_by_id, expires_at, created_at, updated_at) VALUES (?, 'open-invite@example.org', ?, ?, ?, ?, ?)`,
      [s.seasonId, crypto.randomBytes(32).toString('hex'), organizerId, sqlDate(new Date(Date.now() + 86_400_000)), t, t]);
    const [inv] = await sql<{ id: number }>(dbFile, 'SELECT id FROM judge_invitations WHERE season_id = ?', [s.seasonId]);
    await sql(dbFile, 'INSERT INTO season_organizers (season_id, user_id, added_by_id, created_at, updated_at) VALUES (?, ?, ?, ?, ?)', [s.seasonId, judge2Id, organizerId, t, t]);
    const routes: [string, string, unknown?][] = [
      ['GET', `/api/organizer/seasons/${s.seasonId}`],
      ['PUT', `/api/organizer/seasons/${s.seasonId}`, { name: 'Taken over' }],
      ['GET', `/api/organizer/seasons/${s.seasonId}/rules`],
      ['PUT', `/api/organizer/seasons/${s.seasonId}/rules`, { rules: [], reinspect: true }],
      ['POST', `/api/organizer/seasons/${s.seasonId}/classes`, { name: 'Intruder', slug: 'intruder', nozzleDiametersMm: [0.4] }],
      ['PUT', `/api/organizer/seasons/${s.seasonId}/classes/${s.classIds.alpha}`, { name: 'Intruder', slug: 'alpha', nozzleDiametersMm: [0.4] }],
      ['DELETE', `/api/organizer/seasons/${s.seasonId}/classes/${s.classIds.beta}`],
      ['GET', `/api/organizer/seasons/${s.seasonId}/judges`],
      ['POST', `/api/organizer/seasons/${s.seasonId}/judges`, { email: other.email }],
      ['DELETE', `/api/organizer/seasons/${s.seasonId}/judges/${judgeId}`],
      ['POST', `/api/organizer/seasons/${s.seasonId}/invitations`, { email: 'someone@example.org' }],
      ['POST', `/api/organizer/seasons/${s.seasonId}/transition`, { to: 'final' }],
      ['POST', `/api/organizer/seasons/${s.seasonId}/reinspect`, { confirm: true }],
      ['GET', `/api/organizer/seasons/${s.seasonId}/organizers`],
      ['POST', `/api/organizer/seasons/${s.seasonId}/organizers`, { email: other.email }],
      ['DELETE', `/api/organizer/seasons/${s.seasonId}/organizers/${judge2Id}`],
      ['DELETE', `/api/organizer/seasons/${s.seasonId}/invitations/${inv.id}`],
      ['POST', `/api/organizer/seasons/${s.seasonId}/test-piece`, {}],
    ];
    for (const [method, p, json] of routes) {
      const res = await other.request(p, { method, ...(json !== undefined ? { json } : {}) });
      expect(res.status, `${method} ${p}`).toBe(404);
    }
    expect((await other.get(`/organize/seasons/${s.seasonId}`)).status).toBe(404);
    const mine = await (await other.get('/api/organizer/seasons')).json();
    expect(mine.seasons.map((x: { id: number }) => x.id)).not.toContain(s.seasonId);
    // Nothing changed.
    expect((await sql(dbFile, 'SELECT 1 FROM classes WHERE season_id = ?', [s.seasonId])).length).toBe(2);
    expect((await sql(dbFile, 'SELECT 1 FROM season_judges WHERE season_id = ? AND user_id = ?', [s.seasonId, judgeId])).length).toBe(1);
    expect((await sql(dbFile, 'SELECT 1 FROM season_organizers WHERE season_id = ? AND user_id = ?', [s.seasonId, judge2Id])).length).toBe(1);
    expect((await sql(dbFile, 'SELECT 1 FROM judge_invitations WHERE id = ? AND revoked_at IS NULL', [inv.id])).length).toBe(1);
    expect((await sql(dbFile, 'SELECT 1 FROM test_pieces WHERE season_id = ?', [s.seasonId])).length).toBe(0);

    // The creator adds them; now they manage it; removed, they are out again.
    const add = await clients.organizer.post(`/api/organizer/seasons/${s.seasonId}/organizers`, { email: other.email });
    expect(add.status, await add.clone().text()).toBe(201);
    // Added twice (a double click, a replayed request): one row, and a sentence next to the field.
    const again = await clients.organizer.post(`/api/organizer/seasons/${s.seasonId}/organizers`, { email: other.email });
    expect(again.status).toBe(409);
    expect((await again.json()).fields.email).toMatch(/already organizes this season/);
    expect((await other.get(`/api/organizer/seasons/${s.seasonId}`)).status).toBe(200);
    expect((await other.get(`/organize/seasons/${s.seasonId}`)).status).toBe(200);
    expect((await (await other.get('/api/organizer/seasons')).json()).seasons.map((x: { id: number }) => x.id)).toContain(s.seasonId);
    const [u] = await sql<{ id: number }>(dbFile, 'SELECT id FROM users WHERE email = ?', [other.email]);
    expect((await clients.organizer.request(`/api/organizer/seasons/${s.seasonId}/organizers/${u.id}`, { method: 'DELETE' })).status).toBe(200);
    expect((await other.get(`/api/organizer/seasons/${s.seasonId}`)).status).toBe(404);
  });

  it('a co-organizer must be an existing account with the organizer role; the creator cannot be removed', async () => {
    const s = await season();
    const plain = await freshEntrant(base, dbFile, 'Pell Varn');
    const noRole = await clients.organizer.post(`/api/organizer/seasons/${s.seasonId}/organizers`, { email: plain.email });
    expect(noRole.status).toBe(422);
    expect((await noRole.json()).fields.email).toMatch(/does not have the organizer role/);
    const unknown = await clients.organizer.post(`/api/organizer/seasons/${s.seasonId}/organizers`, { email: 'nobody-here@example.org' });
    expect(unknown.status).toBe(404);
    expect((await unknown.json()).fields.email).toMatch(/No account uses this address/);
    const creator = await clients.organizer.request(`/api/organizer/seasons/${s.seasonId}/organizers/${organizerId}`, { method: 'DELETE' });
    expect(creator.status).toBe(409);
  });
});

describe('duplicate G-code through compression and edited comments', () => {
  /** Stores `bytes` as the draft's G-code (as an upload would) and runs the app's own inspection of it. */
  async function uploadAndInspect(owner: Entrant, s: { seasonId: number; classIds: Record<string, number> }, bytes: Buffer, name: string) {
    const id = await insertEntry(dbFile, { seasonId: s.seasonId, classId: s.classIds.alpha, entrantId: owner.id, machineId: owner.machineId, timeMs: 1_500_000, submittedAt: new Date().toISOString(), state: 'draft' });
    const sha = crypto.createHash('sha256').update(bytes).digest('hex');
    const key = `entries/${id}/gcode-${sha.slice(0, 16)}-dup.${name.endsWith('.gz') ? 'gcode.gz' : 'gcode'}`;
    await putTestFile(dataDir, key, bytes);
    const t = sqlDate();
    await sql(dbFile, `INSERT INTO stored_files (owner_id, entry_id, kind, original_name, mime, size_bytes, sha256, storage_key, meta, created_at, updated_at)
      VALUES (?, ?, 'gcode', ?, 'text/x-gcode', ?, ?, ?, '{}', ?, ?)`, [owner.id, id, name, bytes.length, sha, key, t, t]);
    await sql(dbFile, 'UPDATE entries SET gcode_sha256 = ? WHERE id = ?', [sha, id]);
    const res = await owner.post(`/api/entries/${id}/inspect`, {});
    expect(res.status, await res.clone().text()).toBe(200);
    const done = await inspectionDone(id, 0);
    return JSON.parse(done.flags) as { code: string; message: string }[];
  }

  it('a plain copy of a gzipped G-code and a copy with its comments and spacing edited are flagged, naming the first entry; a different file is not', async () => {
    const s = await season(['alpha']);
    const first = await entrant('Ivo Hale');
    // A fixture no other test file inspects, so the first entry holding it is this one.
    const fixture = 'cura-cube20-024.gcode.gz';
    const original = await entry(s, first, 'submitted', { fixture });
    const copier = await entrant('Nell Crane');
    const text = zlib.gunzipSync(fs.readFileSync(path.join(FIXTURE_GCODE_DIR, fixture))).toString('latin1');

    const plain = await uploadAndInspect(copier, s, Buffer.from(text, 'latin1'), 'cube.gcode');
    const dup = plain.find((f) => f.code === 'duplicate_gcode');
    expect(dup?.message).toBe(`This G-code is the same as the one in entry #${original.id} (/entries/${original.id}: the same G-code once decompressed). Each entrant must upload the G-code of their own print.`);

    // Every comment reworded, blank lines added, words spaced out, CRLF line ends.
    const edited = text
      .replace(/;(.*)$/gm, (_m, c: string) => `; ${c.toLowerCase()} (tuned by hand)`)
      .replace(/^(G1|G0) /gm, '$1   ')
      .replace(/\n/g, '\r\n\r\n');
    expect(edited).not.toBe(text);
    const flags = await uploadAndInspect(copier, s, Buffer.from(edited, 'latin1'), 'cube-mine.gcode');
    expect(flags.find((f) => f.code === 'duplicate_gcode')?.message).toContain(`entry #${original.id} (/entries/${original.id}: the same moves; only comments or spacing differ)`);

    // A genuinely different print (other slicer, other part) is not a duplicate.
    const other = await uploadAndInspect(copier, s, fs.readFileSync(path.join(FIXTURE_GCODE_DIR, 'slic3r-cylinder-025.gcode.gz')), 'own.gcode.gz');
    expect(other.map((f) => f.code)).not.toContain('duplicate_gcode');

    // Re-inspecting the whole season flags the copies again, never the original (the earlier upload).
    const prev = await lastInspectionId(original.id);
    expect((await clients.organizer.post(`/api/organizer/seasons/${s.seasonId}/reinspect`, { confirm: true })).status).toBe(200);
    const again = await inspectionDone(original.id, prev);
    expect((JSON.parse(again.flags) as { code: string }[]).map((f) => f.code)).not.toContain('duplicate_gcode');
  });
});
