/**
 * The standings change log: the triggers that bump `standings_version` for a ranking change also
 * append what changed (the entry with its entrant, season and class; an entrant's name; a machine)
 * to `standings_changes`, in the same statement's transaction, labelled with the counter value that
 * bump produced. A server holding a class's ranking at version v re-reads only the entrants named
 * in (v, now] (lib/standings/changes.ts) instead of re-ranking the whole class.
 *
 * The log keeps the changes of the newest STANDINGS_CHANGES_KEPT counter values (each logging
 * trigger deletes older rows); `standings_version.changes_from` is the counter value the log
 * started at. A reader whose ranking is older than either re-ranks the class in full.
 *
 * Also the index the ranking's "newest finished inspection of an entry" lookup walks:
 * inspections (entry_id, status, created_at, id).
 */
import type { QueryInterface } from 'sequelize';
import { createTrigger } from '../lib/dbDialect';

/** Counter values whose changes stay in the log. */
export const STANDINGS_CHANGES_KEPT = 5000;

const BUMP = 'UPDATE standings_version SET version = version + 1 WHERE id = 1';
const PRUNE = `DELETE FROM standings_changes WHERE version <= (SELECT version FROM standings_version WHERE id = 1) - ${STANDINGS_CHANGES_KEPT}`;
const COLUMNS = 'INSERT INTO standings_changes (version, kind, ref_id, entrant_id, season_id, class_id)';
/** An entry row (NEW/OLD of entries): its entrant in its season and class. */
const logEntry = (ref: 'NEW' | 'OLD', onlyIf = '') =>
  `${COLUMNS} SELECT v.version, 'entry', ${ref}.id, ${ref}.entrant_id, ${ref}.season_id, ${ref}.class_id FROM standings_version v WHERE v.id = 1${onlyIf}`;
/** An update's old row matters only when it named another entrant, season or class (none of them NULL). */
const MOVED = ' AND (OLD.entrant_id <> NEW.entrant_id OR OLD.season_id <> NEW.season_id OR OLD.class_id <> NEW.class_id)';
/** The entry an inspection row (NEW/OLD of inspections) belongs to. */
const logInspected = (ref: 'NEW' | 'OLD', onlyIf = '') =>
  `${COLUMNS} SELECT v.version, 'entry', e.id, e.entrant_id, e.season_id, e.class_id FROM standings_version v JOIN entries e ON e.id = ${ref}.entry_id WHERE v.id = 1${onlyIf}`;
const logRef = (kind: 'entrant' | 'machine') => `${COLUMNS} SELECT v.version, '${kind}', NEW.id, NULL, NULL, NULL FROM standings_version v WHERE v.id = 1`;

const verifiedEntry = (ref: 'NEW' | 'OLD') => `EXISTS (SELECT 1 FROM entries e WHERE e.id = ${ref}.entry_id AND e.state = 'verified')`;

/**
 * The ranking triggers of migrations …0402/…0403 (same names, events and conditions), each now
 * bumping the counter, logging, and pruning the log. Order matters: the log row reads the bumped value.
 */
export const LOGGING_TRIGGERS: [name: string, event: string, statements: string[], when?: string][] = [
  ['standings_bump_entries_ins', 'AFTER INSERT ON entries', [BUMP, logEntry('NEW'), PRUNE], "NEW.state = 'verified'"],
  ['standings_bump_entries_upd', 'AFTER UPDATE ON entries', [BUMP, logEntry('NEW'), logEntry('OLD', MOVED), PRUNE], "OLD.state = 'verified' OR NEW.state = 'verified'"],
  ['standings_bump_entries_del', 'AFTER DELETE ON entries', [BUMP, logEntry('OLD'), PRUNE], "OLD.state = 'verified'"],
  ['standings_bump_inspections_ins', 'AFTER INSERT ON inspections', [BUMP, logInspected('NEW'), PRUNE], verifiedEntry('NEW')],
  ['standings_bump_inspections_upd', 'AFTER UPDATE ON inspections', [BUMP, logInspected('NEW'), logInspected('OLD', ' AND OLD.entry_id <> NEW.entry_id'), PRUNE], `${verifiedEntry('NEW')} OR ${verifiedEntry('OLD')}`],
  ['standings_bump_inspections_del', 'AFTER DELETE ON inspections', [BUMP, logInspected('OLD'), PRUNE], verifiedEntry('OLD')],
  ['standings_bump_machines_upd', 'AFTER UPDATE OF name, motion_system ON machines', [BUMP, logRef('machine'), PRUNE]],
  ['standings_bump_users_upd', 'AFTER UPDATE OF name ON users', [BUMP, logRef('entrant'), PRUNE]],
];

export async function up({ context: qi }: { context: QueryInterface }) {
  const q = (sql: string) => qi.sequelize.query(sql);
  await qi.addIndex('inspections', ['entry_id', 'status', 'created_at', 'id'], { name: 'inspections_newest_done' });
  await q('CREATE TABLE IF NOT EXISTS standings_changes (version INTEGER NOT NULL, kind VARCHAR(16) NOT NULL, ref_id INTEGER NOT NULL, entrant_id INTEGER, season_id INTEGER, class_id INTEGER)');
  await q('CREATE INDEX IF NOT EXISTS standings_changes_version ON standings_changes (version)');
  await q('ALTER TABLE standings_version ADD COLUMN changes_from INTEGER');
  await q('UPDATE standings_version SET changes_from = version');
  for (const [name, event, statements, when] of LOGGING_TRIGGERS) await createTrigger(qi, name, event, statements.join('; '), when);
}

export async function down({ context: qi }: { context: QueryInterface }) {
  for (const [name, event, , when] of LOGGING_TRIGGERS) await createTrigger(qi, name, event, BUMP, when);
  await qi.removeColumn('standings_version', 'changes_from');
  await qi.sequelize.query('DROP TABLE IF EXISTS standings_changes');
  await qi.removeIndex('inspections', 'inspections_newest_done');
}
