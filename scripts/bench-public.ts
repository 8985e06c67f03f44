/**
 * Public reads under load, in one run: a fresh SQLite with N generated entries (default 50 000,
 * scripts/bench-standings.ts), the built app on 127.0.0.1, then autocannon against a static file and
 * each public route in turn. Prints req/s, p50 and p99 latency and the rate as a share of the static
 * file's. A measurement to read, not a test: nothing here passes or fails.
 *
 *   npx next build && npx tsx scripts/bench-public.ts [--entries 50000] [--connections 20] [--seconds 10] [--profile DIR] [--only LABEL] [--path /x]…
 *
 * --only LABEL measures the static file and the routes whose label contains LABEL.
 * --path P (repeatable) adds any path, e.g. an empty route handler to measure the framework's own floor.
 * Before the load runs it prints each HTML page's first-load JavaScript: the scripts the page's HTML
 * loads (files and inline; not the `noModule` polyfills), their bytes and gzip-compressed bytes.
 * --weight-only prints that and stops; --files also lists each page's script files.
 * --no-static leaves the static file out (a CPU profile of the routes alone); ratios are then not printed.
 * --profile DIR runs the server with `node --cpu-prof` and leaves the .cpuprofile files in DIR.
 */
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import zlib from 'node:zlib';
import autocannon from 'autocannon';
import sqlite3 from 'sqlite3';
import { arg, generate, startApp } from './bench-standings';

function option(name: string): string | undefined {
  const i = process.argv.indexOf(`--${name}`);
  return i > 0 ? process.argv[i + 1] : undefined;
}

async function firstVerifiedEntry(dbFile: string, season: string, cls: string): Promise<number> {
  const db = new sqlite3.Database(dbFile);
  const row = await new Promise<{ id: number }>((ok, fail) =>
    db.get(
      "SELECT e.id FROM entries e JOIN seasons s ON s.id = e.season_id JOIN classes c ON c.id = e.class_id WHERE s.slug = ? AND c.slug = ? AND e.state = 'verified' ORDER BY e.claimed_time_ms LIMIT 1",
      [season, cls],
      (e, r) => (e ? fail(e) : ok(r as { id: number })),
    ),
  );
  await new Promise<void>((ok) => db.close(() => ok()));
  return row.id;
}

interface Target {
  label: string;
  path: string;
  /** Send the ETag of a first answer back as If-None-Match (a revalidating client). */
  revalidate?: boolean;
}

/**
 * CPU time (user + system, ms) used so far by a process and its descendants, from /proc (Linux).
 * Per-request CPU is the figure to compare between runs when other work shares the cores: the rate
 * moves with the load average, the CPU each request costs much less.
 */
function treeCpuMs(root: number): number {
  const tick = 1000 / 100; // USER_HZ is 100 on Linux
  const stats = new Map<number, { ppid: number; cpu: number }>();
  for (const d of fs.readdirSync('/proc')) {
    if (!/^\d+$/.test(d)) continue;
    try {
      const raw = fs.readFileSync(`/proc/${d}/stat`, 'utf8');
      const f = raw.slice(raw.lastIndexOf(')') + 2).split(' ');
      // After the name: state(0) ppid(1) … utime(11) stime(12)
      stats.set(Number(d), { ppid: Number(f[1]), cpu: (Number(f[11]) + Number(f[12])) * tick });
    } catch {
      // The process ended while listing.
    }
  }
  let total = 0;
  const todo = [root];
  while (todo.length) {
    const pid = todo.pop() as number;
    total += stats.get(pid)?.cpu ?? 0;
    for (const [child, s] of stats) if (s.ppid === pid) todo.push(child);
  }
  return total;
}

const ACCEPT_HTML = 'text/html,application/xhtml+xml,*/*;q=0.8';

const load = () => os.loadavg().map((x) => x.toFixed(2)).join(' ');

