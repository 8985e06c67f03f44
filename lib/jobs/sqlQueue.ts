/**
 * The inspection queue in SQL: the inspections table is the job record (status, attempts,
 * lease_until, error). A claim is a conditional update inside the database's write lock (SQLite:
 * BEGIN IMMEDIATE, lib/db.ts) or on a row locked as it was chosen (PostgreSQL: FOR UPDATE SKIP
 * LOCKED), so two runners never take the same job.
 *
 * Fairness: the next job belongs to the entrant served least recently (by `claim_seq`, a counter
 * each claim takes the next value of), oldest job first: round-robin by entrant, so one entrant's
 * twenty uploads are interleaved with everyone else's one instead of running before them.
 */
import { Op, QueryTypes } from 'sequelize';
import { getSequelize } from '@/lib/db';
import { isPostgres } from '@/lib/dbDialect';
import { Inspection } from '@/models';
import type { JobClaim, JobQueue } from './queue';
import type { JobSettings } from './settings';

/** A job that may be claimed: queued, or running under a lease that passed with attempts left. */
const CLAIMABLE = `(i.status = 'queued' OR (i.status = 'running' AND (i.lease_until IS NULL OR i.lease_until < :now) AND i.attempts < :maxAttempts))`;

/**
 * The next job. On PostgreSQL several processes claim at once: the row is locked as it is chosen
 * (FOR UPDATE OF i SKIP LOCKED), so a second claimer passes over it to the next job instead of
 * waiting for it. SQLite has one writer at a time (BEGIN IMMEDIATE), so no row lock is needed there.
 */
const nextJobSql = (postgres: boolean) => `
WITH waiting AS (
  SELECT i.id, e.entrant_id FROM inspections i JOIN entries e ON e.id = i.entry_id WHERE ${CLAIMABLE}
), served AS (
  SELECT e.entrant_id, MAX(i.claim_seq) AS last_seq FROM inspections i JOIN entries e ON e.id = i.entry_id
  WHERE e.entrant_id IN (SELECT entrant_id FROM waiting) GROUP BY e.entrant_id
)
${
  postgres
    ? `SELECT i.id FROM inspections i JOIN entries e ON e.id = i.entry_id LEFT JOIN served s ON s.entrant_id = e.entrant_id
WHERE ${CLAIMABLE} ORDER BY COALESCE(s.last_seq, 0), i.id LIMIT 1 FOR UPDATE OF i SKIP LOCKED`
    : `SELECT w.id FROM waiting w LEFT JOIN served s ON s.entrant_id = w.entrant_id ORDER BY COALESCE(s.last_seq, 0), w.id LIMIT 1`
}`;

export function sqlInspectionQueue(settings: Pick<JobSettings, 'leaseMs' | 'maxAttempts' | 'retryMs'>): JobQueue {
  const leaseFrom = (now: Date) => new Date(now.getTime() + settings.leaseMs);
  const mine = (c: JobClaim) => ({ id: c.id, status: 'running', attempts: c.attempt });
  return {
    async claim(now) {
      return getSequelize().transaction(async (transaction) => {
        const rows = await getSequelize().query<{ id: number }>(nextJobSql(isPostgres(getSequelize())), { replacements: { now, maxAttempts: settings.maxAttempts }, type: QueryTypes.SELECT, transaction });
        if (!rows.length) return null;
        const id = rows[0].id;
        const [n] = await Inspection.update(
          {
            status: 'running',
            attempts: getSequelize().literal('attempts + 1') as unknown as number,
            claimSeq: getSequelize().literal('(SELECT COALESCE(MAX(claim_seq), 0) + 1 FROM inspections)') as unknown as number,
            leaseUntil: leaseFrom(now),
            error: null,
          },
          // The same test as the choice, where the row is written: a job that reached its last attempt is not started again.
          {
            where: {
              id,
              [Op.or]: [
                { status: 'queued' },
                { status: 'running', attempts: { [Op.lt]: settings.maxAttempts }, [Op.or]: [{ leaseUntil: null }, { leaseUntil: { [Op.lt]: now } }] },
              ],
            },
            transaction,
          },
        );
        if (!n) return null;
        const row = await Inspection.findByPk(id, { attributes: ['id', 'attempts'], transaction });
        return { id, attempt: row!.attempts };
      });
    },
    async renew(c, now) {
      const [n] = await Inspection.update({ leaseUntil: leaseFrom(now) }, { where: mine(c) });
      return n > 0;
    },
    async release(c, sentence, now) {
      // Still `running`, its lease ending after the pause: claim() takes it again then; expire() fails it after the last attempt.
      await Inspection.update({ leaseUntil: new Date(now.getTime() + settings.retryMs * c.attempt), error: sentence }, { where: mine(c) });
    },
    async fail(c, sentence) {
      const [n] = await Inspection.update({ status: 'failed', error: sentence, leaseUntil: null, finishedAt: new Date() }, { where: mine(c) });
      return n > 0;
    },
    async expire(now) {
      const [n] = await Inspection.update(
        {
          status: 'failed',
          leaseUntil: null,
          finishedAt: now,
          error: `The inspection was started ${settings.maxAttempts} times and never finished; use "Inspect again", and if it stops again, tell the organizers.`,
        },
        { where: { status: 'running', attempts: { [Op.gte]: settings.maxAttempts }, [Op.or]: [{ leaseUntil: null }, { leaseUntil: { [Op.lt]: now } }] } },
      );
      return n;
    },
    async pending(now) {
      // Queued, running under a live lease, or running with attempts left (taken again once the lease passes).
      return Inspection.count({ where: { [Op.or]: [{ status: 'queued' }, { status: 'running', leaseUntil: { [Op.gte]: now } }, { status: 'running', attempts: { [Op.lt]: settings.maxAttempts } }] } });
    },
  };
}
