/** The demo seed as `npm run demo` runs it: real fixture G-code inspected for every non-draft entry. */
import { describe, it, expect } from 'vitest';
import { execFileSync } from 'node:child_process';
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { sql } from '../support/db';

describe('demo seed with evidence', () => {
  it('inspects every demo entry that has a run, freezes the final season, and is idempotent', { timeout: 240_000 }, async () => {
    const dir = fs.mkdtempSync(path.join(os.tmpdir(), 'hotlap-demo-'));
    const run = () =>
      execFileSync(process.execPath, ['node_modules/tsx/dist/cli.mjs', 'scripts/seed.ts'], {
        env: { ...process.env, HOTLAP_DATA_DIR: dir, DATABASE_URL: '', HOTLAP_DEMO_EVIDENCE: '1' },
        encoding: 'utf8',
      });
    try {
      expect(run()).toContain('Added G-code, photos, inspections and reviews to 8 demo entries.');
      const db = path.join(dir, 'hotlap.sqlite');
      const rows = await sql<{ state: string; status: string; b: number; t: number }>(
        db,
        "SELECT e.state, i.status, i.blocking_failures AS b, i.estimated_time_s AS t FROM entries e JOIN inspections i ON i.entry_id = e.id",
      );
      expect(rows).toHaveLength(8);
      expect(rows.every((r) => r.status === 'done')).toBe(true);
      // Verified demo runs are the compliant fixtures: no blocking failure.
      expect(rows.filter((r) => r.state === 'verified').every((r) => r.b === 0)).toBe(true);
      // The rejected demo run is the 3-wall, 25 % file: it breaks the rulebook.
      expect(rows.find((r) => r.state === 'rejected')!.b).toBeGreaterThan(0);
      const frozen = await sql<{ n: number }>(db, "SELECT COUNT(*) AS n FROM standings_snapshots s JOIN seasons x ON x.id = s.season_id WHERE x.slug = 'leaf-fall-dash'");
      expect(frozen[0].n).toBe(2);
      expect(run()).toContain('already present');
      expect((await sql(db, 'SELECT id FROM inspections'))).toHaveLength(8);
    } finally {
      fs.rmSync(dir, { recursive: true, force: true });
    }
  });
});
