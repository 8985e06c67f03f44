/**
 * Organizer routes against the built app: who may call them, the season lifecycle with its guards,
 * the rulebook freeze, test-piece uploads (closed-form shapes, broken files, a 2 GB declaration)
 * and judges. Demo seasons are left alone: every test works on seasons it creates.
 */
import http from 'node:http';
import fs from 'node:fs';
import path from 'node:path';
import { describe, it, expect, inject, beforeAll } from 'vitest';
import { Client } from '../support/client';
import { sql } from '../support/db';
import { DEMO_PASSWORD, demoEmail, freshEntrant } from '../support/demo';
import { cuboid, cylinder, toAsciiStl, toBinaryStl } from '@/scripts/fixtures/shapes';

const base = inject('baseUrl');
const dbFile = inject('dbFile');
const clients: Record<string, Client> = {};
const stamp = Date.now().toString(36);

const seasonBody = (slug: string, extra: Record<string, unknown> = {}) => ({
  name: `Test season ${slug}`, slug, hostName: 'Millbrook Makers', description: '**Fast** and *clean*.',
  opensAt: '2027-02-01T18:00', closesAt: '2027-03-31T18:00', timeZone: 'Europe/Berlin',
  timingConvention: 'First extrusion to last extrusion', photosRequired: 2, photoKinds: [], videoRequired: true, entryLimit: 3, verificationsRequired: 1,
  ...extra,
});
const classBody = (slug: string, extra: Record<string, unknown> = {}) => ({ name: `Class ${slug}`, slug, nozzleDiametersMm: [0.4], ...extra });
const rule = (metric: string, value: unknown, extra: Record<string, unknown> = {}) => ({ metric, comparator: 'eq', value, severity: 'blocking', classId: null, ...extra });

function stlForm(name: string, data: string | Buffer) {
  const form = new FormData();
  form.set('name', 'Cube');
  form.set('file', new Blob([typeof data === 'string' ? data : new Uint8Array(data)]), name);
  return form;
}
const upload = (c: Client, seasonId: number, name: string, data: string | Buffer) =>
  c.request(`/api/organizer/seasons/${seasonId}/test-piece`, { method: 'POST', body: stlForm(name, data) });

async function createSeason(slug: string): Promise<number> {
  const res = await clients.organizer.post('/api/organizer/seasons', seasonBody(slug));
  expect(res.status, await res.clone().text()).toBe(201);
  return (await res.json()).season.id;
}

beforeAll(async () => {
  for (const key of ['entrant', 'judge', 'organizer', 'admin']) {
    clients[key] = new Client(base);
    expect((await clients[key].signIn(demoEmail(key), DEMO_PASSWORD)).status, `sign in ${key}`).toBe(200);
  }
});