async function main() {
  const entries = arg('entries', 50_000);
  const connections = arg('connections', 20);
  const seconds = arg('seconds', 10);
  const profileDir = option('profile');
  const port = Number(process.env.HOTLAP_TEST_PORT || 3100) + 52;
  console.log(`load average before: ${load()} (${os.cpus().length} cores)`);
  const gen = await generate(entries, port);
  if (profileDir) fs.mkdirSync(profileDir, { recursive: true });
  const cls = 'open-04';
  const entryId = await firstVerifiedEntry(gen.dbFile, gen.season, cls);
  const api = `/api/v1/seasons/${gen.season}/classes/${cls}/standings`;
  const targets: Target[] = [
    { label: 'static file /favicon.svg', path: '/favicon.svg' },
    { label: 'home page', path: '/' },
    { label: 'season page', path: `/seasons/${gen.season}` },
    { label: 'class standings page', path: `/seasons/${gen.season}/classes/${cls}` },
    { label: 'entry page', path: `/entries/${entryId}` },
    { label: 'standings API', path: api },
    { label: 'standings API, If-None-Match', path: api, revalidate: true },
    { label: 'standings CSV', path: `${api}?format=csv` },
    { label: 'seasons API', path: '/api/v1/seasons' },
    { label: 'not-found page', path: '/no-such-page' },
  ];
  const only = option('only');
  if (only) targets.splice(1, targets.length, ...targets.slice(1).filter((t) => t.label.includes(only)));
  process.argv.forEach((a, i) => {
    if (a === '--path') targets.push({ label: `path ${process.argv[i + 1]}`, path: process.argv[i + 1] });
  });
  const withStatic = !process.argv.includes('--no-static');
  if (!withStatic) targets.shift();
  const server = await startApp(gen, port, profileDir ? ['--cpu-prof', `--cpu-prof-dir=${path.resolve(profileDir)}`] : []);
  const results: { label: string; rps: number; p50: number; p99: number; bad: number; cpuMs: number }[] = [];
  try {
    const weights: string[] = [];
    const pageTargets = [...targets.filter((t) => !t.path.startsWith('/api/') && t.path !== '/favicon.svg'), { label: 'season overview (charts)', path: `/seasons/${gen.season}/overview` }];
    for (const t of pageTargets) {
      const html = await (await fetch(server.url + t.path, { headers: { accept: ACCEPT_HTML } })).text();
      // `noModule` scripts (Next.js's polyfills for browsers without ES modules) are never loaded by a
      // browser that runs modules, i.e. every browser the app supports: not counted.
      const srcs = [...new Set([...html.matchAll(/<script[^>]*\ssrc="([^"]+\.js)"[^>]*>/g)].filter((m) => !/\snoModule/i.test(m[0])).map((m) => m[1]))];
      const inline = [...html.matchAll(/<script(?![^>]*\ssrc=)[^>]*>([\s\S]*?)<\/script>/g)].map((m) => m[1]).join('');
      let raw = Buffer.byteLength(inline);
      let gz = zlib.gzipSync(inline).length;
      const inlineGz = gz;
      for (const src of srcs) {
        const body = Buffer.from(await (await fetch(new URL(src, server.url))).arrayBuffer());
        raw += body.length;
        gz += zlib.gzipSync(body).length;
      }
      weights.push(t.label.padEnd(38) + String(srcs.length).padStart(8) + `${(raw / 1024).toFixed(0)} KB`.padStart(10) + `${(gz / 1024).toFixed(0)} KB`.padStart(10) + `${(inlineGz / 1024).toFixed(0)} KB`.padStart(16));
      if (process.argv.includes('--files')) for (const src of srcs) weights.push('  ' + src);
    }
    console.log('\nfirst-load JavaScript'.padEnd(39) + 'files'.padStart(8) + 'raw'.padStart(10) + 'gzip'.padStart(10) + 'of it inline'.padStart(16));
    for (const w of weights) console.log(w);
    if (process.argv.includes('--weight-only')) targets.length = 0;
    for (const t of targets) {
      const url = server.url + t.path;
      let etag: string | null = null;
      let kept = '';
      for (let i = 0; i < 20; i++) {
        const res = await fetch(url, { headers: { accept: ACCEPT_HTML } });
        etag = res.headers.get('etag');
        kept = res.headers.get('x-cache') ?? res.headers.get('x-page-cache') ?? '';
        await res.arrayBuffer();
      }
      // Every request asks for HTML first, as a browser loading a document does (public pages are kept only for those).
      const headers: Record<string, string> = { accept: ACCEPT_HTML, ...(t.revalidate && etag ? { 'if-none-match': etag } : {}) };
      const cpu0 = treeCpuMs(server.pid);
      const r = await autocannon({ url, connections, duration: seconds, headers });
      const cpuMs = (treeCpuMs(server.pid) - cpu0) / Math.max(1, r.requests.total);
      // 304 counts as an answer for a revalidating client; 404 is the not-found page's own answer.
      const expected = t.revalidate ? r['3xx'] : t.path === '/no-such-page' ? r['4xx'] : r['2xx'];
      results.push({ label: t.label + (kept ? ` [${kept}]` : ''), rps: r.requests.average, p50: r.latency.p50, p99: r.latency.p99, bad: r.requests.total - expected + r.errors + r.timeouts, cpuMs });
    }
  } finally {
    await server.stop();
    fs.rmSync(gen.dataDir, { recursive: true, force: true });
  }
  if (!results.length) return;
  const base = withStatic ? results[0].rps : NaN;
  console.log(`\nautocannon: ${connections} connections, ${seconds} s per route, ${entries} generated entries`);
  console.log('route'.padEnd(38) + 'req/s'.padStart(9) + 'p50 ms'.padStart(9) + 'p99 ms'.padStart(9) + 'of static'.padStart(11) + 'CPU ms/req'.padStart(12) + 'unexpected'.padStart(12));
  for (const r of results) {
    console.log(r.label.padEnd(38) + r.rps.toFixed(0).padStart(9) + String(r.p50).padStart(9) + String(r.p99).padStart(9) + `${((r.rps / base) * 100).toFixed(0)} %`.padStart(11) + r.cpuMs.toFixed(2).padStart(12) + String(r.bad).padStart(12));
  }
  console.log(`load average after: ${load()}`);
  if (profileDir) console.log(`CPU profiles in ${path.resolve(profileDir)}`);
}

main().then(
  () => process.exit(0),
  (err) => {
    console.error(err instanceof Error ? err.stack : err);
    process.exit(1);
  },
);
