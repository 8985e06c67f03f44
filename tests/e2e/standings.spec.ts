import fs from 'node:fs';
import { test, expect, type Page } from '@playwright/test';
import { insertEntrant, insertEntry, insertMachine, insertSeason } from '../support/standings-fixtures';
import { parseCsv } from '../../lib/standings/csv';

const db = () => {
  const f = process.env.HOTLAP_E2E_DB;
  if (!f) throw new Error('HOTLAP_E2E_DB is set by tests/e2e/global-setup.ts');
  return f;
};

let slug: string;
let repeatEntrant: string;

test.beforeAll(async () => {
  const s = await insertSeason(db(), { classes: ['open'], name: 'Standings Trial' });
  slug = s.slug;
  // 30 entrants, alternating PLA and PETG, distinct peak flows; the first also has a slower second print.
  for (let i = 0; i < 30; i++) {
    const who = await insertEntrant(db(), `Trial Entrant ${String(i).padStart(2, '0')}`);
    const m = await insertMachine(db(), who, `Trial Rig ${i}`, i % 3 === 0 ? 'cartesian' : 'corexy');
    const base = { seasonId: s.seasonId, classId: s.classIds.open, entrantId: who, machineId: m };
    await insertEntry(db(), { ...base, timeMs: 1_200_000 + i * 7_000, submittedAt: `2026-11-${String(2 + (i % 20)).padStart(2, '0')}T10:00:00Z`, material: i % 2 ? 'petg' : 'pla', peak: 20 + ((i * 7) % 30) + i / 100 });
    if (i === 0) {
      await insertEntry(db(), { ...base, timeMs: 1_500_000, submittedAt: '2026-11-25T10:00:00Z', material: 'pla', peak: 18 });
      repeatEntrant = `Trial Entrant 00`;
    }
  }
});

async function tableRows(page: Page) {
  return page.getByTestId('standings-row').evaluateAll((rows) =>
    rows.map((r) => ({ entry: Number(r.getAttribute('data-entry')), cells: [...r.querySelectorAll('td')].map((td) => ((td.querySelector('a') ?? td).textContent ?? '').trim()) })),
  );
}

test('a viewer filters, sorts and pages a class, shares the link, and downloads the same rows as CSV', async ({ page, browser }) => {
  await page.goto(`/seasons/${slug}`);
  await page.getByRole('link', { name: 'Class open' }).click();
  await expect(page.getByRole('heading', { name: 'Class open' })).toBeVisible();
  await expect(page.getByTestId('page-status')).toHaveText(/30 ranked/);

  // Filter by material.
  await page.getByLabel('Material').selectOption('pla');
  await expect(page).toHaveURL(/material=pla/);
  await expect(page.getByTestId('page-status')).toHaveText(/15 ranked/);
  const materials = (await tableRows(page)).map((r) => r.cells[6]);
  expect(new Set(materials)).toEqual(new Set(['PLA']));

  // Sort by peak flow: highest first on the first click.
  await page.getByRole('link', { name: /Peak flow/ }).click();
  await expect(page).toHaveURL(/sort=-peak_flow/);
  await expect(page.getByRole('columnheader', { name: /Peak flow/ })).toHaveAttribute('aria-sort', 'descending');
  await expect.poll(async () => {
    const peaks = (await tableRows(page)).map((r) => Number(r.cells[8]));
    return peaks.length > 1 && peaks.every((p, i) => i === 0 || peaks[i - 1] >= p);
  }).toBe(true);

  // Ten rows a page, then the second page.
  await page.getByLabel('Rows per page').selectOption('10');
  await expect(page).toHaveURL(/per_page=10/);
  await expect(page.getByTestId('page-status')).toHaveText('Page 1 of 2 · 15 ranked');
  await page.getByRole('link', { name: 'Next page' }).click();
  await expect(page).toHaveURL(/page=2/);
  await expect(page.getByTestId('page-status')).toHaveText('Page 2 of 2 · 15 ranked');
  await expect(page.getByTestId('standings-row')).toHaveCount(5);
  const shown = await tableRows(page);

  // The URL reproduces the view in a fresh browser.
  const url = page.url();
  const ctx = await browser.newContext();
  const other = await ctx.newPage();
  await other.goto(url);
  await expect(other.getByTestId('page-status')).toHaveText('Page 2 of 2 · 15 ranked');
  await expect(other.getByLabel('Material')).toHaveValue('pla');
  await expect(other.getByLabel('Rows per page')).toHaveValue('10');
  expect(await tableRows(other)).toEqual(shown);
  await ctx.close();

  // The CSV of the view holds every filtered, sorted row; rows 11–15 are the ones on screen.
  const [download] = await Promise.all([page.waitForEvent('download'), page.getByTestId('csv-link').click()]);
  expect(download.suggestedFilename()).toMatch(/-open-standings\.csv$/);
  const [header, ...csv] = parseCsv(fs.readFileSync((await download.path())!, 'utf8'));
  expect(header.slice(0, 4)).toEqual(['rank', 'entry_id', 'entrant', 'machine']);
  expect(csv).toHaveLength(15);
  const onScreen = csv.slice(10, 15);
  expect(onScreen.map((r) => Number(r[1]))).toEqual(shown.map((r) => r.entry));
  expect(onScreen.map((r) => [r[0], r[2], r[3]])).toEqual(shown.map((r) => [r.cells[0], r.cells[1], r.cells[4]]));
  expect(onScreen.map((r) => Number(r[8]).toFixed(1))).toEqual(shown.map((r) => r.cells[8]));
});

