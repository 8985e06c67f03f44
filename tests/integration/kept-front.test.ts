/**
 * Kept public answers served at the HTTP server ahead of Next.js (lib/server/keptFront.ts) against
 * the built app: for every kept route the front's answer has Next.js's own headers and body (read
 * from the same running server: the first request after a counter change goes through Next.js, the
 * next one is the front's — `X-Hotlap-Kept: miss|hit`), minus Date, framing and the page nonce;
 * 304, gzip and HEAD; query strings kept apart; members, Authorization, the router's RSC requests,
 * non-canonical URLs and other methods are never answered from it. The kinds of writes showing on
 * the very next request are in public-cache.test.ts (API) and public-page-cache.test.ts (pages),
 * whose second requests are front answers.
 */
import type { ChildProcess } from 'node:child_process';
import fs from 'node:fs';
import http from 'node:http';
import os from 'node:os';
import path from 'node:path';
import zlib from 'node:zlib';
import { describe, it, expect, inject, beforeAll, afterAll } from 'vitest';
import { Client } from '../support/client';
import { sql } from '../support/db';
import { DEMO_PASSWORD, demoEmail } from '../support/demo';
import { createReviewableEntry } from '../support/judging-fixtures';
import { spawnApp, testEnv } from '../support/server';

const base = inject('baseUrl');
const db = inject('dbFile');
const HTML = 'text/html,application/xhtml+xml,*/*;q=0.8';

interface Raw {
  status: number;
  headers: http.IncomingHttpHeaders;
  body: Buffer;
}

/** One request as sent, the answer's bytes as received (no decoding, no redirects). */
function raw(path: string, headers: Record<string, string> = {}, method = 'GET', origin = base): Promise<Raw> {
  return new Promise((resolve, reject) => {
    const req = http.request(origin + path, { method, headers, agent: false }, (res) => {
      const chunks: Buffer[] = [];
      res.on('data', (c: Buffer) => chunks.push(c));
      res.on('end', () => resolve({ status: res.statusCode ?? 0, headers: res.headers, body: Buffer.concat(chunks) }));
      res.on('error', reject);
    });
    req.on('error', reject);
    req.end();
  });
}

/** Any write the public reads count (what a verification on another web server does to the counter). */
const bumpCounter = () => sql(db, 'UPDATE standings_version SET version = version + 1 WHERE id = 1');

const nonceOf = (r: Raw) => String(r.headers['content-security-policy'] ?? '').match(/'nonce-([^']+)'/)?.[1];

/** Headers that may differ between two answers of the same kept content. */
const PER_ANSWER = new Set(['date', 'x-hotlap-kept', 'content-length', 'transfer-encoding', 'connection', 'keep-alive']);

/** Header map with the per-answer ones out and the answer's nonce written as NONCE. */
function comparable(r: Raw): Record<string, string> {
  const nonce = nonceOf(r);
  const out: Record<string, string> = {};
  for (const [k, v] of Object.entries(r.headers)) {
    if (PER_ANSWER.has(k) || v === undefined) continue;
    const s = Array.isArray(v) ? v.join('\n') : v;
    out[k] = nonce ? s.replaceAll(nonce, 'NONCE') : s;
  }
  return out;
}

function decoded(r: Raw): string {
  const bytes = r.headers['content-encoding'] === 'gzip' ? zlib.gunzipSync(r.body) : r.body;
  const nonce = nonceOf(r);
  const text = bytes.toString('utf8');
  return nonce ? text.replaceAll(nonce, 'NONCE') : text;
}

let entryId: number;
const routes: { label: string; path: string; page?: boolean }[] = [];

beforeAll(async () => {
  const [row] = await sql<{ id: number }>(
    db,
    "SELECT e.id FROM entries e JOIN seasons s ON s.id = e.season_id JOIN classes c ON c.id = e.class_id WHERE s.slug = 'frostbite-sprint' AND c.slug = 'open-04' AND e.state = 'verified' ORDER BY e.id LIMIT 1",
  );
  entryId = row.id;
  const api = '/api/v1/seasons/frostbite-sprint/classes/open-04/standings';
  routes.push(
    { label: 'standings JSON', path: `${api}?per_page=5` },
    { label: 'standings CSV', path: `${api}?format=csv` },
    { label: 'seasons API', path: '/api/v1/seasons' },
    { label: 'season API', path: '/api/v1/seasons/frostbite-sprint' },
    { label: 'season results CSV', path: '/api/v1/seasons/frostbite-sprint/results' },
    { label: 'season overview API', path: '/api/v1/seasons/frostbite-sprint/overview' },
    { label: 'entry API', path: `/api/v1/entries/${entryId}` },
    { label: 'home page', path: '/', page: true },
    { label: 'season page', path: '/seasons/frostbite-sprint', page: true },
    { label: 'class standings page', path: '/seasons/frostbite-sprint/classes/open-04', page: true },
    { label: 'entry page', path: `/entries/${entryId}`, page: true },
  );
});

