/**
 * Background jobs in the web server process: a small FIFO queue (one job at a time — the machine
 * has two cores and the web server needs one) whose inspection jobs run the engine in a child
 * process (lib/jobs/inspect-worker.ts through tsx). The queue lives on globalThis so every route
 * bundle of the Next.js server shares it.
 */
import { spawn } from 'node:child_process';
import path from 'node:path';
import { tsRunArgs } from '@/lib/tsRun';
import { parseStoredInspection, type InspectOptions, type StoredInspectionJson } from '@/lib/inspection';

export const ENGINE_VERSION = 'hotlap-inspect-1';
/** A 200 MB file inspects in well under a minute here; ten minutes means something is stuck. */
export const INSPECTION_TIMEOUT_MS = 10 * 60_000;
/** Heap cap of the child: the engine streams, so this is headroom, not a need. */
const CHILD_HEAP_MB = 768;

type Job = { key: string; run: () => Promise<void> };
interface QueueState {
  pending: Job[];
  active: Set<string>;
  running: boolean;
}

const STATE_KEY = Symbol.for('hotlap.jobs.queue');
function state(): QueueState {
  const g = globalThis as unknown as Record<symbol, QueueState>;
  g[STATE_KEY] ??= { pending: [], active: new Set(), running: false };
  return g[STATE_KEY];
}

/** True while a job with this key is queued or running in this process. */
export function isQueued(key: string): boolean {
  return state().active.has(key);
}

/** Adds a job unless one with the same key is already queued or running. */
export function enqueue(key: string, run: () => Promise<void>): boolean {
  const s = state();
  if (s.active.has(key)) return false;
  s.active.add(key);
  s.pending.push({ key, run });
  void drain();
  return true;
}

async function drain() {
  const s = state();
  if (s.running) return;
  s.running = true;
  try {
    while (s.pending.length) {
      const job = s.pending.shift()!;
      try {
        await job.run();
      } catch (err) {
        console.error(`job ${job.key} failed`, err);
      } finally {
        s.active.delete(job.key);
      }
    }
  } finally {
    s.running = false;
  }
}

/** Resolves once nothing is queued or running (tests and scripts). */
export async function idle(): Promise<void> {
  while (state().active.size) await new Promise((r) => setTimeout(r, 50));
}

export class InspectionRunError extends Error {
  constructor(message: string, public readonly kind: 'unreadable' | 'crashed' | 'timeout') {
    super(message);
  }
}

/** Runs the inspection engine on `file` in a child process and returns its report and preview, checked against the contract. */
export function inspectInChild(file: string, options: InspectOptions): Promise<StoredInspectionJson> {
  const root = process.cwd();
  const worker = path.join(root, 'lib', 'jobs', 'inspect-worker.ts');
  return new Promise((resolve, reject) => {
    const child = spawn(process.execPath, [`--max-old-space-size=${CHILD_HEAP_MB}`, ...tsRunArgs(root), worker], {
      cwd: root,
      env: { PATH: process.env.PATH ?? '', NODE_ENV: 'production' },
      stdio: ['pipe', 'pipe', 'pipe'],
    });
    const out: Buffer[] = [];
    let err = '';
    let timedOut = false;
    const timer = setTimeout(() => {
      timedOut = true;
      child.kill('SIGKILL');
    }, INSPECTION_TIMEOUT_MS);
    child.stdout.on('data', (d: Buffer) => out.push(d));
    child.stderr.on('data', (d: Buffer) => {
      if (err.length < 4000) err += d.toString();
    });
    child.on('error', (e) => {
      clearTimeout(timer);
      reject(new InspectionRunError(`The inspection could not start: ${e.message}`, 'crashed'));
    });
    child.on('close', (code) => {
      clearTimeout(timer);
      if (timedOut) return reject(new InspectionRunError(`The inspection took longer than ${INSPECTION_TIMEOUT_MS / 60_000} minutes and was stopped.`, 'timeout'));
      if (code === 2) return reject(new InspectionRunError(err.trim().split('\n')[0] || 'The G-code could not be read.', 'unreadable'));
      if (code !== 0) return reject(new InspectionRunError(`The inspection stopped unexpectedly (exit ${code}). ${err.trim().split('\n')[0] ?? ''}`.trim(), 'crashed'));
      try {
        resolve(parseStoredInspection(JSON.parse(Buffer.concat(out).toString('utf8'))));
      } catch {
        reject(new InspectionRunError('The inspection produced no readable report.', 'crashed'));
      }
    });
    child.stdin.end(JSON.stringify({ file, options }));
  });
}
