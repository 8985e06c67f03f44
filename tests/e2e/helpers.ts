import { expect, type Browser, type Page } from '@playwright/test';
import { DEMO_PASSWORD, demoEmail, linkIn } from '../support/demo';

export { DEMO_PASSWORD, demoEmail };

export async function signIn(page: Page, email: string, password = DEMO_PASSWORD) {
  await page.goto('/signin');
  await page.getByLabel('E-mail').fill(email);
  await page.getByLabel('Password').fill(password);
  await page.getByRole('button', { name: 'Sign in' }).click();
  // Attached, not visible: on a phone the account link sits in the folded header menu.
  await expect(page.getByTestId('signed-in-as')).toBeAttached();
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

/** The path + query of a mailed link, e.g. "/verify?token=…". */
export const pathOfLink = linkIn;
