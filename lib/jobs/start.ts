/**
 * Starting the job pipeline in a server process (instrumentation.ts) or a script (the demo seed):
 * clear temporary upload folders a stopped server left, then run the queue — which resumes the
 * queued jobs and the running ones whose lease passed.
 */
import fsp from 'node:fs/promises';
import { uploadTmpRoot } from '@/lib/uploads';
import { runInspectionJob } from '@/lib/entries/inspection';
import { jobSettings } from './settings';
import { sqlInspectionQueue } from './sqlQueue';
import { runnerIdle, startRunner, stopRunner } from './runner';
import { closePool } from './pool';

export async function startJobs(): Promise<void> {
  // Only this process writes here (one server per data folder): what is left is from a stopped one.
  await fsp.rm(uploadTmpRoot(), { recursive: true, force: true });
  const settings = jobSettings();
  startRunner(sqlInspectionQueue(settings), runInspectionJob, settings);
}

/** Scripts: run every waiting job to its end, then stop the runner and the pool threads. */
export async function drainJobs(): Promise<void> {
  const settings = jobSettings();
  startRunner(sqlInspectionQueue(settings), runInspectionJob, settings);
  try {
    await runnerIdle();
  } finally {
    await stopRunner();
    await closePool();
  }
}
