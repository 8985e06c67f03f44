/**
 * Widens the standings change counter to everything the public season and standings answers show:
 * any edit of a season (name, dates, description, not only its state), its classes, rules and test
 * piece. The public API keeps built answers per counter value (lib/standings/publicCache.ts), so a
 * write that skipped the counter would leave an old answer in place.
 */
import type { QueryInterface } from 'sequelize';
import { createTrigger, dropTrigger } from '../lib/dbDialect';

const BUMP = 'UPDATE standings_version SET version = version + 1 WHERE id = 1';

export const PUBLIC_READ_TRIGGERS: [name: string, event: string][] = [
  ['standings_bump_seasons_upd', 'AFTER UPDATE ON seasons'],
  ['standings_bump_seasons_ins', 'AFTER INSERT ON seasons'],
  ['standings_bump_seasons_del', 'AFTER DELETE ON seasons'],
  ...(['classes', 'rules', 'test_pieces'] as const).flatMap((t): [string, string][] => [
    [`standings_bump_${t}_ins`, `AFTER INSERT ON ${t}`],
    [`standings_bump_${t}_upd`, `AFTER UPDATE ON ${t}`],
    [`standings_bump_${t}_del`, `AFTER DELETE ON ${t}`],
  ]),
];

export async function up({ context: qi }: { context: QueryInterface }) {
  for (const [name, event] of PUBLIC_READ_TRIGGERS) await createTrigger(qi, name, event, BUMP);
}

export async function down({ context: qi }: { context: QueryInterface }) {
  for (const [name, event] of PUBLIC_READ_TRIGGERS) await dropTrigger(qi, name, event);
  await createTrigger(qi, 'standings_bump_seasons_upd', 'AFTER UPDATE OF state ON seasons', BUMP);
}
