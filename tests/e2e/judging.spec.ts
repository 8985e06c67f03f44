import { test, expect } from '@playwright/test';
import { signIn, readLatestMail, demoEmail } from './helpers';
import { createReviewableEntry } from '../support/judging-fixtures';
import { REASON_CODES } from '../../lib/reviews/reasons';

const db = () => {
  const f = process.env.HOTLAP_E2E_DB;
  if (!f) throw new Error('HOTLAP_E2E_DB is not set: run through playwright.config.ts (global setup).');
  return f;
};

test('a judge reviews an entry, steps through the preview layers, rejects it with two reasons, then verifies another that enters the standings', async ({ page, browser }) => {
  test.setTimeout(180_000);
  const { entryId: rejected } = await createReviewableEntry(db(), { entrant: 'sasha', claimedTimeMs: 1_640_000 });
  const { entryId: verified } = await createReviewableEntry(db(), { entrant: 'sasha', claimedTimeMs: 1_590_000, fixture: 'slic3r-beacon-020.gcode.gz' });

  await signIn(page, demoEmail('judge'));
  await page.goto('/judging');
  await expect(page.getByRole('heading', { name: 'Review desk' })).toBeVisible();
  await page.screenshot({ path: test.info().outputPath('judging-queue.png'), fullPage: true });
  await page.getByRole('link', { name: `Review #${rejected}` }).click();
  await expect(page.getByRole('heading', { name: `Entry #${rejected}` })).toBeVisible();
  await expect(page.getByTestId('claimed-time')).toHaveText('0:27:20.0');
  await expect(page.getByTestId('rule-results')).toBeVisible();
  await expect(page.getByTestId('flow-chart')).toBeVisible();

  // Photos open at full size with their capture time.
  await page.getByRole('button', { name: /Open beacon-photo/ }).first().click();
  const dialog = page.getByRole('dialog');
  await expect(dialog.getByTestId('photo-full')).toBeVisible();
  await expect(dialog).toContainText('captured 2026-11-25 18:04:31');
  await page.keyboard.press('Escape');
  await expect(dialog).toHaveCount(0);

  // Step through layers of the toolpath preview.
  const slider = page.getByTestId('layer-slider');
  await expect(slider).toBeVisible({ timeout: 20_000 });
  const readout = page.getByTestId('layer-readout');
  const layerNo = async () => Number((await readout.innerText()).match(/Layer (\d+) \//)![1]);
  const start = await layerNo();
  await slider.focus();
  for (let i = 0; i < 5; i++) await page.keyboard.press('ArrowRight');
  await expect.poll(layerNo).toBe(start + 5);
  await page.getByRole('button', { name: 'Previous layer' }).click();
  await expect.poll(layerNo).toBe(start + 4);
  // Layers are numbered as the report counts them ("N layers of" in the inspection summary), even
  // where the preview draws an extra Z level (a prime line or purge) the report does not count.
  const reportLayers = Number((await page.getByText(/\d+ layers of/).first().innerText()).match(/(\d+) layers of/)![1]);
  const lastIndex = Number(await slider.getAttribute('max'));
  await slider.fill('0');
  await expect(readout).toContainText(`Layer 1 / ${reportLayers} ·`);
  await slider.fill(String(lastIndex));
  await expect(readout).toContainText(`Layer ${reportLayers} / ${reportLayers} ·`);
  await expect(page.getByText('Commanded flow, mm³/s')).toBeVisible();
  await expect(page.getByTestId('flow-legend').locator('li').first()).toBeVisible();
  await page.getByTestId('layer-preview').screenshot({ path: test.info().outputPath('judging-preview.png') });
  // A figure for the report, not an assertion: step through every layer in the page, one frame each.
  const total = lastIndex + 1;
  await slider.fill('0');
  const elapsedMs = await page.evaluate(async (n) => {
    const next = document.querySelector<HTMLButtonElement>('[aria-label="Next layer"]')!;
    const t0 = performance.now();
    for (let i = 1; i < n; i++) {
      next.click();
      await new Promise((r) => requestAnimationFrame(() => r(null)));
    }
    return performance.now() - t0;
  }, total);
  await expect(readout).toContainText(`Layer ${reportLayers} / ${reportLayers} ·`);
  const canvasEl = page.getByTestId('preview-canvas');
  const [drawMaxMs, drawSumMs, draws] = await Promise.all(['data-draw-ms-max', 'data-draw-ms-sum', 'data-draws'].map((a) => canvasEl.getAttribute(a).then(Number)));
  console.log(
    `stepped through ${total} preview layers in ${elapsedMs.toFixed(0)} ms, one animation frame each; layer decode + draw: mean ${(drawSumMs / draws).toFixed(2)} ms, slowest ${drawMaxMs} ms over ${draws} draws (headless Chromium, software rendering)`,
  );

  // Reject with two reasons.
  await page.getByLabel('Reject', { exact: true }).check();
  await page.getByLabel(REASON_CODES.timing_unconfirmed.label).check();
  await page.getByLabel(REASON_CODES.cooling_flaws.label).check();
  await page.getByLabel('Note to the entrant').fill('The video stops before the last layer and the bridge window droops.');
  await page.getByRole('button', { name: 'Record decision' }).click();
  await expect(page.getByTestId('decision-result')).toContainText('now rejected', { timeout: 30_000 });
  await page.screenshot({ path: test.info().outputPath('judging-review.png'), fullPage: true });

  const mail = await readLatestMail(browser, demoEmail('sasha'), `#${rejected} was rejected`);
  expect(mail).toContain(REASON_CODES.timing_unconfirmed.label);
  expect(mail).toContain(REASON_CODES.cooling_flaws.label);
  expect(mail).toContain('bridge window droops');

  // The rejected entry has left the queue; verify the other one.
  await page.goto('/judging');
  await expect(page.getByRole('link', { name: `Review #${rejected}` })).toHaveCount(0);
  await page.getByRole('link', { name: `Review #${verified}` }).click();
  await page.getByLabel('Verify', { exact: true }).check();
  await page.getByLabel(REASON_CODES.evidence_consistent.label).check();
  await page.getByLabel('Note to the entrant').fill('Timing matches the video; clean overhang.');
  await page.getByRole('button', { name: 'Record decision' }).click();
  await expect(page.getByTestId('decision-result')).toContainText('now verified', { timeout: 30_000 });

  // It counts: the class standings show it.
  await page.goto('/seasons/frostbite-sprint/classes/open-04');
  await expect(page.locator(`[data-testid="standings-row"][data-entry="${verified}"]`)).toBeVisible();
  await expect(page.locator(`[data-testid="standings-row"][data-entry="${rejected}"]`)).toHaveCount(0);
});

test('an entry that has not been inspected yet opens on the review desk without a preview', async ({ page }) => {
  await signIn(page, demoEmail('judge'));
  await page.goto('/judging');
  // The demo's own submitted entry by Sasha has no G-code on file.
  const row = page.getByTestId('queue-row').filter({ hasText: 'not inspected' }).first();
  await row.getByRole('link', { name: /Review #/ }).click();
  await expect(page.getByText('This entry has not been inspected yet.')).toBeVisible();
  await expect(page.getByTestId('layer-preview')).toHaveCount(0);
  await expect(page.getByRole('button', { name: 'Record decision' })).toBeVisible();
});
