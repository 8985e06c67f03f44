/**
 * Start-up work of the server process (Next.js calls register() once per server instance).
 * Only in the Node.js runtime: these need Node's server and the database driver.
 */
export async function register() {
  if (process.env.NEXT_RUNTIME !== 'nodejs') return;
  const { refuseForbiddenMethods } = await import('@/lib/security/forbiddenMethods');
  refuseForbiddenMethods();
  const { startOutbox } = await import('@/lib/mail');
  // Mail that a stopped server left pending goes out now; retries keep running in the background.
  startOutbox();
}
