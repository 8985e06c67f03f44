/**
 * The job runner of one server process: takes jobs from a JobQueue while pool threads are free,
 * renews each running job's lease, and looks for work when woken (a new job) or every `pollMs`
 * (jobs another process queued, leases that passed). State lives on globalThis: Next.js loads
 * instrumentation.ts and each route in separate module graphs, and all must reach one runner.
 */
import type { JobClaim, JobQueue } from './queue';
import type { JobSettings } from './settings';

/** Runs one claimed job to its end: stores the result, or fails/releases it through the queue. */
export type JobHandler = (claim: JobClaim) => Promise<void>;

interface RunnerState {
  queue: JobQueue;
  handler: JobHandler;
  settings: JobSettings;
  active: Map<number, JobClaim>;
  pumping: boolean;
  again: boolean;
  timers: NodeJS.Timeout[];
  stopped: boolean;
  idleWaiters: (() => void)[];
}

const KEY = Symbol.for('hotlap.jobs.runner');
const g = globalThis as unknown as Record<symbol, RunnerState | undefined>;

export function startRunner(queue: JobQueue, handler: JobHandler, settings: JobSettings): void {
  if (g[KEY] && !g[KEY]!.stopped) return;
  const s: RunnerState = { queue, handler, settings, active: new Map(), pumping: false, again: false, timers: [], stopped: false, idleWaiters: [] };
  g[KEY] = s;
  const poll = setInterval(() => void pump(s), settings.pollMs);
  const heartbeat = setInterval(() => void renewAll(s), Math.max(250, Math.floor(settings.leaseMs / 3)));
  poll.unref();
  heartbeat.unref();
  s.timers.push(poll, heartbeat);
  void pump(s);
}

/** A job was queued: look now instead of at the next poll. No-op where no runner started (scripts). */
export function wakeRunner(): void {
  const s = g[KEY];
  if (s && !s.stopped) void pump(s);
}

/** Stops taking jobs; resolves once a look for work in flight ended (running jobs finish on their own). */
export async function stopRunner(): Promise<void> {
  const s = g[KEY];
  if (!s) return;
  s.stopped = true;
  for (const t of s.timers) clearInterval(t);
  while (s.pumping) await new Promise((r) => setTimeout(r, 10));
}

/** Resolves once the jobs this runner had started have ended (after stopRunner: a worker stopping). */
export async function runnerSettled(): Promise<void> {
  const s = g[KEY];
  while (s?.active.size) await new Promise((r) => setTimeout(r, 100));
}

/** Resolves once this runner has nothing running and the queue has nothing it could take. */
export async function runnerIdle(): Promise<void> {
  const s = g[KEY];
  if (!s || s.stopped) return;
  for (;;) {
    await pump(s);
    if (!s.active.size && !(await s.queue.pending(new Date()))) return;
    await new Promise<void>((r) => {
      s.idleWaiters.push(r);
      setTimeout(r, 250).unref();
    });
  }
}

async function renewAll(s: RunnerState) {
  for (const c of s.active.values()) {
    try {
      await s.queue.renew(c, new Date());
    } catch (err) {
      console.error('job lease', c.id, err);
    }
  }
}

async function pump(s: RunnerState): Promise<void> {
  if (s.stopped) return;
  if (s.pumping) {
    s.again = true;
    return;
  }
  s.pumping = true;
  try {
    do {
      s.again = false;
      await s.queue.expire(new Date());
      while (!s.stopped && s.active.size < s.settings.workers) {
        const claim = await s.queue.claim(new Date());
        if (!claim) break;
        s.active.set(claim.id, claim);
        void run(s, claim);
      }
    } while (s.again && !s.stopped);
  } catch (err) {
    console.error('job queue', err);
  } finally {
    s.pumping = false;
  }
}

async function run(s: RunnerState, claim: JobClaim) {
  try {
    // Test-only: a slow job, so a test can kill the process running it (the lease keeps being renewed meanwhile).
    if (s.settings.testDelayMs) await new Promise((r) => setTimeout(r, s.settings.testDelayMs));
    await s.handler(claim);
  } catch (err) {
    console.error('job', claim.id, err);
    await s.queue.release(claim, 'The inspection stopped unexpectedly on our side; it will be tried again.', new Date()).catch(() => undefined);
  } finally {
    await s.queue.done?.(claim).catch((err) => console.error('job done', claim.id, err));
    s.active.delete(claim.id);
    for (const w of s.idleWaiters.splice(0)) w();
    if (!s.stopped) void pump(s);
  }
}
