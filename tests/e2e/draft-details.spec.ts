import { test, expect } from '@playwright/test';
import fs from 'node:fs';
import path from 'node:path';
import crypto from 'node:crypto';
import { gunzipSync, gzipSync } from 'node:zlib';
import sharp from 'sharp';
import { signIn } from './helpers';
import { sql } from '../support/db';
import { waitForAccount } from '../support/demo';

const FIXTURE = path.resolve(__dirname, '..', 'fixtures', 'gcode', 'prusa-beacon-020.gcode.gz');

test('an entrant fixes a blocked draft by editing its details on the draft page, then submits', async ({ page, baseURL }) => {
  test.setTimeout(180_000);
  const dbFile = process.env.HOTLAP_E2E_DB!;
  // An account of its own (entry limits are per entrant and class).
  const email = `draft.fixer.${Date.now()}@example.org`;
  const password = 'draft-fixer-password';
  expect((await page.request.post(`${baseURL}/api/account/signup`, { data: { name: 'Draft Fixer', email, password } })).status()).toBe(202);
  // Sign-up writes the account just after answering (same timing for taken and new addresses).
  await waitForAccount(dbFile, email);
  await sql(dbFile, "UPDATE users SET email_verified_at = '2026-11-01 00:00:00.000 +00:00' WHERE email = ?", [email]);
  await signIn(page, email, password);

  // A draft whose claimed time (5 min) is far below what the G-code needs (about 24 min): blocked.
  const machine = await page.request.post('/api/entrant/machines', { data: { name: 'Fixer Rig', motionSystem: 'corexy', buildXMm: 250, buildYMm: 250, buildZMm: 240, nozzleMm: 0.4, hotend: 'Test hotend', isModified: false } });
  expect(machine.status()).toBe(201);
  const [season] = await sql<{ id: number }>(dbFile, "SELECT id FROM seasons WHERE slug = 'frostbite-sprint'");
  const [cls] = await sql<{ id: number }>(dbFile, "SELECT id FROM classes WHERE season_id = ? AND slug = 'open-04'", [season.id]);
  const gcode = gzipSync(Buffer.concat([gunzipSync(fs.readFileSync(FIXTURE)), Buffer.from(`\nM117 draft fixer ${crypto.randomUUID()}\n`)]));
  const photo = await sharp({ create: { width: 600, height: 400, channels: 3, background: '#3b6e8f' } }).jpeg().toBuffer();
  const created = await page.request.post('/api/entries', {
    multipart: {
      seasonId: String(season.id), classId: String(cls.id), machineId: String((await machine.json()).id), materialFamily: 'pla', materialName: 'Club grey PLA', nozzleMm: '0.4',
      claimedTime: '0:05:00.0', evidenceUrl: 'https://video.example.org/fixer-run', notes: '',
      gcode: { name: 'beacon.gcode.gz', mimeType: 'application/gzip', buffer: gcode },
      photos: { name: 'front.jpg', mimeType: 'image/jpeg', buffer: photo },
    },
  });
  expect(created.status(), await created.text()).toBe(201);
  const { id } = await created.json();
  // A second photo (the season asks for two), through the page's own upload form below.
  await page.goto(`/me/entries/${id}`);
  await expect(page.getByTestId('inspection-summary')).toContainText('blocking problem', { timeout: 60_000 });
  // The page points at the claimed time, not at slicing again.
  await expect(page.getByTestId('claim-hint')).toContainText('Check the claimed time');
  await expect(page.getByRole('button', { name: 'Submit entry' })).toBeDisabled();

  const files = page.getByRole('form', { name: 'Upload new files' });
  await files.getByLabel('New photos (replace all)').setInputFiles([
    { name: 'front.jpg', mimeType: 'image/jpeg', buffer: photo },
    { name: 'side.jpg', mimeType: 'image/jpeg', buffer: photo },
  ]);
  await files.getByRole('button', { name: 'Upload' }).click();
  await expect(page.getByTestId('entry-photos').locator('li')).toHaveCount(2);

  // Edit the details in place: the real claimed time.
  await page.getByRole('button', { name: 'Edit details' }).click();
  const details = page.getByRole('form', { name: 'Entry details' });
  await expect(details.getByLabel('Claimed time (h:mm:ss.t)')).toHaveValue('0:05:00.0');
  // An empty evidence link is refused next to the field (the season asks for a video).
  await details.getByLabel(/Evidence video link/).fill('');
  await details.getByRole('button', { name: 'Save details' }).click();
  await expect(page.locator('#d-evidenceUrl-error')).toContainText('asks for a link to the video');
  await details.getByLabel(/Evidence video link/).fill('https://video.example.org/fixer-run');
  await details.getByLabel('Claimed time (h:mm:ss.t)').fill('0:25:10.0');
  await details.getByRole('button', { name: 'Save details' }).click();
  await expect(page.getByTestId('details-message')).toContainText('Details saved');
  await expect(page.getByTestId('claimed-time')).toHaveText('0:25:10.0');

  // The re-inspection against the corrected claim passes, and the entry submits.
  await expect(page.getByTestId('inspection-summary')).toContainText('No blocking problems', { timeout: 60_000 });
  await expect(page.getByRole('button', { name: 'Submit entry' })).toBeEnabled();
  await page.getByRole('button', { name: 'Submit entry' }).click();
  await expect(page.getByTestId('entry-message')).toContainText('Entry submitted');
  await expect.poll(async () => (await sql<{ state: string }>(dbFile, 'SELECT state FROM entries WHERE id = ?', [id]))[0].state).toBe('submitted');
  await page.screenshot({ path: test.info().outputPath('draft-fixed.png'), fullPage: true });

  // A new entry: the entry limit of the chosen class shows on the first step, and the second step
  // refuses an empty evidence link where the season asks for a video.
  await page.goto('/me/entries/new?season=frostbite-sprint');
  await page.getByLabel('Machine').selectOption({ label: 'Fixer Rig (0.4 mm)' });
  await page.getByLabel('Class').selectOption({ label: 'Open · 0.4 mm' });
  await expect(page.getByTestId('entry-limit')).toHaveText('Entries in Open · 0.4 mm: 1 of 3 used.');
  await page.getByRole('button', { name: 'Next' }).click();
  await page.getByLabel('Claimed time (h:mm:ss.t)').fill('0:25:10.0');
  await page.getByRole('button', { name: 'Next' }).click();
  await expect(page.locator('#e-evidenceUrl-error')).toHaveText('This season asks for a link to the video of your print.');
  await expect(page.getByLabel('Claimed time (h:mm:ss.t)')).toBeVisible();
});
