/**
 * Narrows the standings change triggers to writes that can touch a ranking: only entries that are
 * or were verified, and inspections of verified entries. Drafts, submissions and the inspections
 * of entries still waiting for review no longer empty the ranking cache.
 */
import type { QueryInterface } from 'sequelize';
import { createTrigger } from '../lib/dbDialect';

const BUMP = 'UPDATE standings_version SET version = version + 1 WHERE id = 1';
const verifiedEntry = (ref: 'NEW' | 'OLD') => `EXISTS (SELECT 1 FROM entries e WHERE e.id = ${ref}.entry_id AND e.state = 'verified')`;

const NARROW: [name: string, event: string, when: string][] = [
  ['standings_bump_entries_ins', 'AFTER INSERT ON entries', "NEW.state = 'verified'"],
  ['standings_bump_entries_upd', 'AFTER UPDATE ON entries', "OLD.state = 'verified' OR NEW.state = 'verified'"],
  ['standings_bump_entries_del', 'AFTER DELETE ON entries', "OLD.state = 'verified'"],
  ['standings_bump_inspections_ins', 'AFTER INSERT ON inspections', verifiedEntry('NEW')],
  ['standings_bump_inspections_upd', 'AFTER UPDATE ON inspections', `${verifiedEntry('NEW')} OR ${verifiedEntry('OLD')}`],
  ['standings_bump_inspections_del', 'AFTER DELETE ON inspections', verifiedEntry('OLD')],
];

export async function up({ context: qi }: { context: QueryInterface }) {
  for (const [name, event, when] of NARROW) await createTrigger(qi, name, event, BUMP, when);
}

export async function down({ context: qi }: { context: QueryInterface }) {
  for (const [name, event] of NARROW) await createTrigger(qi, name, event, BUMP);
}
