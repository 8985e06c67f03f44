/**
 * The inspection queue on PostgreSQL: pg-boss carries "inspect row N" to worker processes on any
 * number of machines (`npm run worker`); the inspections table stays the job record (status,
 * attempts, lease, error sentence), and every write to it stays conditional on the claim's attempt.
 *
 * How a job moves:
 *  - a web server commits the inspections row, then `enqueueWaiting()` sends one pg-boss job per
 *    row that can be taken (singleton key `inspection:<id>:<attempts>`, so sending twice is a no-op);
 *  - a worker fetches a job, claims the row with one conditional UPDATE (queued, or running with a
 *    passed lease and attempts left) and runs it under a lease it renews (runner.ts);
 *  - a worker killed mid-job (kill -9) stops renewing: once its lease passes, any worker's sweep
 *    (`expire()`, every poll) sends a job with the next attempt's key and another worker claims the
 *    row and runs it again; the killed worker's old pg-boss job, expired later by pg-boss, finds the
 *    row finished and is completed without doing anything. Results are written only by the current
 *    attempt, so nothing is written twice.
 *
 * Fairness: pg-boss fetches by priority, then age. A job's priority is minus its rank among its
 * entrant's waiting rows, so every entrant's first job runs before anyone's second: round-robin by
 * entrant, as in the SQL queue. (pg-boss has no per-group fairness of its own; this is computed when
 * the job is sent and not revised later.)
 */
import PgBoss from 'pg-boss';
import { QueryTypes } from 'sequelize';
import { databaseUrl, getSequelize } from '@/lib/db';
import type { JobClaim, JobQueue } from './queue';
import type { JobSettings } from './settings';
import { sqlInspectionQueue } from './sqlQueue';

export const INSPECTION_QUEUE = 'inspection';

/** The pg-boss job's payload: the inspection row to run. */
export interface InspectionJobData {
  inspectionId: number;
}

type BossHolder = { boss?: Promise<PgBoss>; role?: 'web' | 'worker' };
const BOSS_KEY = Symbol.for('hotlap.jobs.boss');
const holder = () => ((globalThis as unknown as Record<symbol, BossHolder>)[BOSS_KEY] ??= {});

/** pg-boss's expiry of an active job: past the inspection's time limit plus a lease (a killed worker's job is taken back by the lease sweep long before). */
export function bossExpireSeconds(s: Pick<JobSettings, 'timeLimitMs' | 'leaseMs'>): number {
  return Math.ceil((s.timeLimitMs + 2 * s.leaseMs) / 1000);
}

/**
 * The process's pg-boss client, started once. Web servers only send (no supervision, no cron);
 * workers also supervise (expire, archive). pg-boss creates its schema (`pgboss`) on first start.
 */
export function getBoss(settings: JobSettings, role: 'web' | 'worker'): Promise<PgBoss> {
  const h = holder();
  if (h.boss) return h.boss;
  h.role = role;
  h.boss = (async () => {
    const boss = new PgBoss({
      connectionString: databaseUrl(),
      max: role === 'worker' ? 4 : 2,
      supervise: role === 'worker' || settings.embeddedWorker,
      schedule: false,
      application_name: `hotlap-${role}`,
    });
    boss.on('error', (err) => console.error('pg-boss', err));
    await boss.start();
    await boss.createQueue(INSPECTION_QUEUE, {
      name: INSPECTION_QUEUE,
      // One created job per key: sending a row again while its job waits is a no-op.
      policy: 'short',
      retryLimit: settings.maxAttempts,
      retryDelay: Math.max(1, Math.round(settings.retryMs / 1000)),
      expireInSeconds: bossExpireSeconds(settings),
    });
    return boss;
  })();
  h.boss.catch(() => {
    if (holder().boss) holder().boss = undefined;
  });
  return h.boss;
}

export async function stopBoss(): Promise<void> {
  const h = holder();
  const b = h.boss;
  h.boss = undefined;
  if (b) await (await b).stop({ graceful: false, close: true, wait: true });
}

/**
 * Rows a worker could take now, with their rank among their entrant's waiting rows (1 = next), less
 * those whose attempt already has a job waiting or running (pg-boss's own table; its states order
 * created < retry < active).
 */
