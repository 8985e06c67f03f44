/**
 * The inspection pool: piscina worker threads running the compiled worker
 * (.hotlap/engine/inspect-worker.cjs), each with a heap cap, each task with a time limit. Threads die
 * with the server process, so a killed server leaves no inspection running behind it.
 */
import fs from 'node:fs';
import { Piscina } from 'piscina';
import { parseStoredInspection, type InspectOptions, type StoredInspectionJson } from '@/lib/inspection';
import type { InspectTask, InspectTaskResult } from './inspect-worker';
import { jobSettings, type JobSettings } from './settings';
import { storageEnv } from '@/lib/storage';

export class InspectionRunError extends Error {
  constructor(
    message: string,
    /** unreadable: the entrant's file; timeout/memory: a limit; crashed: ours. Only `crashed` is retried. */
    public readonly kind: 'unreadable' | 'crashed' | 'timeout' | 'memory',
  ) {
    super(message);
    this.name = 'InspectionRunError';
  }
}

const POOL_KEY = Symbol.for('hotlap.jobs.pool');
type PoolHolder = { pool?: Piscina; file?: string; storage?: string };
const holder = () => ((globalThis as unknown as Record<symbol, PoolHolder>)[POOL_KEY] ??= {});

function pool(s: JobSettings): Piscina {
  const h = holder();
  const storage = JSON.stringify(storageEnv());
  if (h.pool && h.file === s.workerFile && h.storage === storage) return h.pool;
  // Settings changed (tests): the old threads finish what they run and go.
  void h.pool?.destroy();
  h.storage = storage;
  if (!fs.existsSync(s.workerFile)) throw new InspectionRunError(`The inspection worker is not built (${s.workerFile}); run npm run build:engine.`, 'crashed');
  h.file = s.workerFile;
  h.pool = new Piscina({
    filename: s.workerFile,
    minThreads: 0,
    maxThreads: s.workers,
    // A thread that sat idle a minute is let go: the server's memory returns to what pages need.
    idleTimeout: 60_000,
    resourceLimits: { maxOldGenerationSizeMb: s.heapMb, maxYoungGenerationSizeMb: 32 },
    // The worker reads only what its task says and the storage it reads from (lib/storage's
    // variables, credentials included when storage is S3); nothing else of the server's environment.
    env: { NODE_ENV: process.env.NODE_ENV ?? 'production', ...storageEnv() },
  });
  return h.pool;
}

/** The limits a pool thread runs under, as the thread reads them (tests). */
export async function poolThreadLimits(settings: JobSettings = jobSettings()) {
  return (await pool(settings).run(null, { name: 'threadLimits' })) as ReturnType<typeof import('./inspect-worker').threadLimits>;
}

/**
 * Runs one inspection of the stored G-code under `key` (lib/storage) in the pool and returns its
 * report and preview, checked against the report contract; rejects with InspectionRunError whose
 * message is a sentence for the entrant.
 */
export async function inspectInPool(key: string, options: InspectOptions, settings: JobSettings = jobSettings()): Promise<StoredInspectionJson> {
  const task: InspectTask = { key, options, maxInflatedBytes: settings.maxInflatedBytes, previewMaxPoints: settings.previewMaxPoints };
  const signal = AbortSignal.timeout(settings.timeLimitMs);
  let result: InspectTaskResult;
  try {
    result = (await pool(settings).run(task, { signal })) as InspectTaskResult;
  } catch (err) {
    if (err instanceof InspectionRunError) throw err;
    if (signal.aborted) throw new InspectionRunError(`The inspection took longer than ${limitText(settings.timeLimitMs)} and was stopped: check that the file is one print's G-code, or ask the organizers.`, 'timeout');
    const e = err as NodeJS.ErrnoException;
    if (e?.code === 'ERR_WORKER_OUT_OF_MEMORY') throw new InspectionRunError(`The inspection needed more than ${settings.heapMb} MB of memory and was stopped.`, 'memory');
    console.error('inspection worker', err);
    throw new InspectionRunError('The inspection stopped unexpectedly on our side; it will be tried again.', 'crashed');
  }
  if (!result.ok) throw new InspectionRunError(result.reason, 'unreadable');
  try {
    return parseStoredInspection(result.stored);
  } catch (err) {
    console.error('inspection report contract', err);
    throw new InspectionRunError('The inspection produced a report we could not read; it will be tried again.', 'crashed');
  }
}

function limitText(ms: number): string {
  if (ms < 1000) return `${ms} ms`;
  return ms >= 60_000 && ms % 60_000 === 0 ? `${ms / 60_000} minute${ms === 60_000 ? '' : 's'}` : `${Math.round(ms / 100) / 10} s`;
}

/** Ends the pool's threads (scripts, before they exit). */
export async function closePool(): Promise<void> {
  const h = holder();
  const p = h.pool;
  h.pool = undefined;
  await p?.destroy();
}
