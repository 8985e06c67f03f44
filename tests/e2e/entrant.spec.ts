import { test, expect } from '@playwright/test';
import fs from 'node:fs';
import path from 'node:path';
import crypto from 'node:crypto';
import { gunzipSync, gzipSync } from 'node:zlib';
import sharp from 'sharp';
import { signIn, demoEmail, readLatestMail } from './helpers';

const FIXTURES = path.resolve(__dirname, '..', 'fixtures', 'gcode');

async function photo(colour: string) {
  return sharp({ create: { width: 800, height: 600, channels: 3, background: colour } })
    .jpeg()
    .withExif({ IFD2: { DateTimeOriginal: '2026:11:29 18:40:00' }, IFD3: { GPSLatitudeRef: 'N', GPSLatitude: '52/1 22/1 0/1', GPSLongitudeRef: 'E', GPSLongitude: '4/1 53/1 0/1' } })
    .toBuffer();
}

test('an entrant registers a machine, records an extrusion-limit test, fixes a blocking failure and submits', async ({ page, browser }) => {
  test.setTimeout(180_000);
  await signIn(page, demoEmail('entrant'));

  // Machine
  await page.getByRole('navigation', { name: 'Main' }).getByRole('link', { name: 'Machines', exact: true }).click();
  await expect(page.getByRole('heading', { name: 'Machines', level: 1 })).toBeVisible();
  const form = page.getByRole('form', { name: 'Register a machine' });
  await form.getByLabel('Name').fill('Sprinter 230');
  await form.getByLabel('Motion system').selectOption('corexy');
  await form.getByLabel('Build X (mm)').fill('230');
  await form.getByLabel('Build Y (mm)').fill('230');
  await form.getByLabel('Build Z (mm)').fill('230');
  await form.getByLabel('Nozzle (mm)').fill('0.4');
  await form.getByLabel('Hotend').fill('Long melt zone, 0.4 mm nozzle');
  await form.getByLabel('Acceleration limit (mm/s²)').fill('12000');
  await form.getByRole('button', { name: 'Register machine' }).click();
  await expect(page.getByRole('heading', { name: 'Sprinter 230', level: 1 })).toBeVisible();

  // Extrusion-limit test: 100 mm of 1.75 mm PLA weighed 0.300 g unextruded.
  const xt = page.getByRole('form', { name: 'Record an extrusion-limit test' });
  await xt.getByLabel('Reference mass (g)').fill('0.300');
  await xt.getByLabel('Step 1 rate (mm³/s)').fill('20');
  await xt.getByLabel('Step 1 mass (g)').fill('0.300');
  await xt.getByLabel('Step 2 rate (mm³/s)').fill('30');
  await xt.getByLabel('Step 2 mass (g)').fill('0.297');
  await xt.getByLabel('Step 3 rate (mm³/s)').fill('40');
  await xt.getByLabel('Step 3 mass (g)').fill('0.288');
  await xt.getByRole('button', { name: 'Record test' }).click();
  // By hand: 99 % at 30 mm³/s passes, 96 % at 40 fails → limit 30 mm³/s; ceiling at 0.2 × 0.4 = 375 mm/s.
  await expect(page.getByTestId('extrusion-limit').first()).toHaveText('30 mm³/s');
  await expect(page.getByTestId('speed-ceilings').first()).toContainText('375');
  await expect(page.getByTestId('efficiency-chart').first()).toBeVisible();
  await page.screenshot({ path: test.info().outputPath('entrant-machine.png'), fullPage: true });

  // Entry, step by step
  await page.goto('/me');
  await page.getByRole('link', { name: 'New entry in Frostbite Sprint' }).click();
  await expect(page.getByText('Never disable thermal-runaway protection')).toBeVisible();
  await page.getByLabel('Machine').selectOption({ label: 'Sprinter 230 (0.4 mm)' });
  await page.getByLabel('Class').selectOption({ label: 'Open · 0.4 mm' });
  await page.getByLabel('Material name').fill('Club grey PLA');
  await page.screenshot({ path: test.info().outputPath('entrant-form.png'), fullPage: true });
  await page.getByRole('button', { name: 'Next' }).click();
  await page.getByLabel('Claimed time (h:mm:ss.t)').fill('0:25:10.0');
  await page.getByLabel(/Evidence video link/).fill('https://video.example.org/juno-sprinter');
  await page.getByLabel('X (mm)').fill('36');
  await page.getByLabel('Y (mm)').fill('39');
  await page.getByLabel('Z (mm)').fill('40');
  await page.getByRole('button', { name: 'Next' }).click();
  await page.getByLabel(/^G-code/).setInputFiles(path.join(FIXTURES, 'prusa-beacon-028.gcode.gz'));
  await page.getByLabel(/^Photos/).setInputFiles([
    { name: 'beacon-front.jpg', mimeType: 'image/jpeg', buffer: await photo('#d74707') },
    { name: 'beacon-window.jpg', mimeType: 'image/jpeg', buffer: await photo('#159c86') },
  ]);
  await page.getByRole('button', { name: 'Upload and inspect' }).click();

  // The inspection of the non-compliant file
  await expect(page).toHaveURL(/\/me\/entries\/\d+$/);
  const summary = page.getByTestId('inspection-summary');
  await expect(summary).toContainText('blocking problem', { timeout: 60_000 });
  await expect(summary).toContainText('Walls');
  await expect(page.getByTestId('rule-results').locator('tr[data-status="fail"]')).not.toHaveCount(0);
  await expect(page.getByTestId('flow-chart')).toBeVisible();
  await expect(page.getByRole('button', { name: 'Submit entry' })).toBeDisabled();
  await expect(page.getByTestId('entry-photos').getByRole('img')).toHaveCount(2);
  await page.screenshot({ path: test.info().outputPath('entrant-blocked.png'), fullPage: true });

  // Fix: upload the compliant G-code — this entrant's own copy (a unique command; comments do not
  // count), since other tests on the same server upload the same fixture and duplicates are flagged.
  const own = gzipSync(Buffer.concat([gunzipSync(fs.readFileSync(path.join(FIXTURES, 'prusa-beacon-020.gcode.gz'))), Buffer.from(`\nM117 entrant e2e ${crypto.randomUUID()}\n`)]));
  await page.getByLabel('New G-code').setInputFiles({ name: 'prusa-beacon-020.gcode.gz', mimeType: 'application/gzip', buffer: own });
  await page.getByRole('form', { name: 'Upload new files' }).getByRole('button', { name: 'Upload' }).click();
  await expect(summary).toContainText('No blocking problems', { timeout: 60_000 });
  await expect(page.getByTestId('key-figures')).toContainText('0.20 mm');
  await page.screenshot({ path: test.info().outputPath('entrant-passed.png'), fullPage: true });
  await page.getByRole('button', { name: 'Submit entry' }).click();
  await expect(page.getByTestId('entry-message')).toHaveText(/Entry submitted/);
  await expect(page.locator('.pill', { hasText: 'submitted' }).first()).toBeVisible();
  const entryUrl = new URL(page.url()).pathname;

  // Confirmation mail
  const text = await readLatestMail(browser, demoEmail('entrant'), 'Entry received');
  expect(text).toContain(entryUrl);
  expect(text).toMatch(/Frostbite Sprint/);
});