const WAITING_SQL = `
SELECT w.id AS "id", w.attempts AS "attempts", w.rank AS "rank" FROM (
  SELECT i.id, i.attempts, ROW_NUMBER() OVER (PARTITION BY e.entrant_id ORDER BY i.id) AS rank
  FROM inspections i JOIN entries e ON e.id = i.entry_id
  WHERE i.status = 'queued'
     OR (i.status = 'running' AND (i.lease_until IS NULL OR i.lease_until < :now) AND i.attempts < :maxAttempts)
) w
WHERE NOT EXISTS (SELECT 1 FROM pgboss.job j WHERE j.name = '${INSPECTION_QUEUE}' AND j.singleton_key = CONCAT('inspection:', w.id, ':', w.attempts) AND j.state <= 'active')
ORDER BY w.id
LIMIT 1000`;

/** Sends a pg-boss job for every row that can be taken and has none waiting; returns how many were new. */
export async function enqueueWaiting(settings: JobSettings, role: 'web' | 'worker', now = new Date()): Promise<number> {
  // Started first: its schema (read below) exists once it has.
  const boss = await getBoss(settings, role);
  const rows = await getSequelize().query<{ id: number; attempts: number; rank: string | number }>(WAITING_SQL, {
    replacements: { now, maxAttempts: settings.maxAttempts },
    type: QueryTypes.SELECT,
  });
  if (!rows.length) return 0;
  let sent = 0;
  for (const r of rows) {
    const id = await boss.send(INSPECTION_QUEUE, { inspectionId: Number(r.id) } satisfies InspectionJobData, {
      singletonKey: `inspection:${r.id}:${r.attempts}`,
      priority: 1 - Number(r.rank),
    });
    if (id) sent++;
  }
  return sent;
}

/** Claims one row by id: one conditional UPDATE, so of two workers holding jobs for it, one gets it. */
const CLAIM_SQL = `
UPDATE inspections SET status = 'running', attempts = attempts + 1, lease_until = :leaseUntil, error = NULL, updated_at = :now
WHERE id = :id AND attempts < :maxAttempts
  AND (status = 'queued' OR (status = 'running' AND (lease_until IS NULL OR lease_until < :now)))
RETURNING attempts AS "attempts"`;

export function bossInspectionQueue(settings: JobSettings): JobQueue & { done(claim: JobClaim): Promise<void> } {
  const sql = sqlInspectionQueue(settings);
  /** The pg-boss job each running claim came from, completed when the runner is done with it. */
  const jobs = new Map<number, string>();
  return {
    async claim(now) {
      const boss = await getBoss(settings, 'worker');
      // A fetched job whose row is finished or held by a live lease is completed and the next one tried.
      for (let tries = 0; tries < 20; tries++) {
        const [job] = await boss.fetch<InspectionJobData>(INSPECTION_QUEUE, { batchSize: 1 });
        if (!job) return null;
        const id = Number(job.data?.inspectionId);
        const rows = Number.isInteger(id)
          ? await getSequelize().query<{ attempts: number }>(CLAIM_SQL, {
              replacements: { id, now, leaseUntil: new Date(now.getTime() + settings.leaseMs), maxAttempts: settings.maxAttempts },
              type: QueryTypes.SELECT,
            })
          : [];
        if (!rows.length) {
          await boss.complete(INSPECTION_QUEUE, job.id);
          continue;
        }
        jobs.set(id, job.id);
        return { id, attempt: Number(rows[0].attempts) };
      }
      return null;
    },
    renew: (c, now) => sql.renew(c, now),
    release: (c, sentence, now) => sql.release(c, sentence, now),
    fail: (c, sentence) => sql.fail(c, sentence),
    async expire(now) {
      const n = await sql.expire(now);
      // The sweep: rows queued by a server that died before sending, and rows whose lease passed (a killed worker).
      await enqueueWaiting(settings, 'worker', now);
      return n;
    },
    pending: (now) => sql.pending(now),
    async done(c) {
      const jobId = jobs.get(c.id);
      jobs.delete(c.id);
      if (jobId) await (await getBoss(settings, 'worker')).complete(INSPECTION_QUEUE, jobId);
    },
  };
}
