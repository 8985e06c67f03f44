import { describe, it, expect, inject, beforeAll } from 'vitest';
import { Client } from '../support/client';
import { sql } from '../support/db';
import { DEMO_PASSWORD, demoEmail, freshEntrant } from '../support/demo';
import { createReviewableEntry, createSubmittedEntry, inspectEntryWithFixture, seasonId, userId } from '../support/judging-fixtures';
import { REASON_CODES } from '@/lib/reviews/reasons';

const base = inject('baseUrl');
const dbFile = inject('dbFile');

const clients: Record<string, Client> = {};
const signedIn = async (key: string) => {
  const c = new Client(base);
  const res = await c.signIn(demoEmail(key), DEMO_PASSWORD);
  expect(res.status, `sign in ${key}`).toBe(200);
  return c;
};

const reject = { decision: 'reject', reasonCodes: ['timing_unconfirmed', 'layer_shift'], note: 'The video cuts before the last layer; a layer shift shows at 12 mm.' };
/** judge2 competes in Open · 0.4 mm of the demo season: entries both judges decide go in another class. */
const NOT_JUDGE2S_CLASS = { classSlug: 'compact-04' };
const verify = { decision: 'verify', reasonCodes: ['evidence_consistent'], note: 'Clean run, timing matches the video.' };

let frostId: number;
let leafId: number;
let judge2Own: number;
let leafEntry: number;

beforeAll(async () => {
  for (const key of ['judge', 'judge2', 'entrant', 'organizer', 'admin']) clients[key] = await signedIn(key);
  // A plain entrant of its own (other files change the demo accounts' roles and passwords).
  clients.sasha = await freshEntrant(base, dbFile, 'Plain Entrant');
  frostId = await seasonId(dbFile, 'frostbite-sprint');
  leafId = await seasonId(dbFile, 'leaf-fall-dash');
  judge2Own = (await sql<{ id: number }>(dbFile, "SELECT id FROM entries WHERE entrant_id = ? AND state = 'submitted'", [await userId(dbFile, 'judge2')]))[0].id;
  leafEntry = (await sql<{ id: number }>(dbFile, 'SELECT id FROM entries WHERE season_id = ? LIMIT 1', [leafId]))[0].id;
});

