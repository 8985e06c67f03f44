import { test, expect, type Page } from '@playwright/test';
import fs from 'node:fs';
import { signIn, demoEmail } from './helpers';
import { createReviewableEntry, userId } from '../support/judging-fixtures';
import { sql } from '../support/db';
import { REASON_CODES } from '../../lib/reviews/reasons';

const db = () => {
  const f = process.env.HOTLAP_E2E_DB;
  if (!f) throw new Error('HOTLAP_E2E_DB is not set: run through playwright.config.ts (global setup).');
  return f;
};
/** Screenshots to look at by eye (outside the test output folder, which Playwright clears). */
const SHOTS = process.env.HOTLAP_SHOTS_DIR || '/tmp/shots-h19a';

const heading = (page: Page, id: number) => page.getByRole('heading', { name: `Entry #${id}`, exact: true });

test('a judge works three entries in a row with previous/next, switches the preview colour and opens the 3-D view, without going back to the queue', async ({ page }) => {
  test.setTimeout(240_000);
  fs.mkdirSync(SHOTS, { recursive: true });
  // Three timed prints submitted later than anything else, so "newest first" lists them first: C, B, A.
  const at = (d: number) => new Date(Date.UTC(2030, 0, d, 12));
  const { entryId: a } = await createReviewableEntry(db(), { entrant: 'sasha', claimedTimeMs: 1_700_000, submittedAt: at(1) });
  const { entryId: b } = await createReviewableEntry(db(), { entrant: 'sasha', claimedTimeMs: 1_620_000, submittedAt: at(2), fixture: 'slic3r-beacon-020.gcode.gz' });
  const { entryId: c } = await createReviewableEntry(db(), { entrant: 'sasha', claimedTimeMs: 1_640_000, submittedAt: at(3) });

  await page.setViewportSize({ width: 1400, height: 900 });
  await signIn(page, demoEmail('judge'));
  await page.goto('/judging?sort=newest');
  await expect(page.getByTestId('queue-row').first()).toContainText(`Review #${c}`);
  await page.getByRole('link', { name: `Review #${c}` }).click();
  await expect(heading(page, c)).toBeVisible();
  await expect(page.getByTestId('queue-position')).toContainText('Entry 1 of');
  // The queue's sort travels with the judge.
  expect(new URL(page.url()).searchParams.get('sort')).toBe('newest');

  // Next and previous without the queue.
  await page.getByRole('link', { name: `Next entry (#${b})` }).click();
  await expect(heading(page, b)).toBeVisible();
  await expect(page.getByTestId('queue-position')).toContainText('Entry 2 of');
  await page.getByRole('link', { name: `Previous entry (#${c})` }).click();
  await expect(heading(page, c)).toBeVisible();

  // Wide screen: evidence beside the preview at the same height; the decision stays in view while scrolling.
  await expect(page.getByTestId('layer-slider')).toBeVisible({ timeout: 20_000 });
  const photosBox = await page.getByTestId('evidence-row').locator('> section').nth(0).boundingBox();
  const previewBox = await page.getByTestId('evidence-row').locator('> section').nth(1).boundingBox();
  expect(Math.abs(photosBox!.y - previewBox!.y)).toBeLessThan(2);
  expect(Math.abs(photosBox!.height - previewBox!.height)).toBeLessThan(2);
  expect(previewBox!.x).toBeGreaterThan(photosBox!.x + photosBox!.width - 1);
  await page.screenshot({ path: `${SHOTS}/desk-1400x900.png` });
  await page.screenshot({ path: `${SHOTS}/desk-1400x900-full.png`, fullPage: true });
  await page.mouse.wheel(0, 1800);
  await expect.poll(() => page.evaluate(() => window.scrollY)).toBeGreaterThan(1000);
  const aside = await page.getByTestId('decision-aside').boundingBox();
  expect(aside!.y).toBeGreaterThanOrEqual(0);
  expect(aside!.y).toBeLessThan(100);
  await page.screenshot({ path: `${SHOTS}/desk-1400x900-scrolled.png` });
  await page.evaluate(() => window.scrollTo(0, 0));

  // The photo lightbox: arrows move, Esc closes.
  await page.getByRole('button', { name: /Open beacon-photo/ }).first().click();
  const dialog = page.getByRole('dialog');
  await expect(dialog).toHaveAccessibleName(/Photo 1 of 2/);
  await page.keyboard.press('ArrowRight');
  await expect(dialog).toHaveAccessibleName(/Photo 2 of 2/);
  await expect(dialog).toContainText('captured 2026-11-25 18:05:02');
  await dialog.getByRole('button', { name: 'Zoom in' }).click();
  await expect(dialog).toContainText('2×');
  await page.keyboard.press('Escape');
  await expect(dialog).toHaveCount(0);

  // Colour modes: each has its own legend with rounded bands.
  const canvas = page.getByTestId('preview-canvas');
  const title = page.getByTestId('legend-title');
  await expect(title).toHaveText('Commanded flow, mm³/s');
  for (const [label, mode, legend] of [['Speed', 'speed', 'Speed, mm/s'], ['Line width', 'width', 'Line width, mm'], ['Layer time', 'layerTime', 'Layer time, s']] as const) {
    await page.getByTestId('preview-modes').getByLabel(label).check();
    await expect(title).toHaveText(legend);
    await expect(canvas).toHaveAttribute('data-mode', mode);
    const bands = await page.getByTestId('mode-legend').locator('li').allInnerTexts();
    expect(bands.length).toBeGreaterThan(0);
    // Rounded band edges: "a–b" with at most two decimals.
    for (const t of bands) expect(t).toMatch(/^(\d+(\.\d{1,2})?–\d+(\.\d{1,2})?|[<≥] \d+(\.\d{1,2})?)\s/);
    console.log(`${label} legend: ${bands.map((t) => t.replace(/\s+/g, ' ')).join(' | ')}`);
  }
  await page.getByTestId('preview-modes').getByLabel('Speed').check();
  await page.getByTestId('layer-preview').screenshot({ path: `${SHOTS}/preview-speed.png` });

  // The 3-D view: its code loads only when opened.
  const scriptsBefore = await page.evaluate(() => performance.getEntriesByType('resource').filter((r) => r.name.endsWith('.js')).length);
  await page.getByTestId('toggle-3d').click();
  await expect(page.getByTestId('preview-3d')).toBeVisible({ timeout: 20_000 });
  const scriptsAfter = await page.evaluate(() => performance.getEntriesByType('resource').filter((r) => r.name.endsWith('.js')).length);
  expect(scriptsAfter).toBeGreaterThan(scriptsBefore);
  await expect(page.getByTestId('preview-3d-canvas').locator('canvas')).toBeVisible();
  await page.getByTestId('range-from').fill('1');
  await expect(page.getByTestId('range-readout')).toContainText('Preview levels 1–');
  await page.waitForTimeout(500);
  await page.getByTestId('preview-3d').screenshot({ path: `${SHOTS}/preview-3d.png` });

  // Decide C → on to B; verify B → on to A; reject A → on to whatever follows. No visit to the queue.
  await page.getByLabel('Reject', { exact: true }).check();
  await page.getByLabel(REASON_CODES.timing_unconfirmed.label).check();
  await page.getByLabel('Note to the entrant').fill('The video stops before the last layer.');
  await page.getByRole('button', { name: 'Record decision' }).click();
  await expect(heading(page, b)).toBeVisible({ timeout: 30_000 });
  await expect(page.getByTestId('decision-result')).toContainText(`entry #${c}: it is now rejected`);
  expect(new URL(page.url()).searchParams.get('sort')).toBe('newest');

  await page.getByLabel('Verify', { exact: true }).check();
  await page.getByLabel(REASON_CODES.evidence_consistent.label).check();
  await page.getByLabel('Note to the entrant').fill('Timing matches the video.');
  await page.getByRole('button', { name: 'Record decision' }).click();
  await expect(heading(page, a)).toBeVisible({ timeout: 30_000 });
  await expect(page.getByTestId('decision-result')).toContainText(`entry #${b}: it is now verified`);

  // Phone: everything stacks, the preview fits the width, nothing scrolls sideways.
  await page.setViewportSize({ width: 390, height: 844 });
  await expect(page.getByTestId('layer-slider')).toBeVisible({ timeout: 20_000 });
  await expect.poll(async () => (await canvas.boundingBox())!.width).toBeLessThanOrEqual(390 - 16);
  const wide = await page.evaluate(() =>
    [...document.querySelectorAll('body *')].filter((el) => el.getBoundingClientRect().right > 390.5).slice(0, 8).map((el) => `${el.tagName.toLowerCase()}.${String(el.className).slice(0, 60)} right=${el.getBoundingClientRect().right.toFixed(0)}`),
  );
  expect(wide, 'elements wider than the phone').toEqual([]);
  expect(await page.evaluate(() => document.documentElement.scrollWidth)).toBeLessThanOrEqual(390);
  await page.screenshot({ path: `${SHOTS}/desk-390x844.png` });
  await page.screenshot({ path: `${SHOTS}/desk-390x844-full.png`, fullPage: true });
  await page.setViewportSize({ width: 1400, height: 900 });

  await page.getByLabel('Reject', { exact: true }).check();
  await page.getByLabel(REASON_CODES.timing_unconfirmed.label).check();
  await page.getByRole('button', { name: 'Record decision' }).click();
  // A reject without a note stays on this entry, with the sentence beside the field.
  await expect(page.getByText('Write a note for the entrant')).toBeVisible();
  await expect(heading(page, a)).toBeVisible();
  await page.getByLabel('Note to the entrant').fill('The photos show a different part.');
  await page.getByRole('button', { name: 'Record decision' }).click();
  await expect(page.getByTestId('decision-result')).toContainText(`entry #${a}: it is now rejected`, { timeout: 30_000 });

  // The queue's decided view lists all three with their decisions, and search finds them by machine.
  await page.goto('/judging?view=decided&q=Tripod&sort=decided');
  const rows = page.getByTestId('queue-row');
  await expect(rows.filter({ hasText: `Review #${a}` })).toContainText('rejected by you');
  await expect(rows.filter({ hasText: `Review #${b}` })).toContainText('verified by you');
  await expect(rows.filter({ hasText: `Review #${c}` })).toContainText('rejected by you');
  await expect(rows.first()).toContainText(`Review #${a}`);
  await page.screenshot({ path: `${SHOTS}/queue-decided-1400x900.png`, fullPage: true });
  // A search longer than allowed is refused with a sentence, not an error page.
  await page.goto(`/judging?q=${'x'.repeat(81)}`);
  await expect(page.locator('p.field-error[role=alert]')).toContainText('Search for at most 80 characters.');
});

test('a judge opening their own entry is told why, not that the page is not for their role', async ({ page }) => {
  const [own] = await sql<{ id: number }>(db(), "SELECT id FROM entries WHERE entrant_id = ? AND state <> 'draft' ORDER BY id LIMIT 1", [await userId(db(), 'judge2')]);
  await signIn(page, demoEmail('judge2'));
  const res = await page.goto(`/judging/entries/${own.id}`);
  expect(res?.status()).toBe(403);
  await expect(page.getByRole('heading', { name: 'You cannot judge this entry' })).toBeVisible();
  await expect(page.getByTestId('forbidden-reason')).toHaveText('You cannot judge your own entry: another judge of the season reviews it.');
  await expect(page.getByText('Not for your role')).toHaveCount(0);
});
