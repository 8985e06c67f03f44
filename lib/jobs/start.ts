/**
 * Starting the job pipeline in a server process (instrumentation.ts), a worker process
 * (scripts/worker.ts, `npm run worker`) or a script (the demo seed): clear temporary upload folders
 * a stopped server left, then run the queue — which resumes the queued jobs and the running ones
 * whose lease passed.
 *
 * SQLite: each server runs jobs itself (the SQL queue). PostgreSQL: servers only enqueue (pg-boss)
 * and worker processes run the jobs, unless HOTLAP_EMBEDDED_WORKER=1 runs one inside the server too.
 */
import fsp from 'node:fs/promises';
import { uploadTmpRoot } from '@/lib/uploads';
import { runInspectionJob } from '@/lib/entries/inspection';
import { jobSettings, type JobSettings } from './settings';
import { sqlInspectionQueue } from './sqlQueue';
import { bossInspectionQueue, enqueueWaiting, stopBoss } from './bossQueue';
import { runnerIdle, runnerSettled, startRunner, stopRunner } from './runner';
import { closePool } from './pool';
import type { JobClaim, JobQueue } from './queue';

function queueFor(settings: JobSettings): JobQueue {
  return settings.queue === 'pg-boss' ? bossInspectionQueue(settings) : sqlInspectionQueue(settings);
}

export async function startJobs(): Promise<void> {
  // Only this process writes here (one server per data folder): what is left is from a stopped one.
  await fsp.rm(uploadTmpRoot(), { recursive: true, force: true });
  const settings = jobSettings();
  if (settings.queue === 'pg-boss') {
    // Rows a stopped server committed but never sent go out now (workers sweep them too).
    await enqueueWaiting(settings, 'web').catch((err) => console.error('job queue', err));
    if (!settings.embeddedWorker) return;
  }
  startRunner(queueFor(settings), runInspectionJob, settings);
}

/** A worker process (`npm run worker`): runs jobs until stopWorker(). */
export function startWorker(): JobSettings {
  const settings = jobSettings();
  // One line per claim and per end: which process ran which attempt (operators, and the multi-machine test).
  const logged = async (claim: JobClaim) => {
    console.log(`worker ${process.pid}: inspection ${claim.id} attempt ${claim.attempt} claimed`);
    await runInspectionJob(claim);
    console.log(`worker ${process.pid}: inspection ${claim.id} attempt ${claim.attempt} ended`);
  };
  startRunner(queueFor(settings), logged, settings);
  return settings;
}

/** Stops taking jobs, waits for the running ones (up to `graceMs`), then ends the pool and the queue client. */
export async function stopWorker(graceMs: number): Promise<void> {
  await stopRunner();
  await Promise.race([runnerSettled(), new Promise((r) => setTimeout(r, graceMs).unref())]);
  await closePool();
  await stopBoss();
}

/** Scripts: run every waiting job to its end, then stop the runner and the pool threads. */
export async function drainJobs(): Promise<void> {
  const settings = jobSettings();
  startRunner(queueFor(settings), runInspectionJob, settings);
  try {
    await runnerIdle();
  } finally {
    await stopRunner();
    await closePool();
    await stopBoss();
  }
}