describe('every organizer route refuses entrants, judges, admins without the role, and anonymous callers', () => {
  let seasonId = 0;
  let classId = 0;
  beforeAll(async () => {
    seasonId = await createSeason(`guarded-${stamp}`);
    const c = await clients.organizer.post(`/api/organizer/seasons/${seasonId}/classes`, classBody('guarded'));
    classId = (await c.json()).class.id;
  });

  const routes = () => [
    { method: 'GET', path: '/api/organizer/seasons' },
    { method: 'POST', path: '/api/organizer/seasons', body: seasonBody(`intruder-${stamp}`) },
    { method: 'GET', path: `/api/organizer/seasons/${seasonId}` },
    { method: 'PUT', path: `/api/organizer/seasons/${seasonId}`, body: seasonBody(`guarded-${stamp}`, { name: 'Renamed by an intruder' }) },
    { method: 'POST', path: `/api/organizer/seasons/${seasonId}/test-piece`, form: true },
    { method: 'POST', path: `/api/organizer/seasons/${seasonId}/classes`, body: classBody('intruder') },
    { method: 'PUT', path: `/api/organizer/seasons/${seasonId}/classes`, body: { classIds: [classId] } },
    { method: 'PUT', path: `/api/organizer/seasons/${seasonId}/classes/${classId}`, body: classBody('guarded', { name: 'Intruder' }) },
    { method: 'DELETE', path: `/api/organizer/seasons/${seasonId}/classes/${classId}` },
    { method: 'GET', path: `/api/organizer/seasons/${seasonId}/rules` },
    { method: 'PUT', path: `/api/organizer/seasons/${seasonId}/rules`, body: { rules: [rule('walls', 9)] } },
    { method: 'POST', path: `/api/organizer/seasons/${seasonId}/transition`, body: { to: 'open' } },
    { method: 'POST', path: `/api/organizer/seasons/${seasonId}/reinspect`, body: { confirm: true } },
    { method: 'GET', path: `/api/organizer/seasons/${seasonId}/judges` },
    { method: 'POST', path: `/api/organizer/seasons/${seasonId}/judges`, body: { email: demoEmail('pim') } },
    { method: 'DELETE', path: `/api/organizer/seasons/${seasonId}/judges/1` },
    { method: 'POST', path: `/api/organizer/seasons/${seasonId}/invitations`, body: { email: 'intruder@example.org' } },
    { method: 'DELETE', path: `/api/organizer/seasons/${seasonId}/invitations/1` },
  ] as { method: 'GET' | 'POST' | 'PUT' | 'DELETE'; path: string; body?: unknown; form?: boolean }[];

  const call = (c: Client, r: ReturnType<typeof routes>[number]) =>
    r.form ? upload(c, seasonId, 'cube.stl', toBinaryStl(cuboid('c', [10, 10, 10])))
      : c.request(r.path, { method: r.method, ...(r.body !== undefined ? { json: r.body } : {}) });

  it('anonymous: 401; entrant, judge and admin without the organizer role: 403; nothing changes', async () => {
    const before = await sql(dbFile, 'SELECT (SELECT COUNT(*) FROM seasons) s, (SELECT COUNT(*) FROM classes) c, (SELECT COUNT(*) FROM rules) r, (SELECT COUNT(*) FROM test_pieces) t, (SELECT COUNT(*) FROM judge_invitations) i');
    for (const r of routes()) {
      const anon = await call(new Client(base), r);
      expect(anon.status, `anonymous ${r.method} ${r.path}`).toBe(401);
      for (const who of ['entrant', 'judge', 'admin']) {
        const res = await call(clients[who], r);
        expect(res.status, `${who} ${r.method} ${r.path}`).toBe(403);
        expect((await res.json()).error).toContain('organizer');
      }
    }
    const after = await sql(dbFile, 'SELECT (SELECT COUNT(*) FROM seasons) s, (SELECT COUNT(*) FROM classes) c, (SELECT COUNT(*) FROM rules) r, (SELECT COUNT(*) FROM test_pieces) t, (SELECT COUNT(*) FROM judge_invitations) i');
    expect(after).toEqual(before);
    const [s] = await sql<{ name: string; state: string }>(dbFile, 'SELECT name, state FROM seasons WHERE id = ?', [seasonId]);
    expect(s).toEqual({ name: `Test season guarded-${stamp}`, state: 'draft' });
  });

  it('organizer pages send others away', async () => {
    const anon = await new Client(base).get('/organize');
    expect(anon.status).toBe(307);
    expect(anon.headers.get('location')).toContain('/signin');
    expect((await clients.entrant.get(`/organize/seasons/${seasonId}`)).status).toBe(403);
    expect((await clients.organizer.get(`/organize/seasons/${seasonId}`)).status).toBe(200);
  });
});

