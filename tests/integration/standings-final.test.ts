/** The organizer's move to `final` freezes the standings in the same step; later decisions do not move them. */
import { describe, it, expect, inject } from 'vitest';
import { Client } from '../support/client';
import { sql } from '../support/db';
import { DEMO_PASSWORD, demoEmail } from '../support/demo';
import { insertEntrant, insertEntry, insertMachine, insertSeason } from '../support/standings-fixtures';

const base = inject('baseUrl');
const db = inject('dbFile');

describe('publishing final standings', () => {
  it('the final transition snapshots every class; a later review changes nothing', async () => {
    const s = await insertSeason(db, { state: 'judging', classes: ['open', 'wide'] });
    const a = await insertEntrant(db, 'Jun Basalt');
    const b = await insertEntrant(db, 'Kit Basalt');
    const ma = await insertMachine(db, a, 'Basalt A');
    const mb = await insertMachine(db, b, 'Basalt B');
    const ea = await insertEntry(db, { seasonId: s.seasonId, classId: s.classIds.open, entrantId: a, machineId: ma, timeMs: 1_300_000, submittedAt: '2026-11-10T10:00:00Z', peak: 22 });
    await insertEntry(db, { seasonId: s.seasonId, classId: s.classIds.open, entrantId: b, machineId: mb, timeMs: 1_350_000, submittedAt: '2026-11-11T10:00:00Z', peak: 19 });
    await insertEntry(db, { seasonId: s.seasonId, classId: s.classIds.wide, entrantId: b, machineId: mb, timeMs: 1_150_000, submittedAt: '2026-11-12T10:00:00Z', peak: 33 });

    // Organizers manage the seasons they run: this one is the demo organizer's.
    await sql(db, "UPDATE seasons SET created_by_id = (SELECT id FROM users WHERE email = ?) WHERE id = ?", [demoEmail('organizer'), s.seasonId]);
    const organizer = new Client(base);
    expect((await organizer.signIn(demoEmail('organizer'), DEMO_PASSWORD)).status).toBe(200);
    const res = await organizer.post(`/api/organizer/seasons/${s.seasonId}/transition`, { to: 'final' });
    expect(res.status, await res.clone().text()).toBe(200);

    // The snapshot was written by the transition itself, before anyone read the standings.
    const snap = await sql<{ class_id: number; rank: number; entry_id: number }>(db, 'SELECT class_id, rank, entry_id FROM standings_snapshots WHERE season_id = ? ORDER BY class_id, rank', [s.seasonId]);
    expect(snap.map((r) => [r.class_id, r.rank])).toEqual([[s.classIds.open, 1], [s.classIds.open, 2], [s.classIds.wide, 1]]);
    expect(snap[0].entry_id).toBe(ea);

    const path = `/api/v1/seasons/${s.slug}/classes/open/standings`;
    const before = await (await fetch(base + path)).json();
    expect(before.frozen).toBe(true);
    await sql(db, "UPDATE entries SET state = 'rejected' WHERE id = ?", [ea]);
    const after = await (await fetch(base + path)).json();
    expect(after.rows).toEqual(before.rows);
    expect(after.rows.map((r: { entrant: string }) => r.entrant)).toEqual(['Jun Basalt', 'Kit Basalt']);
  });
});