describe('queue', () => {
  it('lists submitted entries of the judge’s seasons oldest first, never the judge’s own', async () => {
    const res = await clients.judge2.get('/api/judging/queue');
    expect(res.status).toBe(200);
    const q = await res.json();
    const ids = q.entries.map((e: { id: number }) => e.id);
    expect(ids).not.toContain(judge2Own);
    const times = q.entries.map((e: { submittedAt: string }) => Date.parse(e.submittedAt));
    expect([...times].sort((a, b) => a - b)).toEqual(times);
    // The other judge sees judge2's entry.
    const q1 = await (await clients.judge.get('/api/judging/queue')).json();
    expect(q1.entries.map((e: { id: number }) => e.id)).toContain(judge2Own);
  });

  it('filters by class and by flags, with counts that match the rows', async () => {
    await createReviewableEntry(dbFile, { entrant: 'pim', machine: 'Harrier 300', claimedTimeMs: 600_000 }); // claimed far below the estimate → plausibility flag
    const q = await (await clients.judge.get('/api/judging/queue')).json();
    expect(q.flagCounts.plausibility).toBeGreaterThanOrEqual(1);
    const flagged = await (await clients.judge.get('/api/judging/queue?flag=plausibility')).json();
    expect(flagged.entries.length).toBe(q.flagCounts.plausibility);
    expect(flagged.entries.every((e: { flags: string[] }) => e.flags.includes('plausibility'))).toBe(true);
    const open = q.classes.find((c: { name: string }) => c.name.startsWith('Open'));
    const byClass = await (await clients.judge.get(`/api/judging/queue?class=${open.id}`)).json();
    expect(byClass.entries.length).toBe(open.count);
    expect(byClass.entries.every((e: { classId: number }) => e.classId === open.id)).toBe(true);
    const bad = await clients.judge.get('/api/judging/queue?flag=shiny');
    expect(bad.status).toBe(400);
    expect((await bad.json()).fields.flag).toMatch(/Choose one of/);
  });

  it('searches by entrant or machine in the database, sorts, pages, and refuses bad parameters with a sentence', async () => {
    const { entryId } = await createReviewableEntry(dbFile, { entrant: 'pim', machine: 'Harrier 300', claimedTimeMs: 1_000_001 });
    const byMachine = await (await clients.judge.get('/api/judging/queue?q=harrier')).json();
    expect(byMachine.entries.map((e: { id: number }) => e.id)).toContain(entryId);
    expect(byMachine.entries.every((e: { machine: string; entrant: string }) => /harrier/i.test(e.machine) || /harrier/i.test(e.entrant))).toBe(true);
    const entrantName = byMachine.entries.find((e: { id: number }) => e.id === entryId).entrant as string;
    const byEntrant = await (await clients.judge.get(`/api/judging/queue?q=${encodeURIComponent(entrantName.slice(0, 3).toUpperCase())}`)).json();
    expect(byEntrant.entries.map((e: { id: number }) => e.id)).toContain(entryId);
    // LIKE wildcards typed by the judge match one character each, never "everything".
    const pct = await (await clients.judge.get('/api/judging/queue?q=%25%25%25%25%25%25%25%25%25%25%25%25%25%25%25%25%25%25%25%25%25%25%25%25%25%25%25%25%25%25')).json();
    expect(pct.entries).toHaveLength(0);
    const none = await (await clients.judge.get('/api/judging/queue?q=no-such-name-anywhere')).json();
    expect(none.entries).toHaveLength(0);
    expect(none.matched).toBe(0);

    const claimed = await (await clients.judge.get('/api/judging/queue?sort=claimed')).json();
    const ms = claimed.entries.map((e: { claimedTimeMs: number }) => e.claimedTimeMs);
    expect([...ms].sort((a, b) => a - b)).toEqual(ms);
    const newest = await (await clients.judge.get('/api/judging/queue?sort=newest')).json();
    const times = newest.entries.map((e: { submittedAt: string }) => Date.parse(e.submittedAt));
    expect([...times].sort((a, b) => b - a)).toEqual(times);
    expect(newest.page).toBe(1);
    expect(newest.pageSize).toBe(50);
    // A page past the end shows the last page, not an empty one.
    const far = await (await clients.judge.get('/api/judging/queue?page=999')).json();
    expect(far.page).toBe(far.pageCount);

    for (const [query, field, sentence] of [
      [`q=${'x'.repeat(81)}`, 'q', /at most 80 characters/],
      ['sort=fastest', 'sort', /Choose one of/],
      ['view=all', 'view', /Choose one of/],
      ['page=0', 'page', /page number/],
      ['page=1e1', 'page', /page number/],
    ] as const) {
      const res = await clients.judge.get(`/api/judging/queue?${query}`);
      expect(res.status, query).toBe(400);
      expect((await res.json()).fields[field], query).toMatch(sentence);
    }
  });

  it('the decided view lists entries any judge decided, with the latest decision; previous/next follow the same list', async () => {
    const { entryId: earlier } = await createReviewableEntry(dbFile, { ...NOT_JUDGE2S_CLASS, claimedTimeMs: 1_660_000 });
    expect((await clients.judge2.post(`/api/judging/entries/${earlier}/decisions`, reject)).status).toBe(201);
    const { entryId } = await createReviewableEntry(dbFile, { ...NOT_JUDGE2S_CLASS, claimedTimeMs: 1_650_000 });
    const before = await (await clients.judge.get('/api/judging/queue?view=decided')).json();
    expect(before.entries.map((e: { id: number }) => e.id)).not.toContain(entryId);
    expect((await clients.judge2.post(`/api/judging/entries/${entryId}/decisions`, reject)).status).toBe(201);
    const after = await (await clients.judge.get('/api/judging/queue?view=decided&sort=decided')).json();
    const row = after.entries.find((e: { id: number }) => e.id === entryId);
    expect(row.decision).toMatchObject({ decision: 'reject', byMe: false });
    expect(row.state).toBe('rejected');
    // Latest decision first.
    expect(after.entries[0].id).toBe(entryId);
    // Gone from the waiting view.
    const waiting = await (await clients.judge.get('/api/judging/queue')).json();
    expect(waiting.entries.map((e: { id: number }) => e.id)).not.toContain(entryId);
    // The review screen opened from the decided view places it in that list (first, by latest decision).
    const html = await (await clients.judge.get(`/judging/entries/${entryId}?view=decided&sort=decided`)).text();
    expect(html).toContain(`Entry 1 of ${after.matched} in the decided list`);
    expect(after.entries[1].id).toBe(earlier);
    expect(html).toContain(`Next entry (#${earlier})`);
  });
});

