/**
 * A rate-limiter-flexible store kept in the app's own database (table `rate_limits`), so every web
 * server that shares the database shares the counters. Each consume is ONE statement — an upsert
 * that adds to the points and returns the new total — so parallel requests from any number of
 * processes are all counted (no read-modify-write). `INSERT … ON CONFLICT (…) DO UPDATE … RETURNING`
 * is the same in SQLite (3.35+) and PostgreSQL (9.5+ for ON CONFLICT, RETURNING always), so the SQL
 * stays portable; times are plain integers (ms since the epoch).
 */
import { RateLimiterRes, type IRateLimiterStoreOptions } from 'rate-limiter-flexible';
import RateLimiterStoreAbstract from 'rate-limiter-flexible/lib/RateLimiterStoreAbstract';
import { QueryTypes } from 'sequelize';
import { getSequelize } from '@/lib/db';

export const LIMITS_TABLE = 'rate_limits';

interface Row {
  points: number | string;
  expire: number | string | null;
}

const num = (v: number | string | null) => (v === null ? null : Number(v));

export class RateLimiterDatabase extends RateLimiterStoreAbstract {
  constructor(opts: Omit<IRateLimiterStoreOptions, 'storeClient'>) {
    // The store reaches the database through lib/db's one connection; the option only has to be set.
    super({ ...opts, storeClient: 'sequelize' });
  }

  protected async _upsert(rlKey: string, points: number, msDuration: number, forceExpire = false): Promise<Row> {
    const now = Date.now();
    const expire = msDuration > 0 ? now + msDuration : null;
    const sql = forceExpire
      ? `INSERT INTO ${LIMITS_TABLE} (rl_key, points, expire) VALUES (?, ?, ?)
         ON CONFLICT (rl_key) DO UPDATE SET points = excluded.points, expire = excluded.expire
         RETURNING points, expire`
      : // An expired window starts again at these points; a live one adds to them.
        `INSERT INTO ${LIMITS_TABLE} (rl_key, points, expire) VALUES (?, ?, ?)
         ON CONFLICT (rl_key) DO UPDATE SET
           points = CASE WHEN ${LIMITS_TABLE}.expire IS NULL OR ${LIMITS_TABLE}.expire > ? THEN ${LIMITS_TABLE}.points + excluded.points ELSE excluded.points END,
           expire = CASE WHEN ${LIMITS_TABLE}.expire IS NULL OR ${LIMITS_TABLE}.expire > ? THEN ${LIMITS_TABLE}.expire ELSE excluded.expire END
         RETURNING points, expire`;
    const replacements = forceExpire ? [rlKey, points, expire] : [rlKey, points, expire, now, now];
    // Sequelize's SQLite dialect runs any statement that starts with "insert into" without reading
    // rows back (sqlite3's run), which drops the RETURNING row; a leading comment makes it read them.
    const rows = await getSequelize().query<Row>(`/* rate limit */ ${sql}`, { replacements, type: QueryTypes.SELECT });
    return rows[0];
  }

  protected async _get(rlKey: string): Promise<Row | null> {
    const rows = await getSequelize().query<Row>(`SELECT points, expire FROM ${LIMITS_TABLE} WHERE rl_key = ? AND (expire IS NULL OR expire > ?)`, {
      replacements: [rlKey, Date.now()],
      type: QueryTypes.SELECT,
    });
    return rows[0] ?? null;
  }

  protected async _delete(rlKey: string): Promise<boolean> {
    await getSequelize().query(`DELETE FROM ${LIMITS_TABLE} WHERE rl_key = ?`, { replacements: [rlKey] });
    return true;
  }

  protected _getRateLimiterRes(_rlKey: string, changedPoints: number, row: Row): RateLimiterRes {
    const points = Number(row.points);
    const expire = num(row.expire);
    return new RateLimiterRes(Math.max(this.points - points, 0), expire ? Math.max(expire - Date.now(), 0) : -1, points, changedPoints === points);
  }
}

/** Removes windows that ended (called now and then; an expired row is ignored anyway). */
export async function clearExpiredLimits(now = Date.now()) {
  await getSequelize().query(`DELETE FROM ${LIMITS_TABLE} WHERE expire IS NOT NULL AND expire < ?`, { replacements: [now] });
}

/** Deletes every key under a prefix (e.g. all of one account's sign-in windows after a reset). */
export async function deleteLimitKeys(prefix: string) {
  const escaped = prefix.replace(/[\\%_]/g, (c) => `\\${c}`);
  await getSequelize().query(`DELETE FROM ${LIMITS_TABLE} WHERE rl_key LIKE ? ESCAPE '\\'`, { replacements: [`${escaped}%`] });
}
