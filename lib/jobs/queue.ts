/**
 * The job queue as the runner sees it: claim fairly, hold a lease, finish or give back. The SQL
 * implementation (sqlQueue.ts) keeps the jobs in the inspections table; on PostgreSQL, bossQueue.ts
 * hands them to worker processes on other machines through pg-boss, the table staying the record.
 */

/** One job taken by this process: valid while `attempt` matches the row and the lease holds. */
export interface JobClaim {
  id: number;
  /** The row's attempts after this claim: writes are conditional on it, so a stale runner writes nothing. */
  attempt: number;
}

export interface JobQueue {
  /** Takes the next job, round-robin across entrants; null when nothing is waiting. */
  claim(now: Date): Promise<JobClaim | null>;
  /** Extends the lease of a running job; false when the job is no longer ours. */
  renew(claim: JobClaim, now: Date): Promise<boolean>;
  /** Gives a job back after a crash on our side: taken again after a pause growing with its attempts, until they run out. */
  release(claim: JobClaim, sentence: string, now: Date): Promise<void>;
  /** Fails a job for good with a sentence for the entrant. */
  fail(claim: JobClaim, sentence: string): Promise<boolean>;
  /** Fails jobs whose lease passed after their last allowed attempt; returns how many. */
  expire(now: Date): Promise<number>;
  /** Jobs queued or running with a live lease (tests, scripts). */
  pending(now: Date): Promise<number>;
  /** The runner is done with a claim, whatever its outcome (the pg-boss queue completes its job). */
  done?(claim: JobClaim): Promise<void>;
}
