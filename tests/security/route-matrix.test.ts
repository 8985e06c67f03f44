/**
 * The role matrix: every API route × every method × every role, probed against the running app,
 * from the one list in lib/security/apiRoutes.ts — which must name every app/api/**\/route.ts file
 * and exactly the methods it exports, so a new route without an entry fails here. Unsupported
 * methods (TRACE answered 500 before) must answer 405 with an Allow header. Member pages likewise.
 */
import fs from 'node:fs';
import path from 'node:path';
import { describe, it, expect, inject, beforeAll } from 'vitest';
import { Client } from '../support/client';
import { DEMO_PASSWORD, demoEmail } from '../support/demo';
import { API_ROUTES, allowHeader, type Access, type ApiMethod } from '@/lib/security/apiRoutes';
import { ROLES, type Role } from '@/lib/domain';
import { randomIp } from './support';

const base = inject('baseUrl');
const ROOT = path.resolve(__dirname, '..', '..');

function walk(dir: string, name: string): string[] {
  return fs.readdirSync(dir, { withFileTypes: true }).flatMap((d) => (d.isDirectory() ? walk(path.join(dir, d.name), name) : d.name === name ? [path.join(dir, d.name)] : []));
}

/** The route files on disk and the methods each exports. */
const onDisk = walk(path.join(ROOT, 'app', 'api'), 'route.ts').map((file) => {
  const src = fs.readFileSync(file, 'utf8');
  const methods = [...src.matchAll(/export\s+(?:const|async function|function)\s+(GET|POST|PUT|PATCH|DELETE|HEAD|OPTIONS)\b/g)].map((m) => m[1]).sort();
  const route = '/' + path.relative(path.join(ROOT, 'app'), path.dirname(file)).split(path.sep).join('/');
  return { route, methods };
});

/** A concrete address for a route pattern: ids that exist nowhere, so no probe changes anything. */
const concrete = (p: string) =>
  p.replace('[...nextauth]', 'session').replace(/\[(id|classId|invitationId|userId|fileId|entrant)\]/g, '999999').replace(/\[(season|class|file)\]/g, 'no-such-thing');

type Who = 'anonymous' | Role;
const WHO: Who[] = ['anonymous', ...ROLES];
/** The demo account holding exactly each role (plus entrant). */
const ACCOUNT: Record<Role, string> = { entrant: 'entrant', judge: 'judge', organizer: 'organizer', admin: 'admin' };
const allowed = (access: Access, who: Who) => access === 'public' || (who !== 'anonymous' && (access === 'member' || access === who || access === 'entrant'));

const clients: Partial<Record<Who, Client>> = {};
beforeAll(async () => {
  clients.anonymous = new Client(base, randomIp());
  for (const role of ROLES) {
    const c = new Client(base, randomIp());
    expect((await c.signIn(demoEmail(ACCOUNT[role]), DEMO_PASSWORD)).status, role).toBe(200);
    clients[role] = c;
  }
});

