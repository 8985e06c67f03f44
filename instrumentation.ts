/** Server start-up (Next.js calls register() once per server process). Each start-up task is one line into lib/. */
export async function register() {
  if (process.env.NEXT_RUNTIME !== 'nodejs' || process.env.NEXT_PHASE === 'phase-production-build') return;
  await (await import('./lib/jobs/start')).startJobs();
}
