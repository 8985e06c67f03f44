/**
 * A change counter for the standings cache: triggers bump it on every write that can move a rank
 * or change a published figure (entries, inspections, machine and entrant names, season state), so
 * readers recompute a class's ranking only after something changed — whoever wrote it.
 */
import type { QueryInterface } from 'sequelize';
import { createTrigger, dropTrigger } from '../lib/dbDialect';

export const STANDINGS_TRIGGERS: [name: string, event: string][] = [
  ['standings_bump_entries_ins', 'AFTER INSERT ON entries'],
  ['standings_bump_entries_upd', 'AFTER UPDATE ON entries'],
  ['standings_bump_entries_del', 'AFTER DELETE ON entries'],
  ['standings_bump_inspections_ins', 'AFTER INSERT ON inspections'],
  ['standings_bump_inspections_upd', 'AFTER UPDATE ON inspections'],
  ['standings_bump_inspections_del', 'AFTER DELETE ON inspections'],
  ['standings_bump_machines_upd', 'AFTER UPDATE OF name, motion_system ON machines'],
  ['standings_bump_users_upd', 'AFTER UPDATE OF name ON users'],
  ['standings_bump_seasons_upd', 'AFTER UPDATE OF state ON seasons'],
];

export async function up({ context: qi }: { context: QueryInterface }) {
  const q = (sql: string) => qi.sequelize.query(sql);
  await q('CREATE TABLE IF NOT EXISTS standings_version (id INTEGER PRIMARY KEY CHECK (id = 1), version INTEGER NOT NULL)');
  await q('INSERT INTO standings_version (id, version) VALUES (1, 0) ON CONFLICT DO NOTHING');
  for (const [name, event] of STANDINGS_TRIGGERS) {
    await createTrigger(qi, name, event, 'UPDATE standings_version SET version = version + 1 WHERE id = 1');
  }
}

export async function down({ context: qi }: { context: QueryInterface }) {
  for (const [name, event] of STANDINGS_TRIGGERS) await dropTrigger(qi, name, event);
  await qi.sequelize.query('DROP TABLE IF EXISTS standings_version');
}
