/**
 * Attack: another site (even another port of the same host) makes the signed-in visitor's browser
 * post to Hotlap — a text/plain, urlencoded or multipart form, or a fetch with the visitor's cookie.
 * route() refuses a foreign Origin / Sec-Fetch-Site, and JSON routes take only application/json.
 */
import { describe, it, expect, inject, beforeAll } from 'vitest';
import { Client } from '../support/client';
import { sql } from '../support/db';
import { freshEntrant } from '../support/demo';

const base = inject('baseUrl');
const dbFile = inject('dbFile');
const otherPort = base.replace(/:(\d+)$/, (_m, p) => `:${Number(p) + 1}`);
const machine = { name: 'Cross-site racer', motionSystem: 'corexy', buildXMm: 250, buildYMm: 250, buildZMm: 240, nozzleMm: 0.4 };

let entrant: Client & { email: string };
const machineCount = async () =>
  (await sql<{ n: number }>(dbFile, 'SELECT COUNT(*) AS n FROM machines m JOIN users u ON u.id = m.owner_id WHERE u.email = ?', [entrant.email]))[0].n;

beforeAll(async () => {
  entrant = await freshEntrant(base, dbFile, 'Cross Site');
});

describe('cross-site requests', () => {
  it('attack: a text/plain form post from another port creates nothing (403, then 415 without Origin)', async () => {
    const before = await machineCount();
    const res = await entrant.request('/api/entrant/machines', {
      method: 'POST',
      headers: { 'content-type': 'text/plain', origin: otherPort, 'sec-fetch-site': 'same-site' },
      body: JSON.stringify(machine),
    });
    expect(res.status).toBe(403);
    expect((await res.json()).error).toMatch(/another site/);
    // Even with the Origin stripped (no browser does that), a text/plain body is not JSON to us.
    const plain = await entrant.request('/api/entrant/machines', { method: 'POST', headers: { 'content-type': 'text/plain' }, body: JSON.stringify(machine) });
    expect(plain.status).toBe(415);
    expect((await plain.json()).error).toMatch(/Content-Type: application\/json/);
    expect(await machineCount()).toBe(before);
  });

  it('attack: urlencoded and multipart bodies to a JSON route are refused with 415', async () => {
    const before = await machineCount();
    const form = await entrant.request('/api/entrant/machines', {
      method: 'POST',
      headers: { 'content-type': 'application/x-www-form-urlencoded' },
      body: new URLSearchParams(Object.entries(machine).map(([k, v]) => [k, String(v)])).toString(),
    });
    expect(form.status).toBe(415);
    const fd = new FormData();
    for (const [k, v] of Object.entries(machine)) fd.set(k, String(v));
    const multi = await entrant.request('/api/entrant/machines', { method: 'POST', body: fd });
    expect(multi.status).toBe(415);
    expect(await machineCount()).toBe(before);
  });

  it('attack: Sec-Fetch-Site cross-site without an Origin is refused', async () => {
    const res = await entrant.request('/api/entrant/machines', { method: 'POST', headers: { 'sec-fetch-site': 'cross-site' }, json: machine });
    expect(res.status).toBe(403);
  });

  it('the app itself (same Origin) and non-browser clients (neither header) still work', async () => {
    const before = await machineCount();
    expect((await entrant.request('/api/entrant/machines', { method: 'POST', headers: { origin: base, 'sec-fetch-site': 'same-origin' }, json: machine })).status).toBe(201);
    expect((await entrant.request('/api/entrant/machines', { method: 'POST', json: { ...machine, name: 'Script racer' } })).status).toBe(201);
    expect(await machineCount()).toBe(before + 2);
  });

  it('the same server reached under another name (localhost where APP_URL says 127.0.0.1) is this site; a page on another name is not', async () => {
    const before = await machineCount();
    const byName = base.replace('127.0.0.1', 'localhost');
    // The browser's Host and Origin agree: the visitor opened this server as http://localhost:PORT.
    const cookie = (entrant as unknown as { cookieHeader(): string }).cookieHeader();
    const same = await fetch(`${byName}/api/entrant/machines`, {
      method: 'POST',
      headers: { cookie, origin: byName, 'sec-fetch-site': 'same-origin', 'content-type': 'application/json' },
      body: JSON.stringify({ ...machine, name: 'Reached by name' }),
    });
    expect(same.status).toBe(201);
    // A page served from localhost posting to 127.0.0.1 is another origin (Host 127.0.0.1:PORT).
    const other = await entrant.request('/api/entrant/machines', { method: 'POST', headers: { origin: byName, 'sec-fetch-site': 'cross-site' }, json: machine });
    expect(other.status).toBe(403);
    expect(await machineCount()).toBe(before + 1);
  });

  it('attack: a cross-site post to sign-in or sign-out is refused too (next-auth goes through the same check)', async () => {
    const res = await entrant.request('/api/auth/signout', {
      method: 'POST',
      headers: { origin: otherPort, 'content-type': 'application/x-www-form-urlencoded' },
      body: 'csrfToken=x&json=true',
    });
    expect(res.status).toBe(403);
  });
});
