/**
 * Widens the standings change counter to everything the public entry page and answer show beyond
 * rankings: every machine detail (hotend, extruder, firmware, modifications, not only the name and
 * motion system), re-inspection notes, and the entry's photos. Public pages and answers are kept per
 * counter value (lib/standings/publicCache.ts, lib/standings/http.ts), so a write that skipped the
 * counter would leave an old page in place. Other uploads (G-code) do not touch the counter.
 */
import type { QueryInterface } from 'sequelize';
import { createTrigger, dropTrigger } from '../lib/dbDialect';

const BUMP = 'UPDATE standings_version SET version = version + 1 WHERE id = 1';

export const ENTRY_PAGE_TRIGGERS: [name: string, event: string, when?: string][] = [
  ['standings_bump_machines_upd_any', 'AFTER UPDATE ON machines'],
  ['standings_bump_entry_reinspections_ins', 'AFTER INSERT ON entry_reinspections'],
  ['standings_bump_entry_reinspections_upd', 'AFTER UPDATE ON entry_reinspections'],
  ['standings_bump_entry_reinspections_del', 'AFTER DELETE ON entry_reinspections'],
  ['standings_bump_stored_files_ins', 'AFTER INSERT ON stored_files', "NEW.kind = 'photo'"],
  ['standings_bump_stored_files_upd', 'AFTER UPDATE ON stored_files', "NEW.kind = 'photo' OR OLD.kind = 'photo'"],
  ['standings_bump_stored_files_del', 'AFTER DELETE ON stored_files', "OLD.kind = 'photo'"],
];

export async function up({ context: qi }: { context: QueryInterface }) {
  for (const [name, event, when] of ENTRY_PAGE_TRIGGERS) await createTrigger(qi, name, event, BUMP, when);
}

export async function down({ context: qi }: { context: QueryInterface }) {
  for (const [name, event] of ENTRY_PAGE_TRIGGERS) await dropTrigger(qi, name, event);
}
