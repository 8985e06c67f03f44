import { describe, it, expect, inject, beforeAll } from 'vitest';
import { Client } from '../support/client';
import { sql } from '../support/db';
import { DEMO_PASSWORD, demoEmail } from '../support/demo';
import type { Role } from '@/lib/domain';

const base = inject('baseUrl');
const dbFile = inject('dbFile');

/** Every protected API route, the role it needs, and a request that would otherwise be valid. */
const PROTECTED: { method: 'GET' | 'PUT'; path: string; role: Role | 'any'; body?: unknown }[] = [
  { method: 'GET', path: '/api/me', role: 'any' },
  { method: 'GET', path: '/api/entries', role: 'entrant' },
  { method: 'GET', path: '/api/judging/queue', role: 'judge' },
  { method: 'GET', path: '/api/organizer/seasons', role: 'organizer' },
  { method: 'GET', path: '/api/admin/users', role: 'admin' },
  { method: 'GET', path: '/api/admin/audit', role: 'admin' },
  { method: 'GET', path: '/api/admin/outbox', role: 'admin' },
  { method: 'PUT', path: '/api/admin/users/1/roles', role: 'admin', body: { roles: ['entrant', 'admin'] } },
];

const clients: Record<string, Client> = {};
beforeAll(async () => {
  for (const key of ['entrant', 'judge', 'organizer', 'admin']) {
    clients[key] = new Client(base);
    const res = await clients[key].signIn(demoEmail(key), DEMO_PASSWORD);
    expect(res.status, `sign in ${key}`).toBe(200);
  }
});

const call = (c: Client, r: (typeof PROTECTED)[number]) => (r.method === 'GET' ? c.get(r.path) : c.put(r.path, r.body));

describe('protected API routes', () => {
  for (const r of PROTECTED) {
    it(`${r.method} ${r.path} refuses anonymous callers with 401`, async () => {
      const res = await call(new Client(base), r);
      expect(res.status).toBe(401);
      expect((await res.json()).error).toMatch(/Sign in/);
    });
    if (r.role !== 'any' && r.role !== 'entrant') {
      it(`${r.method} ${r.path} refuses a signed-in user without the ${r.role} role with 403`, async () => {
        const res = await call(clients.entrant, r);
        expect(res.status).toBe(403);
        expect((await res.json()).error).toContain(r.role);
      });
      it(`${r.method} ${r.path} answers the ${r.role}`, async () => {
        const res = await call(clients[r.role], r);
        expect(res.status).toBe(200);
      });
    }
  }
});

describe('role changes', () => {
  it('a judge or organizer cannot change roles', async () => {
    const target = (await sql<{ id: number }>(dbFile, 'SELECT id FROM users WHERE email = ?', [demoEmail('pim')]))[0].id;
    for (const who of ['judge', 'organizer', 'entrant']) {
      const res = await clients[who].put(`/api/admin/users/${target}/roles`, { roles: ['entrant', 'admin'] });
      expect(res.status).toBe(403);
    }
    const roles = (await sql<{ roles: string }>(dbFile, 'SELECT roles FROM users WHERE id = ?', [target]))[0].roles;
    expect(JSON.parse(roles)).toEqual(['entrant']);
  });

  it('an admin makes a user a judge; it applies at once and is audited', async () => {
    const target = (await sql<{ id: number }>(dbFile, 'SELECT id FROM users WHERE email = ?', [demoEmail('pim')]))[0].id;
    const pim = new Client(base);
    await pim.signIn(demoEmail('pim'), DEMO_PASSWORD);
    expect((await pim.get('/api/judging/queue')).status).toBe(403);

    const res = await clients.admin.put(`/api/admin/users/${target}/roles`, { roles: ['entrant', 'judge'] });
    expect(res.status).toBe(200);
    expect((await res.json()).roles).toEqual(['entrant', 'judge']);
    // A role change ends the account's earlier sessions; signed in again, the new role applies.
    expect((await pim.get('/api/judging/queue')).status).toBe(401);
    await pim.signIn(demoEmail('pim'), DEMO_PASSWORD);
    expect((await pim.get('/api/judging/queue')).status).toBe(200);

    const audit = await clients.admin.get('/api/admin/audit');
    const { events } = await audit.json();
    const ev = events.find((e: { action: string; subject: string }) => e.action === 'user.roles_changed' && e.subject === `user ${target}`);
    expect(ev.details).toEqual({ before: ['entrant'], after: ['entrant', 'judge'] });
    expect(ev.actor).toContain(demoEmail('admin'));
  });

  it('refuses unknown roles and bad ids with a message', async () => {
    const bad = await clients.admin.put('/api/admin/users/2/roles', { roles: ['overlord'] });
    expect(bad.status).toBe(400);
    expect((await bad.json()).fields['roles.0']).toBeTruthy();
    const badId = await clients.admin.put('/api/admin/users/abc/roles', { roles: [] });
    expect(badId.status).toBe(400);
    const missing = await clients.admin.put('/api/admin/users/99999/roles', { roles: [] });
    expect(missing.status).toBe(404);
  });

  it('an admin cannot remove their own admin role', async () => {
    const me = (await sql<{ id: number }>(dbFile, 'SELECT id FROM users WHERE email = ?', [demoEmail('admin')]))[0].id;
    const res = await clients.admin.put(`/api/admin/users/${me}/roles`, { roles: ['entrant'] });
    expect(res.status).toBe(409);
  });
});

describe('pages', () => {
  it('public pages are open to anonymous visitors', async () => {
    for (const p of ['/', '/seasons', '/seasons/frostbite-sprint', '/safety', '/signin', '/signup']) {
      expect((await new Client(base).get(p)).status, p).toBe(200);
    }
  });

  it('members pages send anonymous visitors to sign-in and refuse the wrong role with 403', async () => {
    const anon = await new Client(base).get('/organize');
    expect(anon.status).toBe(307);
    expect(anon.headers.get('location')).toContain('/signin?callbackUrl=%2Forganize');
    const wrong = await clients.entrant.get('/organize');
    expect(wrong.status).toBe(403);
    expect(await wrong.text()).toContain('Not for your role');
    expect((await clients.organizer.get('/organize')).status).toBe(200);
  });
});
