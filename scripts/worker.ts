/**
 * An inspection worker process: `npm run worker` (built by `npm run build:engine` into
 * .hotlap/engine/worker.cjs and run with plain node). Start any number, on any machines that reach
 * the database (DATABASE_URL) and the storage; each claims inspection jobs, runs them in its pool of
 * threads (HOTLAP_INSPECTION_WORKERS) and writes results only while its claim is current.
 *
 * On PostgreSQL the jobs come through pg-boss; on SQLite (one machine) the worker takes them from the
 * inspections table beside the servers' own runners. SIGTERM/SIGINT: stop taking jobs, let the
 * running ones finish (up to HOTLAP_WORKER_GRACE_MS), exit. A worker killed outright loses nothing:
 * its jobs are taken again by another once their lease passes.
 */
import { startWorker, stopWorker } from '@/lib/jobs/start';

function main() {
  const settings = startWorker();
  const where = settings.queue === 'pg-boss' ? 'pg-boss on PostgreSQL' : 'the SQL queue (SQLite)';
  console.log(`hotlap worker ${process.pid}: inspection jobs from ${where}, ${settings.workers} thread(s), lease ${settings.leaseMs} ms`);
  let stopping = false;
  const stop = (signal: string) => {
    if (stopping) return;
    stopping = true;
    const graceMs = Number(process.env.HOTLAP_WORKER_GRACE_MS) || 30_000;
    console.log(`hotlap worker ${process.pid}: ${signal}, finishing running jobs (up to ${graceMs} ms)`);
    stopWorker(graceMs)
      .catch((err) => console.error('worker stop', err))
      .finally(() => process.exit(0));
  };
  process.on('SIGTERM', () => stop('SIGTERM'));
  process.on('SIGINT', () => stop('SIGINT'));
}

main();
