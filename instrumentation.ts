/**
 * Start-up work of the server process (Next.js calls register() once per server instance).
 * Only in the Node.js runtime (these need Node's server and the database driver), never while
 * building. Each start-up task is one line into lib/.
 */
export async function register() {
  if (process.env.NEXT_RUNTIME !== 'nodejs' || process.env.NEXT_PHASE === 'phase-production-build') return;
  // TRACE/TRACK and kept public answers, at the HTTP server ahead of Next.js (see lib/server/front.ts).
  (await import('@/lib/server/front')).installFront();
  // Mail that a stopped server left pending goes out now; retries keep running in the background.
  (await import('@/lib/mail')).startOutbox();
  // Inspections: SQLite runs them here; PostgreSQL only enqueues (workers run them: npm run worker),
  // unless HOTLAP_EMBEDDED_WORKER=1.
  await (await import('@/lib/jobs/start')).startJobs();
}