describe('season editor: bad input is refused with field messages and nothing is saved', () => {
  it('close before open → 400 on closesAt', async () => {
    const slug = `backwards-${stamp}`;
    const res = await clients.organizer.post('/api/organizer/seasons', seasonBody(slug, { opensAt: '2027-05-01T12:00', closesAt: '2027-04-01T12:00' }));
    expect(res.status).toBe(400);
    expect((await res.json()).fields.closesAt).toMatch(/close after it opens/);
    expect(await sql(dbFile, 'SELECT id FROM seasons WHERE slug = ?', [slug])).toEqual([]);
  });

  it('duplicate slug → 409 on slug, the first season untouched', async () => {
    const res = await clients.organizer.post('/api/organizer/seasons', seasonBody('frostbite-sprint', { name: 'Copycat' }));
    expect(res.status).toBe(409);
    expect((await res.json()).fields.slug).toMatch(/already uses "frostbite-sprint"/);
    expect(await sql(dbFile, "SELECT name FROM seasons WHERE slug = 'frostbite-sprint'")).toEqual([{ name: 'Frostbite Sprint' }]);
  });

  it('renaming onto another season’s slug → 409', async () => {
    const id = await createSeason(`rename-${stamp}`);
    const res = await clients.organizer.put(`/api/organizer/seasons/${id}`, seasonBody('leaf-fall-dash'));
    expect(res.status).toBe(409);
    expect((await res.json()).fields.slug).toBeDefined();
  });

  it('stores dates as the UTC instants of the season time zone', async () => {
    const id = await createSeason(`zoned-${stamp}`);
    const [row] = await sql<{ opens_at: string }>(dbFile, 'SELECT opens_at FROM seasons WHERE id = ?', [id]);
    // 18:00 in Berlin in February is 17:00 UTC (CET = UTC+1, IANA tz database).
    expect(new Date(row.opens_at.replace(' ', 'T').replace(' +00:00', 'Z')).toISOString()).toBe('2027-02-01T17:00:00.000Z');
  });
});

describe('test piece upload', () => {
  let seasonId = 0;
  beforeAll(async () => {
    seasonId = await createSeason(`piece-${stamp}`);
  });

  it('binary cube: its bounding box and volume (a³) come back', async () => {
    const res = await upload(clients.organizer, seasonId, 'cube.stl', toBinaryStl(cuboid('cube', [20, 20, 20])));
    expect(res.status).toBe(201);
    const { testPiece } = await res.json();
    expect(testPiece).toMatchObject({ format: 'binary', triangleCount: 12, sizeXMm: 20, sizeYMm: 20, sizeZMm: 20 });
    expect(testPiece.volumeMm3).toBeCloseTo(8000, 3); // 20³, elementary geometry
  });

  it('ASCII cylinder replaces it: (n/2)·r²·sin(2π/n)·h for the 64-gon prism', async () => {
    const res = await upload(clients.organizer, seasonId, 'cylinder.stl', toAsciiStl(cylinder(10, 20, 64)));
    expect(res.status).toBe(201);
    const { testPiece } = await res.json();
    // Area of a regular polygon from its circumradius (CRC Standard Mathematical Tables) × h.
    expect(testPiece.volumeMm3).toBeCloseTo(32 * 100 * Math.sin(Math.PI / 32) * 20, 2);
    expect(testPiece.format).toBe('ascii');
    expect(await sql(dbFile, 'SELECT COUNT(*) n FROM test_pieces WHERE season_id = ?', [seasonId])).toEqual([{ n: 1 }]);
  });

  it('a broken STL is refused with the reason and the previous test piece stays', async () => {
    const full = toBinaryStl(cuboid('cut', [5, 5, 5]));
    const res = await upload(clients.organizer, seasonId, 'broken.stl', full.subarray(0, full.length - 17));
    expect(res.status).toBe(422);
    const body = await res.json();
    expect(body.error).toContain('broken.stl is not a usable STL');
    expect(body.fields.file.length).toBeGreaterThan(10);
    const [tp] = await sql<{ format: string }>(dbFile, 'SELECT format FROM test_pieces WHERE season_id = ?', [seasonId]);
    expect(tp.format).toBe('ascii');
  });

  it('a declared 2 GB upload is refused by its size before the body is sent (413)', async () => {
    const url = new URL(`${base}/api/organizer/seasons/${seasonId}/test-piece`);
    const cookie = (clients.organizer as unknown as { cookieHeader(): string }).cookieHeader();
    const answer = await new Promise<{ status: number; body: string }>((resolve, reject) => {
      const req = http.request({
        host: url.hostname, port: url.port, path: url.pathname, method: 'POST',
        headers: { cookie, 'content-type': 'multipart/form-data; boundary=xyz', 'content-length': String(2 * 1024 ** 3) },
      }, (res) => {
        let body = '';
        res.on('data', (d) => (body += d));
        res.on('end', () => resolve({ status: res.statusCode ?? 0, body }));
        res.on('error', reject);
      });
      req.on('error', reject);
      // Only the first bytes of the announced 2 GB are ever sent.
      req.write('--xyz\r\nContent-Disposition: form-data; name="file"; filename="huge.stl"\r\n\r\n');
      setTimeout(() => resolve({ status: -1, body: 'no answer within 10 s' }), 10_000);
    });
    expect(answer.status).toBe(413);
    expect(JSON.parse(answer.body).error).toMatch(/2048 MB; the limit is 100 MB/);
  });
});