describe('the front answer is Next.js’s answer', () => {
  for (const encoding of ['identity', 'gzip']) {
    it(`for every kept route, same status, headers and body (Accept-Encoding: ${encoding})`, async () => {
      for (const r of routes) {
        const headers = { accept: r.page ? HTML : '*/*', 'accept-encoding': encoding };
        await bumpCounter();
        const next = await raw(r.path, headers);
        expect(next.status, r.label).toBe(200);
        expect(next.headers['x-hotlap-kept'], r.label).toBe('miss');
        const front = await raw(r.path, headers);
        expect(front.headers['x-hotlap-kept'], r.label).toBe('hit');
        expect(front.status, r.label).toBe(200);
        // The cache headers say HIT on the front's answer (what Next.js's own kept answer says).
        const cacheHeader = r.page ? 'x-page-cache' : 'x-cache';
        expect(next.headers[cacheHeader], r.label).toBe('MISS');
        expect(front.headers[cacheHeader], r.label).toBe('HIT');
        expect({ ...comparable(front), [cacheHeader]: 'MISS' }, r.label).toEqual(comparable(next));
        expect(front.headers['content-encoding'] ?? 'identity', r.label).toBe(encoding);
        expect(decoded(front), r.label).toBe(decoded(next));
        expect(front.headers.date, r.label).toBeTruthy();
        if (r.page) {
          // Each answer has its own nonce, on every script and in its CSP; the kept one is not sent.
          expect(nonceOf(front)).not.toBe(nonceOf(next));
          const html = decoded({ ...front, headers: { ...front.headers, 'content-security-policy': '' } });
          expect([...html.matchAll(/nonce="([^"]+)"/g)].every((m) => m[1] === nonceOf(front)), r.label).toBe(true);
          expect(String(front.headers.link ?? '')).not.toContain(nonceOf(next)!);
        }
      }
    });
  }

  it('gzip: the gzip copy decodes to the same bytes as the plain answer', async () => {
    for (const r of routes) {
      const accept = r.page ? HTML : '*/*';
      await raw(r.path, { accept });
      const plain = await raw(r.path, { accept, 'accept-encoding': 'identity' });
      const gz = await raw(r.path, { accept, 'accept-encoding': 'gzip, deflate, br' });
      expect(plain.headers['x-hotlap-kept'], r.label).toBe('hit');
      expect(gz.headers['x-hotlap-kept'], r.label).toBe('hit');
      expect(gz.headers['content-encoding'], r.label).toBe('gzip');
      expect(plain.headers['content-encoding'], r.label).toBeUndefined();
      expect(Number(gz.headers['content-length']), r.label).toBe(gz.body.length);
      expect(String(gz.headers.vary), r.label).toContain('Accept-Encoding');
      expect(decoded(gz), r.label).toBe(decoded(plain));
      // gzip;q=0 refuses it (RFC 9110 §12.5.3).
      expect((await raw(r.path, { accept, 'accept-encoding': 'gzip;q=0' })).headers['content-encoding'], r.label).toBeUndefined();
    }
  });

  it('If-None-Match with the kept ETag: 304 without a body, from the front', async () => {
    for (const r of routes.filter((x) => !x.page)) {
      const first = await raw(r.path);
      const etag = String(first.headers.etag);
      expect(etag, r.label).toMatch(/^"/);
      const again = await raw(r.path, { 'if-none-match': etag });
      expect(again.status, r.label).toBe(304);
      expect(again.headers['x-hotlap-kept'], r.label).toBe('hit');
      expect(again.body.length, r.label).toBe(0);
      expect(again.headers.etag, r.label).toBe(etag);
      expect(again.headers['content-type'], r.label).toBeUndefined();
      expect((await raw(r.path, { 'if-none-match': '"other"' })).status, r.label).toBe(200);
    }
  });

  it('HEAD gets the headers of GET and no body', async () => {
    for (const r of routes) {
      const accept = r.page ? HTML : '*/*';
      const get = await raw(r.path, { accept, 'accept-encoding': 'identity' });
      const head = await raw(r.path, { accept, 'accept-encoding': 'identity' }, 'HEAD');
      expect(head.status, r.label).toBe(200);
      expect(head.headers['x-hotlap-kept'], r.label).toBe('hit');
      expect(head.body.length, r.label).toBe(0);
      expect(head.headers['content-length'], r.label).toBe(get.headers['content-length']);
      expect(head.headers['content-type'], r.label).toBe(get.headers['content-type']);
    }
  });

  it('live answers must be revalidated (ETag), never reused for a while', async () => {
    const res = await raw('/api/v1/seasons/frostbite-sprint/classes/open-04/standings');
    expect(res.headers['cache-control']).toBe('public, max-age=0, must-revalidate');
  });
});

describe('what the front never answers', () => {
  const api = '/api/v1/seasons/frostbite-sprint/classes/open-04/standings';
  const page = '/seasons/frostbite-sprint/classes/open-04';

  it('a query string variant is kept apart', async () => {
    const a = `${api}?per_page=2`;
    const b = `${api}?per_page=3`;
    await bumpCounter();
    const na = await raw(a);
    const nb = await raw(b);
    expect([na.headers['x-hotlap-kept'], nb.headers['x-hotlap-kept']]).toEqual(['miss', 'miss']);
    expect(nb.body.equals(na.body)).toBe(false);
    const ra = await raw(a);
    const rb = await raw(b);
    expect([ra.headers['x-hotlap-kept'], rb.headers['x-hotlap-kept']]).toEqual(['hit', 'hit']);
    expect(ra.body.equals(na.body)).toBe(true);
    expect(rb.body.equals(nb.body)).toBe(true);
    expect(ra.headers.etag).not.toBe(rb.headers.etag);
  });

  it('a page with a query parameter it does not read is rendered for itself, never kept', async () => {
    for (const p of ['/?utm=1', `${page}?x=1`, `/entries/${entryId}?v=2`]) {
      for (let i = 0; i < 2; i++) {
        const res = await raw(p, { accept: HTML });
        expect(res.status, p).toBe(200);
        expect(res.headers['x-hotlap-kept'], p).toBe('miss');
        expect(res.headers['x-page-cache'], p).toBeUndefined();
      }
    }
    // The parameters the class page reads are kept per value.
    for (let i = 0; i < 2; i++) await raw(`${page}?sort=-time`, { accept: HTML });
    expect((await raw(`${page}?sort=-time`, { accept: HTML })).headers['x-hotlap-kept']).toBe('hit');
  });

  it('a member (session cookie) never gets a kept answer, page or API', async () => {
    const judge = new Client(base);
    expect((await judge.signIn(demoEmail('judge'), DEMO_PASSWORD)).status).toBe(200);
    for (const p of [page, api]) {
      await raw(p, { accept: HTML });
      expect((await raw(p, { accept: HTML })).headers['x-hotlap-kept']).toBe('hit');
      const res = await judge.request(p, { headers: { accept: HTML } });
      expect(res.headers.get('x-hotlap-kept'), p).toBeNull();
      const body = await res.text();
      if (p === page) expect(body).toContain('data-testid="signed-in-as"');
    }
    // A session cookie among others, in any position.
    const res = await raw(page, { accept: HTML, cookie: 'theme=dark; next-auth.session-token=forged' });
    expect(res.headers['x-hotlap-kept']).toBeUndefined();
  });

  it('Authorization, the router’s RSC and prefetch requests, non-HTML requests for pages, and a body are Next.js’s', async () => {
    for (let i = 0; i < 2; i++) await raw(page, { accept: HTML });
    await raw(api);
    expect((await raw(api, { authorization: 'Bearer x' })).headers['x-hotlap-kept']).toBeUndefined();
    const rsc = await raw(page, { rsc: '1', accept: '*/*' });
    expect(rsc.headers['x-hotlap-kept']).toBeUndefined();
    expect(String(rsc.headers['content-type'])).not.toMatch(/text\/html/);
    expect((await raw(page, { accept: HTML, 'next-router-prefetch': '1' })).headers['x-hotlap-kept']).toBeUndefined();
    expect((await raw(`${page}?_rsc=abc`, { accept: HTML })).headers['x-hotlap-kept']).toBeUndefined();
    // A page asked without text/html is rendered by Next.js (the page cache keeps documents only).
    expect((await raw(page, { accept: 'application/json' })).headers['x-hotlap-kept']).toBe('miss');
    expect((await raw(api, { 'content-length': '0' })).headers['x-hotlap-kept']).toBeUndefined();
  });

  it('non-canonical URLs get Next.js’s own answer', async () => {
    for (let i = 0; i < 2; i++) await raw(page, { accept: HTML });
    const slash = await raw(`${page}/`, { accept: HTML });
    expect(slash.status).toBe(308);
    expect(slash.headers['x-hotlap-kept']).toBe('miss');
    const upper = await raw('/seasons/FROSTBITE-SPRINT/classes/open-04', { accept: HTML });
    expect(upper.headers['x-hotlap-kept']).toBe('miss');
    const twice = await raw(`${api}?per_page=2&per_page=2`);
    expect(twice.headers['x-hotlap-kept']).toBe('miss');
  });

  it('a forged front marker is not the server’s secret', async () => {
    await raw(api);
    const res = await raw(api, { 'x-hotlap-front': 'guess', authorization: 'Bearer x' });
    expect(res.headers['x-hotlap-keep']).toBeUndefined();
    expect(res.headers['x-hotlap-kept']).toBeUndefined();
  });

  it('TRACE still answers 405', async () => {
    const res = await raw(api, {}, 'TRACE');
    expect(res.status).toBe(405);
    expect(res.headers.allow).toBeTruthy();
  });
});

describe('a second web server on the same database', () => {
  // Server B runs with HOTLAP_PAGE_CACHE=0: it never answers from kept answers, and a judge's
  // verification made through it shows on server A's very next answer (A reads the counter from the
  // database per request).
  let b: ChildProcess | undefined;
  let baseB: string;
  let dataDir: string;

  beforeAll(async () => {
    const port = Number(new URL(base).port) + 7;
    dataDir = fs.mkdtempSync(path.join(os.tmpdir(), 'hotlap-test-b-'));
    const databaseUrl = /^postgres(ql)?:\/\//.test(db) ? db : `sqlite:${db}`;
    b = await spawnApp(port, { ...testEnv(port, dataDir), DATABASE_URL: databaseUrl, HOTLAP_PAGE_CACHE: '0' }, 'Server B');
    baseB = `http://127.0.0.1:${port}`;
  });

  afterAll(() => {
    b?.kill('SIGTERM');
    fs.rmSync(dataDir, { recursive: true, force: true });
  });

  it('B answers everything through Next.js; B’s write shows on A’s very next page and API answer', async () => {
    // The demo entrant's new entry in a class where she has no verified entry yet: verified, it is her row.
    const runs = '/api/v1/seasons/frostbite-sprint/classes/open-04/standings?per_page=100';
    const page = '/seasons/frostbite-sprint/classes/open-04';
    const { entryId } = await createReviewableEntry(db, { claimedTimeMs: 1_590_000 });
    // The fixture's writes (inspection, photos) may still be moving the counter: wait until both are front answers.
    for (let i = 0; i < 50; i++) {
      const [r, p] = [await raw(runs), await raw(page, { accept: HTML })];
      if (r.headers['x-hotlap-kept'] === 'hit' && p.headers['x-hotlap-kept'] === 'hit') break;
      await new Promise((ok) => setTimeout(ok, 100));
    }
    const before = await raw(runs);
    expect(before.headers['x-hotlap-kept']).toBe('hit');
    expect(before.body.toString()).not.toContain(`"entry_id":${entryId},`);
    expect((await raw(page, { accept: HTML })).headers['x-hotlap-kept']).toBe('hit');
    // B: the same URLs twice, never a front answer.
    for (let i = 0; i < 2; i++) {
      expect((await raw(runs, {}, 'GET', baseB)).headers['x-hotlap-kept']).toBeUndefined();
      const p = await raw(page, { accept: HTML }, 'GET', baseB);
      expect(p.headers['x-hotlap-kept']).toBeUndefined();
      expect(p.headers['x-page-cache']).toBeUndefined();
    }
    const judge = new Client(baseB);
    expect((await judge.signIn(demoEmail('judge'), DEMO_PASSWORD)).status).toBe(200);
    const res = await judge.post(`/api/judging/entries/${entryId}/decisions`, { decision: 'verify', reasonCodes: ['evidence_consistent'], note: 'Verified on the second server.' });
    expect(res.status, await res.clone().text()).toBe(201);
    const after = await raw(runs);
    expect(after.headers['x-hotlap-kept']).toBe('miss');
    expect(after.body.toString()).toContain(`"entry_id":${entryId},`);
    expect(after.headers.etag).not.toBe(before.headers.etag);
    expect((await raw(page, { accept: HTML })).headers['x-hotlap-kept']).toBe('miss');
  });
});
