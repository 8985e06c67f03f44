import { expect, type Browser, type Page } from '@playwright/test';
import { DEMO_PASSWORD, DEMO_USERS } from '../../lib/seed';

export const demoEmail = (key: string) => DEMO_USERS.find((u) => u.key === key)!.email;
export { DEMO_PASSWORD };

export async function signIn(page: Page, email: string, password = DEMO_PASSWORD) {
  await page.goto('/signin');
  await page.getByLabel('E-mail').fill(email);
  await page.getByLabel('Password').fill(password);
  await page.getByRole('button', { name: 'Sign in' }).click();
  await expect(page.getByTestId('signed-in-as')).toBeVisible();
}

/** Opens the fake outbox as the demo admin in a separate browser context and returns the newest message's text. */
export async function readLatestMail(browser: Browser, to: string, subject: string): Promise<string> {
  const ctx = await browser.newContext();
  const page = await ctx.newPage();
  await signIn(page, demoEmail('admin'));
  await page.goto(`/admin/outbox?to=${encodeURIComponent(to)}`);
  const message = page.getByTestId('outbox-message').filter({ hasText: subject }).first();
  await expect(message).toBeVisible();
  const text = await message.getByTestId('mail-text').innerText();
  await ctx.close();
  return text;
}

export function pathOfLink(text: string, prefix: string): string {
  const m = text.match(new RegExp(`https?://[^\\s]+?(${prefix}\\?token=[A-Za-z0-9_-]+)`));
  if (!m) throw new Error(`no ${prefix} link in mail:\n${text}`);
  return m[1];
}
