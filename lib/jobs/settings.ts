/**
 * The job pipeline's settings, one place: read from the environment once per call so tests and
 * deployments can tighten them. Defaults suit this two-core machine.
 */
import path from 'node:path';
import { GCODE_MAX_BYTES } from '@/lib/entries/files';

function intEnv(name: string, fallback: number, min = 1): number {
  const raw = process.env[name];
  const n = raw === undefined || raw === '' ? NaN : Number(raw);
  return Number.isInteger(n) && n >= min ? n : fallback;
}

export interface JobSettings {
  /** Inspections at once (pool threads). One leaves the other core to the web server. */
  workers: number;
  /** A job past this is stopped and fails with a sentence. A 200 MB file takes well under a minute here. */
  timeLimitMs: number;
  /** Heap cap of a pool thread (worker resourceLimits): the engine streams, so this is headroom. */
  heapMb: number;
  /**
   * Points in the judges' toolpath preview built by a job. The largest fixture's preview has about
   * 38 000 (270 KB of JSON); 400 000 keeps ten times that, and keeps a 200 MB upload's preview near
   * 3 MB instead of the engine's 3 M-point default (21.6 MB, ~400 MB of server memory to clone,
   * check and store — measured with scripts/bench-entry-upload-memory.ts).
   */
  previewMaxPoints: number;
  /** Gzip input may inflate to at most this: four times the upload limit. */
  maxInflatedBytes: number;
  /** A running job's lease: renewed every third of it; a job whose lease passed is taken again. */
  leaseMs: number;
  /** A job started this many times without finishing (its server died each time) fails. */
  maxAttempts: number;
  /** A job that crashed on our side is taken again after this × its attempts (a broken worker does not burn them at once). */
  retryMs: number;
  /** How often an idle runner looks for queued or expired jobs (other processes may add them). */
  pollMs: number;
  /** Re-inspections an entrant may ask for per window. */
  reinspectLimit: number;
  reinspectWindowMs: number;
  /** The compiled worker (npm run build:engine). */
  workerFile: string;
  /**
   * Where jobs go: `sql` (the inspections table, run by the runner embedded in each server) on
   * SQLite; `pg-boss` on PostgreSQL (run by `npm run worker` processes; servers only enqueue).
   */
  queue: 'sql' | 'pg-boss';
  /** Also run jobs inside the web server on PostgreSQL (HOTLAP_EMBEDDED_WORKER=1): one machine, no separate worker. */
  embeddedWorker: boolean;
  /** Test-only (HOTLAP_TEST_JOB_DELAY_MS): wait this long before running each claimed job. 0 in production. */
  testDelayMs: number;
}

/** PostgreSQL when DATABASE_URL is a postgres:// (or postgresql://) URL. */
export function usesPostgres(url = process.env.DATABASE_URL ?? ''): boolean {
  return /^postgres(ql)?:\/\//i.test(url);
}

export function jobSettings(): JobSettings {
  return {
    workers: intEnv('HOTLAP_INSPECTION_WORKERS', 1),
    timeLimitMs: intEnv('HOTLAP_INSPECTION_TIME_LIMIT_MS', 10 * 60_000),
    heapMb: intEnv('HOTLAP_INSPECTION_HEAP_MB', 512, 64),
    previewMaxPoints: intEnv('HOTLAP_PREVIEW_MAX_POINTS', 400_000),
    maxInflatedBytes: intEnv('HOTLAP_INSPECTION_MAX_INFLATED_BYTES', 4 * GCODE_MAX_BYTES),
    leaseMs: intEnv('HOTLAP_JOB_LEASE_MS', 60_000, 1000),
    maxAttempts: intEnv('HOTLAP_JOB_MAX_ATTEMPTS', 3),
    retryMs: intEnv('HOTLAP_JOB_RETRY_MS', 30_000, 0),
    pollMs: intEnv('HOTLAP_JOB_POLL_MS', 5_000, 100),
    reinspectLimit: intEnv('HOTLAP_REINSPECT_LIMIT', 6),
    reinspectWindowMs: intEnv('HOTLAP_REINSPECT_WINDOW_MS', 10 * 60_000),
    workerFile: process.env.HOTLAP_INSPECT_WORKER || path.join(process.cwd(), '.hotlap', 'engine', 'inspect-worker.cjs'),
    queue: usesPostgres() ? 'pg-boss' : 'sql',
    embeddedWorker: process.env.HOTLAP_EMBEDDED_WORKER === '1',
    testDelayMs: intEnv('HOTLAP_TEST_JOB_DELAY_MS', 0, 0),
  };
}
