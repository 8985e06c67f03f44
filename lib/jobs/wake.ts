/**
 * "A job was queued" (called after the transaction that wrote the inspections row committed): wakes
 * this process's runner, and on PostgreSQL sends the row to the workers through pg-boss. A send that
 * fails is only logged: the row stays queued, and the workers' sweep sends it within a poll.
 */
import { wakeRunner } from './runner';
import { jobSettings } from './settings';
import { enqueueWaiting } from './bossQueue';

export function wakeJobs(): void {
  const settings = jobSettings();
  if (settings.queue !== 'pg-boss') return wakeRunner();
  void enqueueWaiting(settings, 'web')
    .then(() => wakeRunner())
    .catch((err) => console.error('job queue', err));
}
