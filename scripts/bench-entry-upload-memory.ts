/**
 * Memory of the web server while an entrant uploads and Hotlap inspects a large G-code
 * (a script that prints figures; nothing here is a test). Needs `next build` first.
 *
 *   NEXT_DIST_DIR=.next npx tsx scripts/bench-entry-upload-memory.ts [--mb 200] [--port 3290]
 *
 * Builds a plain-text G-code of the given size by stacking the prusa-beacon-020 fixture (G28
 * commented out in later copies), starts the built app on a fresh demo database, signs in as a demo
 * entrant, streams the file in one multipart request (never held in memory here either) and
 * samples the server's RSS (/proc/PID/status VmRSS), inspection pool threads included, every 50 ms
 * until the inspection is done.
 */
import { spawn } from 'node:child_process';
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import http from 'node:http';
import { gunzipSync } from 'node:zlib';
import { testEnv, prepareDatabase, waitForServer } from '../tests/support/server';
import { Client } from '../tests/support/client';
import { DEMO_PASSWORD, DEMO_USERS } from '../lib/seed';

const ROOT = path.join(__dirname, '..');
const arg = (name: string, dflt: number) => {
  const i = process.argv.indexOf(`--${name}`);
  return i > 0 ? Number(process.argv[i + 1]) : dflt;
};
const sizeMb = arg('mb', 200);
const port = arg('port', 3290);

function rssMb(pid: number): number | null {
  try {
    const m = fs.readFileSync(`/proc/${pid}/status`, 'utf8').match(/VmRSS:\s+(\d+) kB/);
    return m ? Number(m[1]) / 1024 : null;
  } catch {
    return null;
  }
}
function children(pid: number): number[] {
  try {
    return fs.readFileSync(`/proc/${pid}/task/${pid}/children`, 'utf8').trim().split(/\s+/).filter(Boolean).map(Number);
  } catch {
    return [];
  }
}

function buildGcode(file: string) {
  const text = gunzipSync(fs.readFileSync(path.join(ROOT, 'tests/fixtures/gcode/prusa-beacon-020.gcode.gz'))).toString('latin1');
  const later = Buffer.from(text.replace(/^G28/gm, ';G28'), 'latin1');
  const fd = fs.openSync(file, 'w');
  let bytes = 0;
  fs.writeSync(fd, Buffer.from(text, 'latin1'));
  bytes += text.length;
  // Stay at or under the limit: the upload refuses anything over 200 MB (lib/entries/files.ts).
  while (bytes + later.length <= sizeMb * 1024 * 1024) {
    fs.writeSync(fd, later);
    bytes += later.length;
  }
  fs.closeSync(fd);
  return bytes;
}

