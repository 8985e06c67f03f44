/**
 * Background jobs: inspections are rows of the inspections table (the job record: status,
 * attempts, lease, error), taken fairly across entrants by the runner of each server process
 * (runner.ts, started by instrumentation.ts through start.ts) and run in a pool of worker threads
 * (pool.ts) with memory and time limits. Nothing lives only in memory: a server that stops leaves
 * its jobs in the table, and the next one resumes them.
 */
export const ENGINE_VERSION = 'hotlap-inspect-1';
export { wakeJobs } from './wake';
export { InspectionRunError, inspectInPool } from './pool';
export { jobSettings, type JobSettings } from './settings';
export type { JobClaim, JobQueue } from './queue';
