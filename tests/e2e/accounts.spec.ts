import { test, expect } from '@playwright/test';
import { signIn, readLatestMail, pathOfLink, demoEmail } from './helpers';
import { NAV } from '../../lib/nav';

test('sign up, confirm through the outbox, sign in and sign out', async ({ page, browser }) => {
  const email = `fresh.maker.${Date.now()}@example.org`;
  const password = 'my-long-password-1';
  await page.goto('/signup');
  // A short password is refused next to its field.
  await page.getByLabel('Name shown in standings').fill('Fresh Maker');
  await page.getByLabel('E-mail').fill(email);
  await page.getByLabel('Password').fill('short');
  await page.getByRole('button', { name: 'Create account' }).click();
  await expect(page.locator('#f-password-error')).toHaveText(/at least 10 characters/);
  await page.getByLabel('Password').fill(password);
  await page.getByRole('button', { name: 'Create account' }).click();
  await expect(page.getByRole('status')).toContainText('Check your inbox');

  const mail = await readLatestMail(browser, email, 'Confirm your e-mail for Hotlap');
  // In the outbox the mailed address is a link an admin can open.
  const adminCtx = await browser.newContext();
  const admin = await adminCtx.newPage();
  await signIn(admin, demoEmail('admin'));
  await admin.goto(`/admin/outbox?to=${encodeURIComponent(email)}`);
  const link = admin.getByTestId('outbox-message').filter({ hasText: 'Confirm your e-mail for Hotlap' }).first().getByTestId('mail-link').first();
  await expect(link).toBeVisible();
  expect(await link.getAttribute('href')).toContain(pathOfLink(mail, '/verify'));
  await adminCtx.close();
  await page.goto(pathOfLink(mail, '/verify'));
  await page.getByRole('button', { name: 'Confirm my e-mail' }).click();
  await expect(page.getByRole('status')).toContainText('is confirmed');

  await signIn(page, email, password);
  await expect(page.getByRole('navigation', { name: 'Main' }).getByRole('link', { name: 'My entries' })).toBeVisible();
  await page.getByRole('button', { name: 'Sign out' }).click();
  await expect(page.getByRole('link', { name: 'Sign in' })).toBeVisible();
});

test('password reset through the outbox', async ({ page, browser }) => {
  const email = demoEmail('sasha');
  await page.goto('/forgot');
  await page.getByLabel('E-mail').fill(email);
  await page.getByRole('button', { name: 'Send reset link' }).click();
  await expect(page.getByRole('status')).toContainText('If an account uses that address');
  const mail = await readLatestMail(browser, email, 'Choose a new Hotlap password');
  const link = pathOfLink(mail, '/reset');
  await page.goto(link);
  await page.getByLabel('New password').fill('sasha-new-password-9');
  await page.getByRole('button', { name: 'Save new password' }).click();
  await expect(page.getByRole('status')).toContainText('new password is saved');
  // The link works once.
  await page.goto(link);
  await page.getByLabel('New password').fill('sasha-new-password-10');
  await page.getByRole('button', { name: 'Save new password' }).click();
  await expect(page.getByTestId('form-error')).toContainText('already been used');
  await signIn(page, email, 'sasha-new-password-9');
});

test('wrong password shows a message that does not tell whether the account exists', async ({ page }) => {
  await page.goto('/signin');
  await page.getByLabel('E-mail').fill('nobody.at.all@example.org');
  await page.getByLabel('Password').fill('whatever-password');
  await page.getByRole('button', { name: 'Sign in' }).click();
  await expect(page.getByTestId('form-error')).toHaveText(/do not match/);
});

test('each demo role sees its own navigation', async ({ browser }) => {
  const expected: Record<string, string[]> = {
    entrant: ['My entries', 'Machines'],
    judge: ['My entries', 'Machines', 'Review desk'],
    organizer: ['My entries', 'Machines', 'Organize'],
    admin: ['My entries', 'Machines', 'Users', 'Audit log', 'Outbox'],
  };
  for (const [key, labels] of Object.entries(expected)) {
    const ctx = await browser.newContext();
    const page = await ctx.newPage();
    await signIn(page, demoEmail(key));
    const nav = page.getByRole('navigation', { name: 'Main' });
    for (const item of NAV) {
      const link = nav.getByRole('link', { name: item.label, exact: true });
      if (item.role === 'public' || labels.includes(item.label)) await expect(link, `${key} sees ${item.label}`).toBeVisible();
      else await expect(link, `${key} does not see ${item.label}`).toHaveCount(0);
    }
    await ctx.close();
  }
});

test('an anonymous visitor reads public pages and is sent to sign-in elsewhere', async ({ page }) => {
  await page.goto('/seasons/frostbite-sprint');
  await expect(page.getByRole('heading', { name: 'Frostbite Sprint' })).toBeVisible();
  await expect(page.getByText('Sparse infill', { exact: false }).first()).toBeVisible();
  await page.goto('/safety');
  await expect(page.getByText('thermal-runaway protection')).toBeVisible();
  await page.goto('/me');
  await expect(page).toHaveURL(/\/signin\?callbackUrl=%2Fme/);
});

test('an entrant opening an organizer-only page is refused', async ({ page }) => {
  await signIn(page, demoEmail('entrant'));
  const res = await page.goto('/organize');
  expect(res?.status()).toBe(403);
  await expect(page.getByTestId('forbidden')).toContainText('Not for your role');
});

test('an admin makes a user a judge and the audit log shows it', async ({ page }) => {
  await signIn(page, demoEmail('admin'));
  await page.goto('/admin/users');
  const row = page.getByTestId(`user-${demoEmail('pim')}`);
  await row.getByLabel('Judge').check();
  await row.getByRole('button', { name: 'Save roles' }).click();
  await expect(row.getByRole('status')).toHaveText('Saved');
  await page.goto('/admin/audit');
  const entry = page.getByRole('row').filter({ hasText: 'user.roles_changed' }).first();
  // A sentence, not the stored JSON.
  await expect(entry).toContainText('Rowan Pike changed Pim Okafor’s roles from Entrant to Entrant, Judge.');
  await expect(entry).not.toContainText('"after"');
  // Filter by action: only role changes remain; the filter is in the address.
  await page.getByLabel('Action').selectOption('user.roles_changed');
  await expect(page).toHaveURL(/action=user\.roles_changed/);
  await expect(page.getByTestId('audit-row').first()).toContainText('Roles changed');
  await expect(page.locator('[aria-busy="true"]')).toHaveCount(0);
  for (const row of await page.getByTestId('audit-row').all()) await expect(row).toContainText('user.roles_changed');
});