async function main() {
  const dir = fs.mkdtempSync(path.join(os.tmpdir(), 'hotlap-mem-'));
  const gcode = path.join(dir, 'big.gcode');
  const tBuild = Date.now();
  const bytes = buildGcode(gcode);
  console.log(`built ${(bytes / 1024 / 1024).toFixed(1)} MB in ${((Date.now() - tBuild) / 1000).toFixed(1)} s`);
  const env = testEnv(port, dir);
  prepareDatabase(env);
  const server = spawn(process.execPath, [path.join(ROOT, 'node_modules/next/dist/bin/next'), 'start', '-p', String(port), '-H', '127.0.0.1'], {
    cwd: ROOT,
    env: { ...process.env, ...env, NODE_ENV: 'production' },
    stdio: ['ignore', 'pipe', 'pipe'],
  });
  const base = `http://127.0.0.1:${port}`;
  try {
    await waitForServer(server, `${base}/api/auth/csrf`);
    const c = new Client(base);
    await c.signIn(DEMO_USERS.find((u) => u.key === 'sasha')!.email, DEMO_PASSWORD);
    await c.get('/me'); // warm the routes so their code is loaded before the baseline
    const options = await (await c.get('/api/entrant/entry-options')).json();
    const season = options.seasons[0];
    const machine = options.machines[0];
    const cls = season.classes.find((k: { ineligible: Record<string, string[]> }) => k.ineligible[machine.id].length === 0);
    await new Promise((r) => setTimeout(r, 1000));
    const baseline = rssMb(server.pid!)!;
    let serverPeak = baseline;
    let childPeak = 0;
    const timer = setInterval(() => {
      const r = rssMb(server.pid!);
      if (r !== null) serverPeak = Math.max(serverPeak, r);
      for (const kid of children(server.pid!)) {
        // The inspection child (and any process it starts).
        for (const p of [kid, ...children(kid)]) childPeak = Math.max(childPeak, rssMb(p) ?? 0);
      }
    }, 50);

    const fields: Record<string, string> = {
      seasonId: String(season.id), classId: String(cls.id), machineId: String(machine.id), materialFamily: 'pla', nozzleMm: String(machine.nozzleMm),
      claimedTime: '99:00:00.0', evidenceUrl: 'https://video.example.org/memory', notes: '',
    };
    const boundary = 'hotlapmemorybench';
    const head = Buffer.from(
      Object.entries(fields).map(([k, v]) => `--${boundary}\r\nContent-Disposition: form-data; name="${k}"\r\n\r\n${v}\r\n`).join('') +
        `--${boundary}\r\nContent-Disposition: form-data; name="gcode"; filename="big.gcode"\r\nContent-Type: text/plain\r\n\r\n`,
    );
    const tail = Buffer.from(`\r\n--${boundary}--\r\n`);
    const cookie = (c as unknown as { cookieHeader(): string }).cookieHeader();
    const t0 = Date.now();
    const created = await new Promise<{ status: number; body: string }>((resolve, reject) => {
      const req = http.request(`${base}/api/entries`, { method: 'POST', headers: { cookie, 'content-type': `multipart/form-data; boundary=${boundary}`, 'content-length': String(head.length + bytes + tail.length) } }, (res) => {
        let body = '';
        res.on('data', (d) => (body += d));
        res.on('end', () => resolve({ status: res.statusCode ?? 0, body }));
      });
      req.on('error', reject);
      req.write(head);
      const src = fs.createReadStream(gcode);
      src.on('end', () => req.end(tail));
      src.pipe(req, { end: false });
    });
    const uploadS = (Date.now() - t0) / 1000;
    if (created.status !== 201) throw new Error(`upload answered ${created.status}: ${created.body}`);
    const { id } = JSON.parse(created.body) as { id: number };
    let inspection: { status: string; error: string | null; figures: { estimatedTimeS: number } } | null = null;
    for (;;) {
      inspection = (await (await c.get(`/api/entries/${id}/inspection`)).json()).inspection;
      if (inspection && (inspection.status === 'done' || inspection.status === 'failed')) break;
      await new Promise((r) => setTimeout(r, 250));
    }
    const totalS = (Date.now() - t0) / 1000;
    clearInterval(timer);
    console.log(`G-code: ${(bytes / 1024 / 1024).toFixed(1)} MB plain text`);
    console.log(`upload: ${uploadS.toFixed(1)} s; upload + inspection: ${totalS.toFixed(1)} s; inspection ${inspection!.status}${inspection!.error ? ` (${inspection!.error})` : ''}`);
    console.log(`server RSS: baseline ${baseline.toFixed(0)} MB, peak ${serverPeak.toFixed(0)} MB, growth ${(serverPeak - baseline).toFixed(0)} MB`);
    // Inspections run on the pool's worker threads inside the server (lib/jobs/pool.ts): their memory is in the server's RSS.
    console.log(childPeak ? `child process peak RSS: ${childPeak.toFixed(0)} MB` : 'no child process: the inspection ran on a pool thread inside the server (counted in its RSS)');
  } finally {
    server.kill('SIGTERM');
    await new Promise((r) => setTimeout(r, 500));
    fs.rmSync(dir, { recursive: true, force: true });
  }
}

main().catch((err) => {
  console.error(err);
  process.exitCode = 1;
});