test('search as you type narrows the class, and Rank sorts both ways', async ({ page }) => {
  await page.goto(`/seasons/${slug}/classes/open`);
  await page.getByLabel('Machine name').fill('Rig 1');
  // "Rig 1" and "Rig 10"–"Rig 19": eleven machines, found a moment after the last key.
  await expect(page).toHaveURL(/q=Rig\+1/);
  await expect(page.getByTestId('page-status')).toHaveText(/11 ranked/);
  await expect(page.getByLabel('Machine name')).toBeFocused();
  await page.getByRole('link', { name: /^Rank/ }).click();
  await expect(page).toHaveURL(/sort=-rank/);
  await expect(page.getByRole('columnheader', { name: /Rank/ })).toHaveAttribute('aria-sort', 'descending');
  const ranks = (await tableRows(page)).map((r) => Number(r.cells[0]));
  expect(ranks).toEqual([...ranks].sort((a, b) => b - a));
  await page.getByRole('link', { name: /^Rank/ }).click();
  await expect(page).not.toHaveURL(/sort=/);
  await expect(page.getByRole('columnheader', { name: /Rank/ })).toHaveAttribute('aria-sort', 'ascending');
});

test('without JavaScript the table still filters, sorts and pages (plain links and GET forms)', async ({ browser }) => {
  const ctx = await browser.newContext({ javaScriptEnabled: false });
  const page = await ctx.newPage();
  await page.goto(`/seasons/${slug}/classes/open`);
  await page.getByLabel('Material').selectOption('petg');
  await page.getByRole('button', { name: 'Apply filters' }).click();
  await expect(page.getByTestId('page-status')).toHaveText(/15 ranked/);
  await expect(page.getByRole('alert')).toHaveCount(0);
  expect(new Set((await tableRows(page)).map((r) => r.cells[6]))).toEqual(new Set(['PETG']));
  await page.getByRole('link', { name: /Peak flow/ }).click();
  await expect(page).toHaveURL(/sort=-peak_flow/);
  await expect(page).toHaveURL(/material=petg/);
  await page.goto(page.url() + '&per_page=10');
  await page.getByRole('link', { name: 'Next page' }).click();
  await expect(page.getByTestId('page-status')).toHaveText('Page 2 of 2 · 15 ranked');
  await ctx.close();
});

test('older prints open under the row, and the entry, entrant and machine pages follow', async ({ page }) => {
  await page.goto(`/seasons/${slug}/classes/open`);
  const row = page.getByTestId('standings-row').filter({ hasText: repeatEntrant });
  await row.getByRole('button', { name: '1 more print' }).click();
  const runs = page.getByRole('list', { name: `Other prints of ${repeatEntrant}` });
  await expect(runs).toContainText('0:25:00.0');
  await runs.getByRole('link', { name: '0:25:00.0' }).click();
  // The page leads with the printed piece, the machine and the verdict; the time is one figure among others.
  await expect(page.getByRole('heading', { level: 1 })).toHaveText('Test piece printed on Trial Rig 0');
  await expect(page.getByTestId('entry-verdict')).toContainText('Inspection verdict');
  await expect(page.getByTestId('entry-figures')).toContainText('0:25:00.0');
  await expect(page.getByTestId('entry-figures')).toContainText('Not the entrant’s ranked print');
  await expect(page.getByTestId('inspection-summary')).toContainText('mm³/s');
  await expect(page.getByTestId('flow-chart').locator('svg').first()).toBeVisible();
  await page.getByRole('link', { name: 'Trial Entrant 00' }).click();
  await expect(page.getByRole('heading', { name: 'Trial Entrant 00' })).toBeVisible();
  await expect(page.getByTestId('history-table').locator('tbody tr')).toHaveCount(2);
  await expect(page.getByTestId('chart-seasons')).toBeVisible();
  await page.getByTestId('history-table').getByRole('link', { name: 'Trial Rig 0' }).first().click();
  await expect(page.getByRole('heading', { name: 'Trial Rig 0' })).toBeVisible();
});

test('the season overview draws its three charts, and the API page shows live examples', async ({ page }) => {
  await page.goto(`/seasons/${slug}/overview`);
  for (const id of ['chart-histogram', 'chart-scatter', 'chart-timeline']) await expect(page.getByTestId(id).locator('svg').first()).toBeVisible();
  await page.goto('/api-docs');
  await expect(page.getByRole('heading', { name: /GET \/api\/v1\/seasons\/\{season\}\/classes\/\{class\}\/standings/ })).toBeVisible();
  await expect(page.locator('pre').first()).toContainText('"seasons"');
});
