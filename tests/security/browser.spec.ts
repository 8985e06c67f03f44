/**
 * The attacks that need a real browser (Debian's Chromium): a form on another site (another port
 * of the same host, so SameSite=Lax cookies ride along), the sign-in page's return address, and
 * the Content-Security-Policy against the app's own pages.
 */
import http from 'node:http';
import type { AddressInfo } from 'node:net';
import { test, expect, type Page } from '@playwright/test';
import { signIn, demoEmail, DEMO_PASSWORD } from '../e2e/helpers';
import { sql } from '../support/db';
import { HOSTILE_CALLBACKS } from './hostileCallbacks';

const db = () => process.env.HOTLAP_E2E_DB!;

/** Serves `html` from its own port on 127.0.0.1: another origin, the same site. */
async function otherSite(html: string) {
  const server = http.createServer((_req, res) => res.writeHead(200, { 'content-type': 'text/html' }).end(html));
  await new Promise<void>((r) => server.listen(0, '127.0.0.1', r));
  return { url: `http://127.0.0.1:${(server.address() as AddressInfo).port}/`, close: () => new Promise((r) => server.close(r)) };
}

const machinesOf = async (email: string) =>
  (await sql<{ n: number }>(db(), 'SELECT COUNT(*) AS n FROM machines m JOIN users u ON u.id = m.owner_id WHERE u.email = ?', [email]))[0].n;

test('attack: a form on another port posts to Hotlap for the signed-in visitor — nothing changes', async ({ page, baseURL }) => {
  const email = demoEmail('entrant');
  await signIn(page, email);
  const before = await machinesOf(email);
  const body = JSON.stringify({ name: 'Planted racer', motionSystem: 'corexy', buildXMm: 200, buildYMm: 200, buildZMm: 200, nozzleMm: 0.4 });
  const site = await otherSite(`<!doctype html><body>
    <form id="plain" method="POST" enctype="text/plain" action="${baseURL}/api/entrant/machines"><input name='${body.slice(0, -1)},"x":"' value='"}'></form>
    <script>
      fetch(${JSON.stringify(`${baseURL}/api/entrant/machines`)}, { method: 'POST', mode: 'no-cors', credentials: 'include', headers: { 'content-type': 'text/plain' }, body: ${JSON.stringify(body)} })
        .finally(() => document.getElementById('plain').submit());
    </script></body>`);
  try {
    const answer = page.waitForResponse((r) => r.url() === `${baseURL}/api/entrant/machines` && r.request().method() === 'POST' && r.request().resourceType() === 'document');
    await page.goto(site.url);
    const res = await answer;
    expect(res.status()).toBe(403);
    expect(await machinesOf(email)).toBe(before);
  } finally {
    await site.close();
  }
});

test('attack: the sign-in page never leaves the site, whatever callbackUrl it is given', async ({ page, baseURL }) => {
  test.setTimeout(180_000);
  const origin = new URL(baseURL!).origin;
  for (const callbackUrl of HOSTILE_CALLBACKS) {
    await page.context().clearCookies();
    await page.goto(`/signin?callbackUrl=${encodeURIComponent(callbackUrl)}`);
    await page.getByLabel('E-mail').fill(demoEmail('entrant'));
    await page.getByLabel('Password').fill(DEMO_PASSWORD);
    await page.getByRole('button', { name: 'Sign in' }).click();
    await expect(page.getByTestId('signed-in-as')).toBeVisible();
    expect(new URL(page.url()).origin, callbackUrl).toBe(origin);
  }
});

/** Collects console errors and CSP violations (the page reports them to a listener set before any script). */
async function watch(page: Page) {
  const problems: string[] = [];
  page.on('console', (m) => m.type() === 'error' && problems.push(`console: ${m.text()}`));
  page.on('pageerror', (e) => problems.push(`pageerror: ${e.message}`));
  await page.addInitScript(() => {
    document.addEventListener('securitypolicyviolation', (e) => console.error(`CSP violation: ${e.violatedDirective} ${e.blockedURI}`));
  });
  return problems;
}

const SCREENS: Record<string, string[]> = {
  anonymous: ['/', '/seasons', '/seasons/frostbite-sprint', '/seasons/frostbite-sprint/rulebook', '/seasons/frostbite-sprint/overview', '/safety', '/api-docs', '/signin', '/signup', '/forgot'],
  entrant: ['/me', '/me/machines', '/me/entries/new?season=frostbite-sprint', '/account'],
  judge: ['/judging', '/account'],
  organizer: ['/organize', '/organize/seasons/new', '/organize/seasons/{season}', '/account'],
  admin: ['/admin/users', '/admin/audit', '/admin/outbox', '/account'],
};

for (const [who, paths] of Object.entries(SCREENS)) {
  test(`the CSP lets every main screen of the ${who} run with no console error`, async ({ page }) => {
    test.setTimeout(120_000);
    const problems = await watch(page);
    if (who !== 'anonymous') await signIn(page, demoEmail(who));
    const season = (await sql<{ id: number }>(db(), "SELECT id FROM seasons WHERE slug = 'frostbite-sprint'"))[0].id;
    for (const p of paths.map((x) => x.replace('{season}', String(season)))) {
      const res = await page.goto(p);
      expect(res?.status(), p).toBeLessThan(400);
      expect(res?.headers()['content-security-policy'], p).toContain("'strict-dynamic'");
      await page.waitForLoadState('networkidle');
    }
    expect(problems).toEqual([]);
  });
}
