/**
 * The few places where SQLite and PostgreSQL need different SQL, in one module. Everything else in
 * Hotlap is portable SQL (quoted snake_case names, `ON CONFLICT`, `CURRENT_TIMESTAMP`, aliased
 * subqueries) or goes through Sequelize. Which dialect: the connection's own (`getDialect()`).
 */
import { DataTypes, QueryTypes, type QueryInterface, type Sequelize } from 'sequelize';

type HasDialect = Pick<Sequelize, 'getDialect'>;

export function isPostgres(sequelize: HasDialect): boolean {
  return sequelize.getDialect() === 'postgres';
}

/** Column type for JSON documents: JSONB on PostgreSQL (indexable, compared by value), JSON text on SQLite. */
export function jsonColumnType(sequelize: HasDialect) {
  return isPostgres(sequelize) ? DataTypes.JSONB : DataTypes.JSON;
}

/**
 * A JSON column's value from a raw query row. SQLite returns the stored text; PostgreSQL's driver
 * has already parsed jsonb into an object.
 */
export function parseJsonColumn<T = unknown>(value: unknown): T | null {
  if (value === null || value === undefined) return null;
  return (typeof value === 'string' ? JSON.parse(value) : value) as T;
}

/** A date from a raw query row: SQLite returns text ('YYYY-MM-DD HH:MM:SS.sss +00:00'), PostgreSQL a Date. */
export function parseDateColumn(value: unknown): Date | null {
  if (value === null || value === undefined) return null;
  if (value instanceof Date) return value;
  if (typeof value === 'number') return new Date(value);
  const text = String(value);
  // SQLite's text form from Sequelize: '2026-12-03 18:00:00.000 +00:00'; CURRENT_TIMESTAMP: '2026-12-03 18:00:00' (UTC).
  const iso = text.replace(' ', 'T').replace(/ ?([+-]\d\d:\d\d)$/, '$1');
  return new Date(/[zZ]|[+-]\d\d:\d\d$/.test(iso) ? iso : `${iso}Z`);
}

/** The table a trigger event like 'AFTER UPDATE OF name ON users' fires on. */
function triggerTable(event: string): string {
  const m = /\bON\s+(\w+)\s*$/i.exec(event);
  if (!m) throw new Error(`No table in trigger event: ${event}`);
  return m[1];
}

/**
 * Creates (or replaces) a row trigger that runs `statement` (one SQL statement, no trailing `;`)
 * after `event` ('AFTER INSERT ON entries', 'AFTER UPDATE OF state ON seasons'), when `when` holds
 * (may use NEW/OLD and subqueries). SQLite: a CREATE TRIGGER … WHEN … BEGIN … END. PostgreSQL: a
 * plpgsql function of the same name (a trigger's WHEN cannot hold a subquery there, so the condition
 * is tested inside the function) and a FOR EACH ROW trigger that executes it.
 */
export async function createTrigger(qi: QueryInterface, name: string, event: string, statement: string, when?: string): Promise<void> {
  const q = (sql: string) => qi.sequelize.query(sql);
  await dropTrigger(qi, name, event);
  if (!isPostgres(qi.sequelize)) {
    await q(`CREATE TRIGGER ${name} ${event}${when ? ` WHEN ${when}` : ''} BEGIN ${statement}; END`);
    return;
  }
  const body = when ? `IF ${when} THEN ${statement}; END IF;` : `${statement};`;
  await q(`CREATE OR REPLACE FUNCTION ${name}_fn() RETURNS trigger LANGUAGE plpgsql AS $fn$ BEGIN ${body} RETURN NULL; END $fn$`);
  await q(`CREATE TRIGGER ${name} ${event} FOR EACH ROW EXECUTE FUNCTION ${name}_fn()`);
}

/** Drops a trigger made by createTrigger (and its function on PostgreSQL); `event` names the table. */
export async function dropTrigger(qi: QueryInterface, name: string, event: string): Promise<void> {
  if (!isPostgres(qi.sequelize)) {
    await qi.sequelize.query(`DROP TRIGGER IF EXISTS ${name}`);
    return;
  }
  await qi.sequelize.query(`DROP TRIGGER IF EXISTS ${name} ON ${triggerTable(event)}`);
  await qi.sequelize.query(`DROP FUNCTION IF EXISTS ${name}_fn()`);
}

/** Names of the triggers on the database (to prove they exist from the running database). */
export async function listTriggers(sequelize: Sequelize): Promise<string[]> {
  const sql = isPostgres(sequelize)
    ? `SELECT tgname AS "name" FROM pg_trigger WHERE NOT tgisinternal ORDER BY tgname`
    : `SELECT name AS "name" FROM sqlite_master WHERE type = 'trigger' ORDER BY name`;
  const rows = (await sequelize.query(sql, { type: QueryTypes.SELECT })) as unknown as { name: string }[];
  return rows.map((r) => r.name);
}

/**
 * The database's plan for a query, one line per step (SQLite: EXPLAIN QUERY PLAN's `detail`;
 * PostgreSQL: EXPLAIN's text lines). For tests and diagnostics that check an index is used.
 */
export async function explainPlan(sequelize: Sequelize, sql: string, replacements?: Record<string, unknown> | unknown[]): Promise<string[]> {
  const pg = isPostgres(sequelize);
  const rows = (await sequelize.query(`${pg ? 'EXPLAIN' : 'EXPLAIN QUERY PLAN'} ${sql}`, { type: QueryTypes.SELECT, replacements: replacements as never })) as unknown as Record<string, string>[];
  return rows.map((r) => (pg ? r['QUERY PLAN'] : r.detail));
}

/** SQL for the UTC calendar day ('YYYY-MM-DD') of a date column. SQLite keeps dates as UTC text. */
export function utcDaySql(sequelize: HasDialect, column: string): string {
  return isPostgres(sequelize) ? `to_char(${column} AT TIME ZONE 'UTC', 'YYYY-MM-DD')` : `substr(${column}, 1, 10)`;
}
