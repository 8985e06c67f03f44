/**
 * Starts the built app (`next start`) on a free port with a fresh database, migrated and seeded with
 * the demo data: a SQLite file, or — when the integration global setup started a PostgreSQL cluster
 * (HOTLAP_TEST_DB=postgres sets HOTLAP_TEST_PG_URL) — a new database on that cluster. Used by the
 * integration tests and by Playwright. Needs `next build` first.
 */
import { spawn, execFileSync, type ChildProcess } from 'node:child_process';
import fs from 'node:fs';
import path from 'node:path';
import os from 'node:os';
import crypto from 'node:crypto';
import { createDatabase } from './postgres';
import { testStorageEnv } from './storage';

export interface TestServer {
  url: string;
  dbFile: string;
  dataDir: string;
  env: Record<string, string>;
  stop(): Promise<void>;
}

const ROOT = path.resolve(__dirname, '..', '..');

/** The database of a test server in `dataDir`: a SQLite file there, or a database named after the folder on the test cluster. */
export function testDatabaseUrl(dataDir: string): string {
  const cluster = process.env.HOTLAP_TEST_PG_URL;
  if (!cluster) return `sqlite:${path.join(dataDir, 'hotlap.sqlite')}`;
  return `${cluster}/${path.basename(dataDir).toLowerCase().replace(/[^a-z0-9]/g, '_')}`;
}

/**
 * What tests/support/db.ts `sql()` opens for a test server: the SQLite file, or the postgres:// URL.
 * (Named dbFile in the tests from the SQLite-only days.)
 */
export function testDb(env: Record<string, string>): string {
  const url = env.DATABASE_URL;
  return url.startsWith('sqlite:') ? url.slice('sqlite:'.length) : url;
}

/**
 * The data folder (uploads) of the test server whose database is `db` (what testDb returned). On
 * PostgreSQL the database is named after the folder, made by startServer in the temp folder.
 */
export function dataDirOf(db: string): string {
  if (!/^postgres(ql)?:\/\//.test(db)) return path.dirname(db);
  return path.join(os.tmpdir(), new URL(db).pathname.slice(1).replace(/_/g, '-'));
}

export function testEnv(port: number, dataDir: string): Record<string, string> {
  return {
    DATABASE_URL: testDatabaseUrl(dataDir),
    HOTLAP_DATA_DIR: dataDir,
    NEXTAUTH_URL: `http://127.0.0.1:${port}`,
    APP_URL: `http://127.0.0.1:${port}`,
    NEXTAUTH_SECRET: 'test-secret-not-for-production-0123456789',
    // Cheaper bcrypt keeps the suite quick; production uses cost 12 (lib/auth/password.ts).
    BCRYPT_COST: '6',
    // Lets each test act from its own client address (X-Forwarded-For), as behind a proxy.
    TRUST_PROXY: '1',
    SMTP_URL: '',
    HOTLAP_DEMO_EVIDENCE: '0',
    // On PostgreSQL a web server only enqueues inspections (workers run them); a test server runs them itself.
    HOTLAP_EMBEDDED_WORKER: '1',
    // Local disk unless the suite runs on the S3 fake (HOTLAP_TEST_STORAGE=s3).
    ...testStorageEnv(dataDir),
  };
}

export function prepareDatabase(env: Record<string, string>) {
  const cluster = process.env.HOTLAP_TEST_PG_URL;
  if (cluster && env.DATABASE_URL.startsWith(`${cluster}/`)) createDatabase(cluster, env.DATABASE_URL.slice(cluster.length + 1));
  execFileSync(process.execPath, [path.join(ROOT, 'node_modules', 'tsx', 'dist', 'cli.mjs'), 'scripts/seed.ts'], {
    cwd: ROOT,
    env: { ...process.env, ...env },
    stdio: 'pipe',
  });
}

/**
 * Resolves once `readyUrl` answers 2xx (polled every 250 ms). Throws with everything the child wrote
 * if it exits first or 60 s pass. Keeps reading the child's output afterwards so its pipes never fill.
 */
export async function waitForServer(child: ChildProcess, readyUrl: string, label = 'The server', timeoutMs = 60_000): Promise<void> {
  let log = '';
  child.stdout?.on('data', (d) => (log += d));
  child.stderr?.on('data', (d) => (log += d));
  const deadline = Date.now() + timeoutMs;
  for (;;) {
    try {
      if ((await fetch(readyUrl)).ok) return;
    } catch {
      /* not up yet */
    }
    if (child.exitCode !== null || Date.now() > deadline) throw new Error(`${label} did not start:\n${log}`);
    await new Promise((r) => setTimeout(r, 250));
  }
}

/**
 * Spawns the built app (`next start`) on `port` with `env` over the process environment and resolves
 * once it answers (kills it and throws if it does not). HOTLAP_TEST_SERVER_LOG=FILE keeps what the server writes (its errors behind a 500, say).
 */
export async function spawnApp(port: number, env: Record<string, string>, label = 'The test server'): Promise<ChildProcess> {
  const child: ChildProcess = spawn(process.execPath, [path.join(ROOT, 'node_modules', 'next', 'dist', 'bin', 'next'), 'start', '-p', String(port), '-H', '127.0.0.1'], {
    cwd: ROOT,
    env: { ...process.env, ...env, NODE_ENV: 'production' },
    stdio: ['ignore', 'pipe', 'pipe'],
  });
  const logFile = process.env.HOTLAP_TEST_SERVER_LOG;
  if (logFile) {
    const out = fs.createWriteStream(logFile, { flags: 'a' });
    child.stdout?.pipe(out);
    child.stderr?.pipe(out);
  }
  try {
    await waitForServer(child, `http://127.0.0.1:${port}/api/auth/csrf`, label);
  } catch (e) {
    // Nobody holds the child yet: do not leave it running on the port.
    child.kill('SIGKILL');
    throw e;
  }
  return child;
}

export async function startServer(port: number): Promise<TestServer> {
  if (!fs.existsSync(path.join(ROOT, process.env.NEXT_DIST_DIR || '.next', 'BUILD_ID'))) throw new Error('Run `next build` before the integration tests (npm test does).');
  // Lowercase letters, digits and '-' only, so that its PostgreSQL database name leads back to it (dataDirOf).
  const dataDir = path.join(os.tmpdir(), `hotlap-test-${crypto.randomBytes(6).toString('hex')}`);
  fs.mkdirSync(dataDir);
  const env = testEnv(port, dataDir);
  prepareDatabase(env);
  const child = await spawnApp(port, env, 'The test server');
  const url = `http://127.0.0.1:${port}`;
  return {
    url,
    dbFile: testDb(env),
    dataDir,
    env,
    async stop() {
      child.kill('SIGTERM');
      await new Promise((r) => setTimeout(r, 300));
      fs.rmSync(dataDir, { recursive: true, force: true });
    },
  };
}
