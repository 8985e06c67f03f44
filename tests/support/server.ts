/**
 * Starts the built app (`next start`) on a free port with a fresh SQLite file, migrated and seeded
 * with the demo data. Used by the integration tests and by Playwright. Needs `next build` first.
 */
import { spawn, execFileSync, type ChildProcess } from 'node:child_process';
import fs from 'node:fs';
import path from 'node:path';
import os from 'node:os';

export interface TestServer {
  url: string;
  dbFile: string;
  dataDir: string;
  env: Record<string, string>;
  stop(): Promise<void>;
}

const ROOT = path.resolve(__dirname, '..', '..');

export function testEnv(port: number, dataDir: string): Record<string, string> {
  return {
    DATABASE_URL: `sqlite:${path.join(dataDir, 'hotlap.sqlite')}`,
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
  };
}

export function prepareDatabase(env: Record<string, string>) {
  execFileSync(process.execPath, [path.join(ROOT, 'node_modules', 'tsx', 'dist', 'cli.mjs'), 'scripts/seed.ts'], {
    cwd: ROOT,
    env: { ...process.env, ...env },
    stdio: 'pipe',
  });
}

export async function startServer(port: number): Promise<TestServer> {
  if (!fs.existsSync(path.join(ROOT, process.env.NEXT_DIST_DIR || '.next', 'BUILD_ID'))) throw new Error('Run `next build` before the integration tests (npm test does).');
  const dataDir = fs.mkdtempSync(path.join(os.tmpdir(), 'hotlap-test-'));
  const env = testEnv(port, dataDir);
  prepareDatabase(env);
  const child: ChildProcess = spawn(process.execPath, [path.join(ROOT, 'node_modules', 'next', 'dist', 'bin', 'next'), 'start', '-p', String(port), '-H', '127.0.0.1'], {
    cwd: ROOT,
    env: { ...process.env, ...env, NODE_ENV: 'production' },
    stdio: ['ignore', 'pipe', 'pipe'],
  });
  let log = '';
  child.stdout?.on('data', (d) => (log += d));
  child.stderr?.on('data', (d) => (log += d));
  const url = `http://127.0.0.1:${port}`;
  const deadline = Date.now() + 60_000;
  for (;;) {
    try {
      const res = await fetch(`${url}/api/auth/csrf`);
      if (res.ok) break;
    } catch {
      /* not up yet */
    }
    if (child.exitCode !== null || Date.now() > deadline) throw new Error(`The test server did not start:\n${log}`);
    await new Promise((r) => setTimeout(r, 250));
  }
  return {
    url,
    dbFile: path.join(dataDir, 'hotlap.sqlite'),
    dataDir,
    env,
    async stop() {
      child.kill('SIGTERM');
      await new Promise((r) => setTimeout(r, 300));
      fs.rmSync(dataDir, { recursive: true, force: true });
    },
  };
}
