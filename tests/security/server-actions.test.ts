/**
 * Attack: a form on another site posts to one of Hotlap's server actions (subscribing the signed-in
 * visitor to a season's mails here). Server actions do not go through route(); Next.js compares
 * their Origin with the Host itself — proven here against the running app rather than assumed.
 */
import fs from 'node:fs';
import path from 'node:path';
import { describe, it, expect, inject, beforeAll } from 'vitest';
import { Client } from '../support/client';
import { sql } from '../support/db';
import { freshEntrant } from '../support/demo';

const base = inject('baseUrl');
const dbFile = inject('dbFile');
const otherPort = base.replace(/:(\d+)$/, (_m, p) => `:${Number(p) + 1}`);

/** The build's id for the toggleSubscription action (it changes with every build). */
function actionId(name: string): string {
  const manifest = path.resolve(__dirname, '..', '..', process.env.NEXT_DIST_DIR || '.next', 'server', 'server-reference-manifest.json');
  const node = JSON.parse(fs.readFileSync(manifest, 'utf8')).node as Record<string, { exportedName?: string }>;
  const id = Object.entries(node).find(([, v]) => v.exportedName === name)?.[0];
  if (!id) throw new Error(`No server action named ${name} in ${manifest}`);
  return id;
}

let visitor: Client & { email: string };
const subscriptions = async () =>
  (await sql<{ n: number }>(dbFile, 'SELECT COUNT(*) AS n FROM season_subscriptions s JOIN users u ON u.id = s.user_id WHERE u.email = ?', [visitor.email]))[0].n;

function post(origin: string) {
  const form = new FormData();
  form.set(`$ACTION_ID_${actionId('toggleSubscription')}`, '');
  form.set('slug', 'frostbite-sprint');
  form.set('on', '1');
  form.set('back', '/seasons/frostbite-sprint');
  return visitor.request('/seasons/frostbite-sprint', { method: 'POST', headers: { origin }, body: form });
}

beforeAll(async () => {
  visitor = await freshEntrant(base, dbFile, 'Action Visitor');
});

describe('server actions', () => {
  it('attack: a cross-origin form post to a server action changes nothing', async () => {
    const res = await post(otherPort);
    expect(res.status).toBeGreaterThanOrEqual(400);
    expect(await subscriptions()).toBe(0);
  });

  it('the same post from the app’s own origin works (so the refusal above is the origin check)', async () => {
    const res = await post(base);
    expect(res.status).toBeLessThan(400);
    expect(await subscriptions()).toBe(1);
  });
});