describe('season separation', () => {
  it('a judge of season A cannot see season B’s queue or entries (404)', async () => {
    // judge2 serves Frostbite Sprint only; Leaf-fall Dash is another season.
    expect((await clients.judge2.get(`/api/judging/queue?season=${leafId}`)).status).toBe(404);
    expect((await clients.judge2.get(`/api/judging/entries/${leafEntry}`)).status).toBe(404);
    expect((await clients.judge2.post(`/api/judging/entries/${leafEntry}/decisions`, verify)).status).toBe(404);
    expect((await clients.judge2.get(`/api/judging/entries/${leafEntry}/preview`)).status).toBe(404);
    // The judge who serves both seasons sees it.
    expect((await clients.judge.get(`/api/judging/queue?season=${leafId}`)).status).toBe(200);
    expect((await clients.judge.get(`/api/judging/entries/${leafEntry}`)).status).toBe(200);
    // An entry number that does not exist answers the same as one in another season.
    expect((await clients.judge2.get('/api/judging/entries/999999')).status).toBe(404);
    // The review page answers the same way as its API.
    expect((await clients.judge2.get(`/judging/entries/${leafEntry}`)).status).toBe(404);
    expect((await clients.judge.get(`/judging/entries/${leafEntry}`)).status).toBe(200);
  });
});

describe('who may decide', () => {
  it('a judge cannot decide on, or review, their own entry', async () => {
    const res = await clients.judge2.post(`/api/judging/entries/${judge2Own}/decisions`, verify);
    expect(res.status).toBe(403);
    expect((await res.json()).error).toMatch(/own entry/);
    expect((await clients.judge2.get(`/api/judging/entries/${judge2Own}`)).status).toBe(403);
    const page = await clients.judge2.get(`/judging/entries/${judge2Own}`);
    expect(page.status).toBe(403);
    // The page's 403 screen carries the real reason (the browser shows it: tests/e2e/judge-desk.spec.ts).
    expect(await page.text()).toContain('You cannot judge your own entry');
    const [row] = await sql<{ state: string }>(dbFile, 'SELECT state FROM entries WHERE id = ?', [judge2Own]);
    expect(row.state).toBe('submitted');
  });

  it('entrants, organizers, admins without the judge role and anonymous callers cannot call decision routes', async () => {
    const { entryId } = await createReviewableEntry(dbFile);
    const path = `/api/judging/entries/${entryId}/decisions`;
    expect((await new Client(base).post(path, verify)).status).toBe(401);
    for (const who of ['entrant', 'sasha', 'organizer', 'admin']) {
      const res = await clients[who].post(path, verify);
      expect(res.status, who).toBe(403);
    }
    for (const p of [`/api/judging/entries/${entryId}`, `/api/judging/entries/${entryId}/preview`, `/api/judging/entries/${entryId}/evidence`]) {
      expect((await clients.entrant.get(p)).status).toBe(403);
      expect((await new Client(base).get(p)).status).toBe(401);
    }
    expect((await sql(dbFile, 'SELECT id FROM reviews WHERE entry_id = ?', [entryId])).length).toBe(0);
  });

  it('refuses a decision without reasons, with a reason that does not fit, or without a note, field by field', async () => {
    const entryId = await createSubmittedEntry(dbFile);
    const path = `/api/judging/entries/${entryId}/decisions`;
    let res = await clients.judge.post(path, { ...reject, reasonCodes: [] });
    expect(res.status).toBe(400);
    expect((await res.json()).fields.reasonCodes).toMatch(/at least one reason/);
    res = await clients.judge.post(path, { ...verify, reasonCodes: ['layer_shift'] });
    expect(res.status).toBe(400);
    expect((await res.json()).fields.reasonCodes).toContain(REASON_CODES.layer_shift.label);
    res = await clients.judge.post(path, { ...reject, note: '' });
    expect((await res.json()).fields.note).toMatch(/note/);
    res = await clients.judge.post(path, { ...reject, reasonCodes: ['not_a_code'] });
    expect(res.status).toBe(400);
    res = await clients.judge.request(path, { method: 'POST', headers: { 'content-type': 'application/json' }, body: '{"decision":' });
    expect(res.status).toBe(400);
  });
});