describe('the route list matches the route files', () => {
  it('every route file has an entry with exactly its methods, and every entry has a file', () => {
    const listed = new Map(API_ROUTES.map((r) => [r.path, Object.keys(r.methods).sort()]));
    for (const { route, methods } of onDisk) {
      expect(listed.has(route), `${route} has no entry in lib/security/apiRoutes.ts`).toBe(true);
      expect(listed.get(route), route).toEqual(methods);
    }
    expect(API_ROUTES.map((r) => r.path).sort()).toEqual(onDisk.map((r) => r.route).sort());
  });

  it('every exported handler goes through route() (origin check, body limit, typed errors)', () => {
    for (const file of walk(path.join(ROOT, 'app', 'api'), 'route.ts')) {
      const src = fs.readFileSync(file, 'utf8');
      expect(src, file).not.toMatch(/export\s+(async\s+)?function\s+(GET|POST|PUT|PATCH|DELETE)\b/);
      for (const m of src.matchAll(/export\s+const\s+(GET|POST|PUT|PATCH|DELETE)\s*=\s*([^\n]*)/g)) expect(m[2], `${file} ${m[1]}`).toMatch(/^route(<.*>)?\(/);
    }
  });
});

describe('role matrix: every route × method × role', () => {
  // Sign-out everywhere would end the probing sessions: it runs last, in its own test below.
  const probes = API_ROUTES.flatMap((r) => (Object.entries(r.methods) as [ApiMethod, Access][]).map(([method, access]) => ({ r, method, access }))).filter(
    (p) => p.r.path !== '/api/account/sessions',
  );
  for (const { r, method, access } of probes) {
    it(`${method} ${r.path} (${access})`, async () => {
      for (const who of WHO) {
        const res = await clients[who]!.request(concrete(r.path), method === 'GET' ? {} : { method, json: {} });
        const s = res.status;
        if (allowed(access, who)) expect([401, 403].includes(s), `${who} → ${s}`).toBe(false);
        else if (who === 'anonymous') expect(s, `${who} → ${s}`).toBe(401);
        // A signed-in caller without the role: 403, or 404 where objects are private to someone.
        else expect([403, 404].includes(s), `${who} → ${s}`).toBe(true);
        expect(s, `${who} → ${s}`).toBeLessThan(500);
      }
    });
  }

});

describe('unsupported methods', () => {
  it('attack: TRACE answers 405 with Allow, not 500', async () => {
    for (const p of ['/api/me', '/api/v1/seasons', '/', '/signin']) {
      const res = await fetch(base + p, { method: 'TRACE' }).catch(() => null);
      // Some HTTP stacks refuse to send TRACE at all; when it goes out, the answer must be 405.
      if (res) {
        expect(res.status, p).toBe(405);
        expect(res.headers.get('allow'), p).toBeTruthy();
      }
    }
    const raw = await rawMethod('/api/me', 'TRACE');
    expect(raw.status).toBe(405);
    expect(raw.allow).toBeTruthy();
  });

  it('every API route answers a method it does not have with 405 and its Allow header', async () => {
    for (const r of API_ROUTES) {
      const missing = (['GET', 'POST', 'PUT', 'PATCH', 'DELETE'] as ApiMethod[]).filter((m) => !(m in r.methods));
      for (const method of missing) {
        const res = await new Client(base).request(concrete(r.path), { method, ...(method === 'GET' ? {} : { json: {} }) });
        expect(res.status, `${method} ${r.path}`).toBe(405);
        expect(res.headers.get('allow'), `${method} ${r.path}`).toBe(allowHeader(r));
      }
    }
  });
});

/** Every page and who may open it; a page file without an entry here fails the first test below. */
const PAGES: Record<string, Access> = {
  '/': 'public', '/api-docs': 'public', '/entrants/[id]': 'public', '/entries/[id]': 'public', '/machines/[id]': 'public',
  '/safety': 'public', '/seasons': 'public', '/seasons/[slug]': 'public', '/seasons/[slug]/classes/[class]': 'public',
  '/seasons/[slug]/overview': 'public', '/seasons/[slug]/rulebook': 'public', '/seasons/[slug]/check': 'public',
  '/forgot': 'public', '/invite': 'public', '/reset': 'public', '/signin': 'public', '/signup': 'public', '/verify': 'public',
  '/account': 'member',
  '/me': 'entrant', '/me/entries/[id]': 'entrant', '/me/entries/new': 'entrant', '/me/machines': 'entrant', '/me/machines/[id]': 'entrant',
  '/judging': 'judge', '/judging/entries/[id]': 'judge',
  '/organize': 'organizer', '/organize/seasons/[id]': 'organizer', '/organize/seasons/new': 'organizer',
  '/admin/audit': 'admin', '/admin/outbox': 'admin', '/admin/users': 'admin',
};

const pagesOnDisk = walk(path.join(ROOT, 'app'), 'page.tsx').map((f) => {
  const rel = path.relative(path.join(ROOT, 'app'), path.dirname(f)).split(path.sep).filter((seg) => !/^\(.*\)$/.test(seg));
  return '/' + rel.join('/');
});

describe('pages × roles', () => {
  it('every page file has an entry', () => {
    expect(Object.keys(PAGES).sort()).toEqual([...new Set(pagesOnDisk)].sort());
  });
  for (const [page, access] of Object.entries(PAGES)) {
    it(`${page} (${access})`, async () => {
      for (const who of WHO) {
        const res = await clients[who]!.get(concrete(page));
        const s = res.status;
        expect(s, `${who} → ${s}`).toBeLessThan(500);
        if (allowed(access, who)) expect([401, 403].includes(s) || (s === 307 && res.headers.get('location')?.includes('/signin')), `${who} → ${s}`).toBe(false);
        else if (who === 'anonymous') {
          expect(s, who).toBe(307);
          expect(res.headers.get('location'), who).toContain('/signin?callbackUrl=');
        } else expect([403, 404].includes(s), `${who} → ${s}`).toBe(true);
      }
    });
  }
});

describe('last: sign out everywhere', () => {
  it('DELETE /api/account/sessions (member)', async () => {
    expect((await new Client(base).request('/api/account/sessions', { method: 'DELETE' })).status).toBe(401);
    for (const role of ROLES) expect((await clients[role]!.request('/api/account/sessions', { method: 'DELETE' })).status, role).toBe(200);
  });
});

async function rawMethod(p: string, method: string): Promise<{ status: number; allow: string | undefined }> {
  const http = await import('node:http');
  const url = new URL(p, base);
  return new Promise((resolve, reject) => {
    const req = http.request({ host: url.hostname, port: url.port, path: url.pathname, method }, (res) => {
      res.resume();
      resolve({ status: res.statusCode!, allow: res.headers.allow as string | undefined });
    });
    req.on('error', reject);
    req.end();
  });
}