describe('lifecycle, rulebook freeze and judges', () => {
  let seasonId = 0;
  let classA = 0;
  let classB = 0;
  const slug = `cycle-${stamp}`;
  beforeAll(async () => {
    seasonId = await createSeason(slug);
  });

  it('cannot open without a test piece and a class (409 with the reasons)', async () => {
    const res = await clients.organizer.post(`/api/organizer/seasons/${seasonId}/transition`, { to: 'open' });
    expect(res.status).toBe(409);
    const { error } = await res.json();
    expect(error).toMatch(/no test piece/);
    expect(error).toMatch(/no class/);
  });

  it('cannot skip a state', async () => {
    const res = await clients.organizer.post(`/api/organizer/seasons/${seasonId}/transition`, { to: 'final' });
    expect(res.status).toBe(409);
    expect((await res.json()).error).toMatch(/can only move on to open/);
  });

  it('classes: two added, a duplicate class slug refused', async () => {
    const a = await clients.organizer.post(`/api/organizer/seasons/${seasonId}/classes`, classBody('compact', { buildVolumeMaxMm: 200 }));
    const b = await clients.organizer.post(`/api/organizer/seasons/${seasonId}/classes`, classBody('wide', { nozzleDiametersMm: [], nozzleMinMm: 0.6 }));
    expect([a.status, b.status]).toEqual([201, 201]);
    classA = (await a.json()).class.id;
    classB = (await b.json()).class.id;
    const dup = await clients.organizer.post(`/api/organizer/seasons/${seasonId}/classes`, classBody('wide'));
    expect(dup.status).toBe(409);
    expect((await dup.json()).fields.slug).toBeDefined();
    const order = await clients.organizer.put(`/api/organizer/seasons/${seasonId}/classes`, { classIds: [classB, classA] });
    expect((await order.json()).classes.map((c: { id: number }) => c.id)).toEqual([classB, classA]);
  });

  it('a rule value that is not a number → 400 on that field; nothing saved', async () => {
    const res = await clients.organizer.put(`/api/organizer/seasons/${seasonId}/rules`, { rules: [rule('walls', 2), rule('infill_percent', 'fifteen')] });
    expect(res.status).toBe(400);
    expect((await res.json()).fields['rules.1.value']).toMatch(/must be a number/);
    expect(await sql(dbFile, 'SELECT COUNT(*) n FROM rules WHERE season_id = ?', [seasonId])).toEqual([{ n: 0 }]);
  });

  it('a rule pointing at another season’s class → 400; nothing saved', async () => {
    const [foreign] = await sql<{ id: number }>(dbFile, "SELECT c.id FROM classes c JOIN seasons s ON s.id = c.season_id WHERE s.slug = 'frostbite-sprint' LIMIT 1");
    const res = await clients.organizer.put(`/api/organizer/seasons/${seasonId}/rules`, { rules: [rule('walls', 2), rule('walls', 3, { classId: foreign.id })] });
    expect(res.status).toBe(400);
    expect((await res.json()).fields['rules.1.classId']).toBeDefined();
    expect(await sql(dbFile, 'SELECT COUNT(*) n FROM rules WHERE season_id = ?', [seasonId])).toEqual([{ n: 0 }]);
  });

  it('saves season rules and a class override with generated sentences', async () => {
    const res = await clients.organizer.put(`/api/organizer/seasons/${seasonId}/rules`, {
      rules: [
        rule('walls', 2),
        rule('layer_height_mm', 0.2, { comparator: 'between', valueMax: 0.3 }),
        rule('infill_percent', 15, { tolerance: 2 }),
        rule('objects', 1, { sentence: 'Print exactly one Beacon.' }),
        rule('layer_height_mm', 0.4, { comparator: 'lte', classId: classB }),
      ],
    });
    expect(res.status).toBe(200);
    const rows = await sql<{ sentence: string; class_id: number | null; position: number }>(dbFile, 'SELECT sentence, class_id, position FROM rules WHERE season_id = ? ORDER BY class_id IS NOT NULL, position', [seasonId]);
    expect(rows.map((r) => r.sentence)).toEqual([
      'Walls must be 2.',
      'Layer height must be between 0.20 and 0.30 mm.',
      'Sparse infill must be 15 % (± 2 %).',
      'Print exactly one Beacon.',
      'Layer height must be at most 0.40 mm.',
    ]);
    expect(rows[4]).toMatchObject({ class_id: classB, position: 0 });
  });

  it('opens with a test piece and classes, and mails subscribers when asked', async () => {
    expect((await upload(clients.organizer, seasonId, 'cube.stl', toBinaryStl(cuboid('cube', [20, 20, 20])))).status).toBe(201);
    const [entrant] = await sql<{ id: number }>(dbFile, 'SELECT id FROM users WHERE email = ?', [demoEmail('entrant')]);
    const now = new Date().toISOString();
    await sql(dbFile, 'INSERT INTO season_subscriptions (season_id, user_id, created_at, updated_at) VALUES (?, ?, ?, ?)', [seasonId, entrant.id, now, now]);
    const res = await clients.organizer.post(`/api/organizer/seasons/${seasonId}/transition`, { to: 'open', notify: true, note: 'Good luck!' });
    expect(res.status).toBe(200);
    expect((await res.json()).notified).toBe(1);
    const mails = await sql<{ subject: string; text: string }>(dbFile, 'SELECT subject, text FROM sent_mails WHERE "to" = ? ORDER BY id DESC LIMIT 1', [demoEmail('entrant')]);
    expect(mails[0].subject).toBe(`Test season ${slug} is now open`);
    expect(mails[0].text).toContain('Good luck!');
    expect(mails[0].text).toContain(`/seasons/${slug}`);
    const audit = await sql<{ details: string }>(dbFile, "SELECT details FROM audit_events WHERE action = 'season.state_changed' AND subject_id = ?", [String(seasonId)]);
    expect(JSON.parse(audit[0].details)).toMatchObject({ from: 'draft', to: 'open', notify: true });
  });

  it('the public rulebook shows the rules as sentences, with the safety cautions', async () => {
    const res = await new Client(base).get(`/seasons/${slug}/rulebook`);
    expect(res.status).toBe(200);
    const html = await res.text();
    for (const s of ['Walls must be 2.', 'Layer height must be between 0.20 and 0.30 mm.', 'Print exactly one Beacon.', 'Layer height must be at most 0.40 mm.', 'thermal-runaway protection'])
      expect(html).toContain(s);
    expect(html).toContain('replaces the season rule on layer height');
  });

  it('rules freeze once an entry is submitted: 409 with the reason, unless every entry is re-inspected', async () => {
    const [entrant] = await sql<{ id: number }>(dbFile, 'SELECT id FROM users WHERE email = ?', [demoEmail('entrant')]);
    const [machine] = await sql<{ id: number }>(dbFile, 'SELECT id FROM machines WHERE owner_id = ? LIMIT 1', [entrant.id]);
    const now = new Date().toISOString().replace('T', ' ').replace('Z', ' +00:00');
    await sql(dbFile, `INSERT INTO entries (season_id, class_id, entrant_id, machine_id, material_family, material_name, nozzle_mm, claimed_time_ms, evidence_url, notes, state, submitted_at, created_at, updated_at)
      VALUES (?, ?, ?, ?, 'pla', '', 0.4, 1500000, '', '', 'submitted', ?, ?, ?)`, [seasonId, classA, entrant.id, machine.id, now, now, now]);
    const frozen = await clients.organizer.put(`/api/organizer/seasons/${seasonId}/rules`, { rules: [rule('walls', 3)] });
    expect(frozen.status).toBe(409);
    const body = await frozen.json();
    expect(body.code).toBe('rules_frozen');
    expect(body.error).toMatch(/1 entry has been submitted/);
    expect(await sql(dbFile, 'SELECT COUNT(*) n FROM rules WHERE season_id = ?', [seasonId])).toEqual([{ n: 5 }]);
    // The test piece is frozen too.
    expect((await upload(clients.organizer, seasonId, 'cube.stl', toBinaryStl(cuboid('cube', [30, 30, 30])))).status).toBe(409);

    const ok = await clients.organizer.put(`/api/organizer/seasons/${seasonId}/rules`, { rules: [rule('walls', 3)], reinspect: true });
    expect(ok.status).toBe(200);
    const result = await ok.json();
    // The entry made by hand has no G-code: nothing to re-run, and the answer says so.
    expect(result.reinspection).toMatchObject({ queued: 0, withoutFile: 1 });
    const events = await sql<{ action: string }>(dbFile, "SELECT action FROM audit_events WHERE subject_id = ? AND action IN ('season.rules_saved', 'season.reinspect_requested') ORDER BY id", [String(seasonId)]);
    expect(events.map((e) => e.action)).toEqual(['season.rules_saved', 'season.rules_saved', 'season.reinspect_requested']);
  });

  it('re-inspection after a rule change re-runs the engine on entries with a G-code, under the new rules', async () => {
    // A draft entry with a real PrusaSlicer G-code of the Beacon, made through the entrant API.
    const [machine] = await sql<{ id: number }>(dbFile, "SELECT id FROM machines WHERE name = 'Quillwork 180'");
    const gcode = fs.readFileSync(path.resolve(__dirname, '..', 'fixtures', 'gcode', 'prusa-beacon-020.gcode.gz'));
    // Entries are taken only inside the published window: this season's opening date is moved to the past.
    await sql(dbFile, 'UPDATE seasons SET opens_at = ? WHERE id = ?', [new Date(Date.now() - 86_400_000).toISOString().replace('T', ' ').replace('Z', ' +00:00'), seasonId]);
    const f = new FormData();
    const fields = { seasonId: String(seasonId), classId: String(classA), machineId: String(machine.id), materialFamily: 'pla', materialName: 'Club grey', nozzleMm: '0.4', claimedTime: '0:25:10.0', evidenceUrl: 'https://video.example.org/run', measuredXMm: '20', measuredYMm: '20', measuredZMm: '20', notes: '' };
    for (const [k, v] of Object.entries(fields)) f.append(k, v);
    f.append('gcode', new Blob([new Uint8Array(gcode)]), 'beacon.gcode.gz');
    const created = await clients.entrant.request('/api/entries', { method: 'POST', body: f });
    expect(created.status, await created.clone().text()).toBeLessThan(300);
    const entryId = (await created.json()).id as number;
    const inspections = () => sql<{ id: number; status: string; rule_results: string }>(dbFile, 'SELECT id, status, rule_results FROM inspections WHERE entry_id = ? ORDER BY id', [entryId]);
    const settle = async (n: number) => {
      for (let i = 0; i < 480; i++) {
        const rows = await inspections();
        if (rows.length >= n && rows.every((r) => r.status === 'done' || r.status === 'failed')) return rows;
        await new Promise((r) => setTimeout(r, 250));
      }
      throw new Error('inspections did not finish');
    };
    const first = await settle(1);

    const res = await clients.organizer.put(`/api/organizer/seasons/${seasonId}/rules`, { rules: [rule('walls', 2), rule('objects', 1, { severity: 'advisory' })], reinspect: true });
    expect(res.status).toBe(200);
    expect((await res.json()).reinspection.queued).toBe(1);
    const after = await settle(first.length + 1);
    const latest = after[after.length - 1];
    expect(latest.status).toBe('done');
    const results = JSON.parse(latest.rule_results) as { rule: { metric: string; severity: string } }[];
    expect(results.map((r) => `${r.rule.metric}/${r.rule.severity}`)).toEqual(['walls/blocking', 'objects/advisory']);
  }, 180_000);

  it('judges: appoint an existing account (role granted, audited), refuse unknown addresses, invite by mail', async () => {
    // An account of its own: other files rely on the demo entrants having no judge role.
    const { email: sashaEmail } = await freshEntrant(base, dbFile, 'Judge To Be');
    const res = await clients.organizer.post(`/api/organizer/seasons/${seasonId}/judges`, { email: sashaEmail });
    expect(res.status).toBe(201);
    const [u] = await sql<{ id: number; roles: string }>(dbFile, 'SELECT id, roles FROM users WHERE email = ?', [sashaEmail]);
    expect(JSON.parse(u.roles)).toContain('judge');
    const roleAudit = await sql<{ details: string }>(dbFile, "SELECT details FROM audit_events WHERE action = 'user.roles_changed' AND subject_id = ? ORDER BY id DESC LIMIT 1", [String(u.id)]);
    expect(JSON.parse(roleAudit[0].details).reason).toContain(slug);
    const again = await clients.organizer.post(`/api/organizer/seasons/${seasonId}/judges`, { email: sashaEmail });
    expect(again.status).toBe(409);

    const unknown = await clients.organizer.post(`/api/organizer/seasons/${seasonId}/judges`, { email: 'nobody.here@example.org' });
    expect(unknown.status).toBe(404);
    expect((await unknown.json()).fields.email).toMatch(/send an invitation/);
    const badEmail = await clients.organizer.post(`/api/organizer/seasons/${seasonId}/invitations`, { email: 'not-an-address' });
    expect(badEmail.status).toBe(400);
    expect((await badEmail.json()).fields.email).toBeDefined();

    const invited = `judge.${stamp}@example.org`;
    const inv = await clients.organizer.post(`/api/organizer/seasons/${seasonId}/invitations`, { email: invited });
    expect(inv.status).toBe(201);
    const [mail] = await sql<{ subject: string; text: string }>(dbFile, 'SELECT subject, text FROM sent_mails WHERE "to" = ? ORDER BY id DESC LIMIT 1', [invited]);
    expect(mail.subject).toBe(`Invitation to judge Test season ${slug}`);
    const link = mail.text.match(/https?:\/\/\S+(\/invite\?token=[A-Za-z0-9_-]+)/)![1];
    // Anonymous: asked to sign in with the invited address. Someone else signed in: told it is not theirs.
    expect(await (await new Client(base).get(link)).text()).toContain('Sign in to accept');
    expect(await (await clients.judge.get(link)).text()).toMatch(/but this invitation is for/);
    expect(await (await new Client(base).get('/invite?token=' + 'x'.repeat(43))).text()).toContain('not valid');

    // Appointed to this season only; a judge of other seasons does not see it in their queue.
    const [row] = await sql(dbFile, 'SELECT COUNT(*) n FROM season_judges WHERE season_id = ? AND user_id = ?', [seasonId, u.id]);
    expect(row).toEqual({ n: 1 });
    const judgeQueue = await (await clients.judge.get('/api/judging/queue')).json();
    expect(judgeQueue.seasons.map((s: { slug: string }) => s.slug)).not.toContain(slug);

    const del = await clients.organizer.request(`/api/organizer/seasons/${seasonId}/judges/${u.id}`, { method: 'DELETE' });
    expect(del.status).toBe(200);
    expect(await sql(dbFile, 'SELECT COUNT(*) n FROM season_judges WHERE season_id = ? AND user_id = ?', [seasonId, u.id])).toEqual([{ n: 0 }]);
  });

  it('judging, then final is refused while an entry waits for review, then allowed; final freezes standings', async () => {
    expect((await clients.organizer.post(`/api/organizer/seasons/${seasonId}/transition`, { to: 'judging' })).status).toBe(200);
    const waiting = await clients.organizer.post(`/api/organizer/seasons/${seasonId}/transition`, { to: 'final' });
    expect(waiting.status).toBe(409);
    expect((await waiting.json()).error).toMatch(/1 entry still waits for review/);

    const dash = await (await clients.organizer.get('/api/organizer/seasons')).json();
    const mine = dash.seasons.find((s: { id: number }) => s.id === seasonId);
    expect(mine.entries.submitted).toBe(1);
    expect(mine.oldestWaiting.entrant).toBe('Juno Calloway');

    // Judges' load on the demo season, against the same figures counted straight from the tables.
    const frost = dash.seasons.find((s: { slug: string }) => s.slug === 'frostbite-sprint');
    const expected = await sql<{ name: string; waiting: number; reviews: number }>(dbFile, `
      SELECT u.name,
        (SELECT COUNT(*) FROM entries e WHERE e.season_id = sj.season_id AND e.state = 'submitted' AND e.entrant_id <> sj.user_id
           AND NOT EXISTS (SELECT 1 FROM entries c WHERE c.entrant_id = sj.user_id AND c.season_id = e.season_id AND c.class_id = e.class_id AND c.state <> 'withdrawn')) AS waiting,
        (SELECT COUNT(*) FROM reviews r JOIN entries e ON e.id = r.entry_id WHERE e.season_id = sj.season_id AND r.judge_id = sj.user_id) AS reviews
      FROM season_judges sj JOIN users u ON u.id = sj.user_id JOIN seasons s ON s.id = sj.season_id WHERE s.slug = 'frostbite-sprint' ORDER BY sj.created_at, u.id`);
    expect(frost.judges.map((j: { name: string; waiting: number; reviews: number }) => ({ name: j.name, waiting: j.waiting, reviews: j.reviews }))).toEqual(expected);
    // Tobin Reyes competes in Open · 0.4 mm: none of that class's waiting entries (his own included) count as his to review.
    const tobin = frost.judges.find((j: { name: string }) => j.name === 'Tobin Reyes');
    const outsideHisClass = await sql<{ n: number }>(dbFile, `SELECT COUNT(*) n FROM entries e JOIN seasons s ON s.id = e.season_id JOIN classes c ON c.id = e.class_id
      WHERE s.slug = 'frostbite-sprint' AND e.state = 'submitted' AND c.slug <> 'open-04'`);
    expect(tobin.waiting).toBe(Number(outsideHisClass[0].n));

    await sql(dbFile, "UPDATE entries SET state = 'verified' WHERE season_id = ?", [seasonId]);
    const fin = await clients.organizer.post(`/api/organizer/seasons/${seasonId}/transition`, { to: 'final' });
    expect(fin.status).toBe(200);
    const [s] = await sql<{ state: string; standings_frozen_at: string | null }>(dbFile, 'SELECT state, standings_frozen_at FROM seasons WHERE id = ?', [seasonId]);
    expect(s.state).toBe('final');
    expect(s.standings_frozen_at).not.toBeNull();
    expect(await sql(dbFile, 'SELECT rows FROM standings_freezes WHERE season_id = ?', [seasonId])).toEqual([{ rows: 1 }]);

    // Frozen: no rule change even with re-inspection, no class edits, no new judges.
    const rules = await clients.organizer.put(`/api/organizer/seasons/${seasonId}/rules`, { rules: [rule('walls', 4)], reinspect: true });
    expect(rules.status).toBe(409);
    expect((await rules.json()).error).toMatch(/final/);
    expect((await clients.organizer.post(`/api/organizer/seasons/${seasonId}/classes`, classBody('late'))).status).toBe(409);
    expect((await clients.organizer.post(`/api/organizer/seasons/${seasonId}/invitations`, { email: 'late@example.org' })).status).toBe(409);

    expect((await clients.organizer.post(`/api/organizer/seasons/${seasonId}/transition`, { to: 'archived' })).status).toBe(200);
    const back = await clients.organizer.post(`/api/organizer/seasons/${seasonId}/transition`, { to: 'open' });
    expect(back.status).toBe(409);
    expect((await back.json()).error).toMatch(/nothing follows/);
  });
});