describe('decisions', () => {
  it('a rejection is a review row, changes the state, e-mails the entrant the reasons and is audited', async () => {
    const { entryId } = await createReviewableEntry(dbFile, NOT_JUDGE2S_CLASS);
    const res = await clients.judge.post(`/api/judging/entries/${entryId}/decisions`, reject);
    expect(res.status).toBe(201);
    const body = await res.json();
    expect(body).toMatchObject({ entryState: 'rejected', fromState: 'submitted', mailed: true });
    const [entry] = await sql<{ state: string; decided_at: string | null }>(dbFile, 'SELECT state, decided_at FROM entries WHERE id = ?', [entryId]);
    expect(entry.state).toBe('rejected');
    expect(entry.decided_at).not.toBeNull();
    const reviews = await sql<{ decision: string; reason_codes: string; note: string }>(dbFile, 'SELECT decision, reason_codes, note FROM reviews WHERE entry_id = ?', [entryId]);
    expect(reviews).toHaveLength(1);
    expect(JSON.parse(reviews[0].reason_codes)).toEqual(reject.reasonCodes);
    const [mail] = await sql<{ subject: string; text: string }>(dbFile, 'SELECT subject, text FROM sent_mails WHERE "to" = ? ORDER BY id DESC LIMIT 1', [demoEmail('sasha')]);
    expect(mail.subject).toContain(`#${entryId}`);
    expect(mail.subject).toContain('rejected');
    expect(mail.text).toContain(REASON_CODES.timing_unconfirmed.label);
    expect(mail.text).toContain(REASON_CODES.layer_shift.label);
    expect(mail.text).toContain(reject.note);
    const audits = await sql<{ action: string; details: string }>(dbFile, "SELECT action, details FROM audit_events WHERE subject_type = 'entry' AND subject_id = ? AND action = 'review.decided'", [String(entryId)]);
    expect(audits).toHaveLength(1);
    expect(JSON.parse(audits[0].details)).toMatchObject({ decision: 'reject', fromState: 'submitted', toState: 'rejected' });
    // A second rejection of the same state is refused; a new decision (reversal) must name the state it saw.
    expect((await clients.judge2.post(`/api/judging/entries/${entryId}/decisions`, reject)).status).toBe(409);
    // A rejected entry is not verified by a reversal: only what the entrant submits is verified.
    const reversal = await clients.judge2.post(`/api/judging/entries/${entryId}/decisions`, { ...verify, reasonCodes: ['flags_explained'], expectedState: 'rejected' });
    expect(reversal.status).toBe(409);
    expect((await reversal.json()).error).toMatch(/Only a submitted entry can be verified/);
    // A judge who reverses a rejection returns the entry, and the entrant resubmits it.
    const again = await clients.judge2.post(`/api/judging/entries/${entryId}/decisions`, { decision: 'return', reasonCodes: ['timing_unconfirmed'], note: 'Reopened: add the full video and submit again.', expectedState: 'rejected' });
    expect(again.status).toBe(201);
    expect((await again.json()).entryState).toBe('returned');
    // Reviews are never edited: both rows are kept.
    expect((await sql(dbFile, 'SELECT id FROM reviews WHERE entry_id = ?', [entryId])).length).toBe(2);
  });

  it('two judges deciding at the same moment leave one consistent state', async () => {
    for (let round = 0; round < 4; round++) {
      // Inspected entries: a judge verifies only an entry whose submitted inspection is current.
      const { entryId } = await createReviewableEntry(dbFile, NOT_JUDGE2S_CLASS);
      const path = `/api/judging/entries/${entryId}/decisions`;
      const [a, b] = await Promise.all([clients.judge.post(path, reject), clients.judge2.post(path, verify)]);
      const statuses = [a.status, b.status].sort();
      expect(statuses, `round ${round}`).toEqual([201, 409]);
      const winner = a.status === 201 ? await a.json() : await b.json();
      const loser = a.status === 409 ? await a.json() : await b.json();
      expect(loser.error).toMatch(/another judge decided/);
      const [entry] = await sql<{ state: string }>(dbFile, 'SELECT state FROM entries WHERE id = ?', [entryId]);
      expect(entry.state).toBe(winner.entryState);
      const reviews = await sql<{ decision: string }>(dbFile, 'SELECT decision FROM reviews WHERE entry_id = ?', [entryId]);
      expect(reviews).toHaveLength(1);
      expect(reviews[0].decision).toBe(winner.decision);
    }
  });

  it('with two verifying judges required, an entry counts only after two different judges verify it — even at the same moment', async () => {
    await sql(dbFile, 'UPDATE seasons SET verifications_required = 2 WHERE id = ?', [frostId]);
    try {
      // Inspected entries: a judge verifies only an entry whose submitted inspection is current.
      const { entryId } = await createReviewableEntry(dbFile, NOT_JUDGE2S_CLASS);
      const path = `/api/judging/entries/${entryId}/decisions`;
      let res = await clients.judge.post(path, verify);
      expect(res.status).toBe(201);
      expect(await res.json()).toMatchObject({ entryState: 'submitted', verifications: { count: 1, required: 2 }, mailed: false });
      res = await clients.judge.post(path, verify);
      expect(res.status).toBe(409);
      expect((await res.json()).error).toMatch(/already verified/);
      res = await clients.judge2.post(path, verify);
      expect(res.status).toBe(201);
      expect(await res.json()).toMatchObject({ entryState: 'verified', verifications: { count: 2, required: 2 }, mailed: true });

      // Simultaneous verifications by both judges: both count, and the entry ends verified exactly once.
      const { entryId: e2 } = await createReviewableEntry(dbFile, NOT_JUDGE2S_CLASS);
      const p2 = `/api/judging/entries/${e2}/decisions`;
      const both = await Promise.all([clients.judge.post(p2, verify), clients.judge2.post(p2, verify)]);
      expect(both.map((r) => r.status)).toEqual([201, 201]);
      const states = await Promise.all(both.map((r) => r.json()));
      expect(states.map((s) => s.entryState).sort()).toEqual(['submitted', 'verified']);
      const [row] = await sql<{ state: string }>(dbFile, 'SELECT state FROM entries WHERE id = ?', [e2]);
      expect(row.state).toBe('verified');
    } finally {
      await sql(dbFile, 'UPDATE seasons SET verifications_required = 1 WHERE id = ?', [frostId]);
    }
  });

  it('refuses decisions in a season whose standings are final', async () => {
    const res = await clients.judge.post(`/api/judging/entries/${leafEntry}/decisions`, { ...reject, expectedState: 'verified' });
    expect(res.status).toBe(409);
    expect((await res.json()).error).toMatch(/final/);
  });
});

describe('review screen and evidence', () => {
  it('shows the inspection, machine tests, photos and dimensions, and audits the view', async () => {
    const { entryId } = await createReviewableEntry(dbFile, { measuredMm: [36.36, 38.9, 40.0] });
    const before = (await sql(dbFile, "SELECT id FROM audit_events WHERE action = 'evidence.viewed' AND subject_id = ?", [String(entryId)])).length;
    const res = await clients.judge.get(`/api/judging/entries/${entryId}`);
    expect(res.status).toBe(200);
    const r = await res.json();
    expect(r.photos).toHaveLength(2);
    expect(r.photos[0].capturedAt).toBe('2026-11-25T18:04:31');
    expect(r.inspection.status).toBe('done');
    expect(r.inspection.ruleResults.length).toBeGreaterThan(0);
    expect(r.inspection.settings.find((s: { key: string }) => s.key === 'walls')).toBeTruthy();
    // PrusaSlicer's own estimate for this fixture is 1427 s (tests/fixtures/manifest.json, slicer_reports).
    expect(r.inspection.headline.slicerEstimateS).toBe(1427);
    expect(r.inspection.flowSeries.maxMm3s.length).toBeGreaterThan(10);
    // The seeded Beacon test piece is 36 × 39 × 40 mm (bounding box of tests/fixtures/stl/beacon.stl, our own shape).
    // Deviation = measured − reference, % of the reference (caliper practice, no source): 36.36 mm is +0.36 mm = +1 %,
    // 38.9 mm is −0.1 mm = −0.256 %.
    const dx = r.dimensions.find((d: { axis: string }) => d.axis === 'x');
    const dy = r.dimensions.find((d: { axis: string }) => d.axis === 'y');
    expect(r.testPiece.sizeMm).toEqual({ x: 36, y: 39, z: 40 });
    expect(dx.deltaMm).toBeCloseTo(0.36, 6);
    expect(dx.percent).toBeCloseTo(1, 6);
    expect(dx.withinTolerance).toBe(true);
    expect(dy.deltaMm).toBeCloseTo(-0.1, 6);
    expect(dy.percent).toBeCloseTo(-0.2564, 3);
    const after = (await sql(dbFile, "SELECT id FROM audit_events WHERE action = 'evidence.viewed' AND subject_id = ?", [String(entryId)])).length;
    expect(after).toBe(before + 1);

    // Full-size photo and G-code are served to the judge and audited; thumbnails are not audited.
    const photo = await clients.judge.get(r.photos[0].url);
    expect(photo.status).toBe(200);
    expect(photo.headers.get('content-type')).toBe('image/png');
    expect((await clients.judge.get(r.photos[0].thumbUrl)).status).toBe(200);
    const g = await clients.judge.get(r.gcode.url);
    expect(g.status).toBe(200);
    expect(g.headers.get('content-disposition')).toMatch(/attachment/);
    const ev = await clients.judge.get(r.entry.evidenceLink);
    expect(ev.status).toBe(302);
    expect(ev.headers.get('location')).toBe('https://video.example.org/run-test');
    const views = await sql<{ details: string }>(dbFile, "SELECT details FROM audit_events WHERE action = 'evidence.viewed' AND subject_id = ? ORDER BY id", [String(entryId)]);
    expect(views.map((v) => JSON.parse(v.details).view)).toEqual(['review', 'photo', 'gcode', 'evidence_link']);
    // Another entry's file through this entry's path is not found.
    expect((await clients.judge.get(`/api/judging/entries/${judge2Own}/files/${r.photos[0].id}`)).status).toBe(404);
  });

  it('an entry without G-code yet still opens, with no inspection and a clear 404 for the preview', async () => {
    const entryId = await createSubmittedEntry(dbFile);
    const r = await (await clients.judge.get(`/api/judging/entries/${entryId}`)).json();
    expect(r.inspection).toBeNull();
    expect(r.gcode).toBeNull();
    expect(r.photos).toEqual([]);
    const p = await clients.judge.get(`/api/judging/entries/${entryId}/preview`);
    expect(p.status).toBe(404);
    expect((await p.json()).error).toMatch(/no G-code/);
  });

  it('serves the toolpath preview of the entry’s G-code under 1 MB', async () => {
    const { entryId } = await createReviewableEntry(dbFile, { fixture: 'cura-beacon-020.gcode.gz' });
    const res = await clients.judge.get(`/api/judging/entries/${entryId}/preview`);
    expect(res.status).toBe(200);
    const text = await res.text();
    console.log(`preview of cura-beacon-020 through the API: ${text.length} bytes`);
    expect(text.length).toBeLessThan(1_000_000);
    const p = JSON.parse(text);
    // 40 mm Beacon at 0.2 mm layers = 200 layers, plus the prime line's own Z.
    expect(p.layers.length).toBeGreaterThanOrEqual(200);
    // Second call is served from the stored copy, same bytes; each view is audited.
    expect(await (await clients.judge.get(`/api/judging/entries/${entryId}/preview`)).text()).toBe(text);
    const views = await sql<{ details: string }>(dbFile, "SELECT details FROM audit_events WHERE action = 'evidence.viewed' AND subject_id = ?", [String(entryId)]);
    expect(views.map((v) => JSON.parse(v.details).view)).toEqual(['toolpath_preview', 'toolpath_preview']);
  });

  it('shows judges what changed after a re-inspection, keeping both inspections', async () => {
    const { entryId, inspectionId } = await createReviewableEntry(dbFile);
    // A second inspection of a different file: the 0.28 mm slicing of the same Beacon.
    const second = await inspectEntryWithFixture(dbFile, entryId, 'prusa-beacon-028.gcode.gz', { engineVersion: 'hotlap-inspect-2' });
    const r = await (await clients.judge.get(`/api/judging/entries/${entryId}`)).json();
    expect(r.changes.previous.id).toBe(inspectionId);
    expect(r.changes.latest.id).toBe(second);
    expect(r.changes.unchanged).toBe(false);
    const lh = r.changes.headline.find((h: { key: string }) => h.key === 'layerHeightMm');
    // Layer heights from the manifest: 0.2 mm and 0.28 mm.
    expect(lh.before).toBeCloseTo(0.2, 3);
    expect(lh.after).toBeCloseTo(0.28, 3);
    // Both inside the rulebook's 0.20–0.30 mm band: the rule still passes, its measured value moved.
    const rule = r.changes.rules.find((x: { metric: string }) => x.metric === 'layer_height_mm');
    expect(rule).toMatchObject({ before: 'pass', after: 'pass' });
    expect((await sql(dbFile, 'SELECT id FROM inspections WHERE entry_id = ?', [entryId])).length).toBe(2);
  });
});

describe('re-inspection by the organizer', () => {
  it('after a rulebook change re-inspects the season, judges see the rule results that changed', async () => {
    const { entryId } = await createReviewableEntry(dbFile);
    type RuleOut = { metric: string; comparator: string; value: number; valueMax?: number | null; tolerance?: number; severity: string; classId: number | null };
    const get = await clients.organizer.get(`/api/organizer/seasons/${frostId}/rules`);
    expect(get.status).toBe(200);
    const original = ((await get.json()).rules as RuleOut[]).map(({ metric, comparator, value, valueMax, tolerance, severity, classId }) => ({
      metric, comparator, value, ...(valueMax != null ? { valueMax } : {}), ...(tolerance != null ? { tolerance } : {}), severity, classId,
    }));
    // Three walls instead of two: the fixture (sliced with 2 walls, tests/fixtures/manifest.json) now fails.
    const changed = original.map((r) => (r.metric === 'walls' ? { ...r, value: 3 } : r));
    const put = await clients.organizer.put(`/api/organizer/seasons/${frostId}/rules`, { rules: changed, reinspect: true });
    expect(put.status, await put.clone().text()).toBe(200);
    try {
      let r: { pendingInspection: unknown; changes: { rules: { metric: string; before: string; after: string }[] } | null } | null = null;
      for (let i = 0; i < 240; i++) {
        r = await (await clients.judge.get(`/api/judging/entries/${entryId}`)).json();
        if (!r!.pendingInspection && r!.changes) break;
        await new Promise((ok) => setTimeout(ok, 500));
      }
      expect(r!.pendingInspection).toBeNull();
      const walls = r!.changes!.rules.find((x) => x.metric === 'walls');
      expect(walls).toMatchObject({ before: 'pass', after: 'fail' });
      // The queue now marks the entry as failing a blocking rule.
      const q = await (await clients.judge.get('/api/judging/queue?flag=blocking_overridden')).json();
      expect(q.entries.map((e: { id: number }) => e.id)).toContain(entryId);
    } finally {
      await clients.organizer.put(`/api/organizer/seasons/${frostId}/rules`, { rules: original, reinspect: true });
    }
  });
});
