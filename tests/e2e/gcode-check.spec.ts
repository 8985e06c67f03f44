/**
 * The rulebook check in the browser: the engine bundle (public/engine/gcode-check.js) run by
 * Chromium gives the same report as the server's engine on every fixture; a visitor sees on the
 * public page the rule results the server computes for the same file; an entrant sees the
 * browser's verdict while a throttled upload is still running.
 */
import { test, expect, type Page } from '@playwright/test';
import fs from 'node:fs';
import path from 'node:path';
import { gunzipSync } from 'node:zlib';
import sharp from 'sharp';
import { inspectFile } from '../../lib/inspection/inspect';
import { toJsonReport } from '../../lib/inspection/report';
import type { CheckRulebook } from '../../lib/check/rulebook';
import type { CheckMessage } from '../../lib/check/protocol';
import { signIn, demoEmail } from './helpers';

const FIXTURES = path.resolve(__dirname, '..', 'fixtures', 'gcode');
const SEASON = 'frostbite-sprint';

async function rulebook(page: Page): Promise<CheckRulebook> {
  const res = await page.request.get(`/api/v1/seasons/${SEASON}/check-rules`);
  expect(res.status()).toBe(200);
  return res.json();
}

/** Runs the browser bundle in the page on `bytes` (as a File named `name`) and returns its last message. */
async function checkInPage(page: Page, name: string, bytes: Buffer, options: object): Promise<CheckMessage> {
  return page.evaluate(
    async ({ name, b64, options }) => {
      const bin = Uint8Array.from(atob(b64), (c) => c.charCodeAt(0));
      const file = new File([bin], name);
      const worker = new Worker('/engine/gcode-check.js');
      const last = await new Promise<unknown>((resolve) => {
        worker.onmessage = (e) => {
          if (e.data.type !== 'progress') resolve(e.data);
        };
        worker.postMessage({ file, name, options });
      });
      worker.terminate();
      return last as never;
    },
    { name, b64: bytes.toString('base64'), options },
  );
}

/** Numbers equal, or within 1e-12 relative where two JavaScript engines' Math functions may differ in the last bit (from memory: V8's sin/cos/atan2 are fdlibm ports, so exact equality is expected). */
function diff(a: unknown, b: unknown, at = ''): string[] {
  if (typeof a === 'number' && typeof b === 'number') return a === b || Math.abs(a - b) <= 1e-12 * Math.max(Math.abs(a), Math.abs(b)) ? [] : [`${at}: ${a} vs ${b}`];
  if (a === null || b === null || typeof a !== 'object' || typeof b !== 'object') return Object.is(a, b) ? [] : [`${at}: ${JSON.stringify(a)} vs ${JSON.stringify(b)}`];
  const keys = new Set([...Object.keys(a), ...Object.keys(b)]);
  return [...keys].flatMap((k) => diff((a as Record<string, unknown>)[k], (b as Record<string, unknown>)[k], `${at}.${k}`));
}

test('the browser bundle and the server engine give the same report on every fixture', async ({ page }) => {
  test.setTimeout(300_000);
  await page.goto(`/seasons/${SEASON}/check`);
  const rb = await rulebook(page);
  const cls = rb.classes[0];
  const options = { rules: cls.rules, ruleContext: rb.ruleContext };
  const fixtures = fs.readdirSync(FIXTURES).filter((f) => /\.gcode(\.gz)?$/.test(f)).sort();
  expect(fixtures.length).toBeGreaterThan(10);
  let exact = 0;
  for (const name of fixtures) {
    const bytes = fs.readFileSync(path.join(FIXTURES, name));
    const server = toJsonReport(await inspectFile(path.join(FIXTURES, name), { ...options, name }));
    const browser = await checkInPage(page, name, bytes, options);
    expect(browser.type, `${name}: ${browser.type === 'error' ? browser.message : ''}`).toBe('done');
    const report = (browser as Extract<CheckMessage, { type: 'done' }>).report;
    expect(diff(report, server), name).toEqual([]);
    if (JSON.stringify(report) === JSON.stringify(server)) exact++;
  }
  console.log(`browser vs server: ${fixtures.length} fixtures agree (${exact} byte-identical JSON)`);
});

test('a visitor checks a G-code on the public page and sees the rule results the server computes', async ({ page }) => {
  await page.goto(`/seasons/${SEASON}`);
  await page.getByRole('link', { name: 'Check a G-code against this rulebook' }).click();
  await expect(page.getByRole('heading', { name: 'Check a G-code against this rulebook' })).toBeVisible();
  const rb = await rulebook(page);
  const cls = rb.classes[0];
  await page.getByLabel('Class').selectOption({ label: cls.name });
  const uploads: string[] = [];
  page.on('request', (r) => {
    if (r.method() !== 'GET') uploads.push(r.url());
  });
  // The test piece's file, plain (about 1 MB after inflating the fixture).
  const plain = gunzipSync(fs.readFileSync(path.join(FIXTURES, 'prusa-beacon-028.gcode.gz')));
  await page.getByTestId('check-file').setInputFiles({ name: 'beacon-028.gcode', mimeType: 'text/plain', buffer: plain });
  const result = page.getByTestId('check-result');
  await expect(result).toBeVisible({ timeout: 30_000 });
  const ms = Number(await page.getByTestId('check-elapsed').getAttribute('data-ms'));
  console.log(`browser check of a ${(plain.length / 1024 / 1024).toFixed(2)} MB G-code in headless Chromium: ${ms} ms`);

  const server = toJsonReport(await inspectFile(path.join(FIXTURES, 'prusa-beacon-028.gcode.gz'), { rules: cls.rules, ruleContext: rb.ruleContext }));
  const serverRules = server.rules as { status: string; message: string }[];
  const rows = result.getByTestId('rule-results').locator('tbody tr');
  await expect(rows).toHaveCount(serverRules.length);
  expect(await rows.evaluateAll((trs) => trs.map((tr) => tr.getAttribute('data-status')))).toEqual(serverRules.map((r) => r.status));
  for (const [i, r] of serverRules.entries()) await expect(rows.nth(i)).toContainText(r.message.split(/ (Passes|Fails|Not checked):/)[0]);
  // This file breaks a blocking rule of the season (0.28 mm layers, two walls): the verdict says so.
  expect(serverRules.some((r) => r.status === 'fail')).toBe(true);
  await expect(result.getByTestId('inspection-summary')).toContainText('blocking problem');
  await expect(result.getByTestId('key-figures')).toContainText('0.28 mm');
  // Nothing was sent anywhere.
  expect(uploads).toEqual([]);
  await page.screenshot({ path: test.info().outputPath('gcode-check.png'), fullPage: true });
});

test('a 100 MB G-code streams through the check with progress', async ({ page }) => {
  test.setTimeout(240_000);
  await page.goto(`/seasons/${SEASON}/check`);
  // Build the file in the page (a Blob of repeated fixture text, never one 100 MB string) so nothing crosses the test's pipe.
  const one = gunzipSync(fs.readFileSync(path.join(FIXTURES, 'prusa-beacon-020.gcode.gz'))).toString('latin1');
  const result = await page.evaluate(async ({ one }) => {
    const parts: BlobPart[] = [];
    let size = 0;
    while (size < 100 * 1024 * 1024) {
      parts.push(one);
      size += one.length;
    }
    const file = new File(parts, 'stack.gcode');
    const worker = new Worker('/engine/gcode-check.js');
    const progress: number[] = [];
    const heap: number[] = [];
    const mem = (performance as unknown as { memory?: { usedJSHeapSize: number } }).memory;
    const last = await new Promise<{ type: string; elapsedMs?: number; message?: string }>((resolve) => {
      worker.onmessage = (e) => {
        if (e.data.type === 'progress') {
          progress.push(e.data.bytesRead);
          if (mem) heap.push(mem.usedJSHeapSize);
        } else resolve(e.data);
      };
      worker.postMessage({ file, name: file.name, options: {} });
    });
    worker.terminate();
    return { last, progress, size: file.size };
  }, { one });
  expect(result.last.type, result.last.message).toBe('done');
  // Progress came in steps, increasing, up to the whole file.
  expect(result.progress.length).toBeGreaterThan(10);
  expect(result.progress.every((b, i) => i === 0 || b >= result.progress[i - 1])).toBe(true);
  expect(result.progress.at(-1)).toBe(result.size);
  console.log(`browser check of ${(result.size / 1024 / 1024).toFixed(0)} MB: ${((result.last.elapsedMs ?? 0) / 1000).toFixed(1)} s, ${result.progress.length} progress messages`);
});

test('an entrant sees the browser verdict while a throttled upload is still running', async ({ page }) => {
  test.setTimeout(120_000);
  await signIn(page, demoEmail('entrant'));
  await page.goto('/me');
  await page.getByRole('link', { name: 'New entry in Frostbite Sprint' }).click();
  await page.getByLabel('Material name').fill('Club grey PLA');
  await page.getByRole('button', { name: 'Next' }).click();
  await page.getByLabel('Claimed time (h:mm:ss.t)').fill('0:25:10.0');
  await page.getByLabel(/Evidence video link/).fill('https://video.example.org/juno-throttled');
  await page.getByLabel('X (mm)').fill('36');
  await page.getByLabel('Y (mm)').fill('39');
  await page.getByLabel('Z (mm)').fill('40');
  await page.getByRole('button', { name: 'Next' }).click();
  // Upload at 64 KB/s (Chromium's network emulation): the plain G-code (~2 MB) takes ~30 s to send.
  const cdp = await page.context().newCDPSession(page);
  await cdp.send('Network.enable');
  await cdp.send('Network.emulateNetworkConditions', { offline: false, latency: 50, downloadThroughput: -1, uploadThroughput: 64 * 1024 });
  const photo = await sharp({ create: { width: 64, height: 48, channels: 3, background: '#d74707' } }).jpeg().toBuffer();
  await page.getByLabel(/^Photos/).setInputFiles([
    { name: 'front.jpg', mimeType: 'image/jpeg', buffer: photo },
    { name: 'window.jpg', mimeType: 'image/jpeg', buffer: photo },
  ]);
  const plain = gunzipSync(fs.readFileSync(path.join(FIXTURES, 'prusa-beacon-028.gcode.gz')));
  await page.getByLabel(/^G-code/).setInputFiles({ name: 'beacon-028.gcode', mimeType: 'text/plain', buffer: plain });
  await page.getByRole('button', { name: 'Upload and inspect' }).click();
  await expect(page.getByTestId('upload-progress').first()).toBeVisible();
  const check = page.getByTestId('gcode-check');
  await expect(check.getByTestId('inspection-summary')).toContainText('blocking problem', { timeout: 30_000 });
  // Still uploading: the form is on screen, its bar below 100 %.
  const pct = Number(await page.getByRole('progressbar', { name: 'Uploading' }).getAttribute('aria-valuenow', { timeout: 1000 }));
  await expect(page).toHaveURL(/\/me\/entries\/new/);
  console.log(`entrant saw the browser verdict with the upload at ${pct} %`);
  expect(pct).toBeLessThan(100);
  await page.screenshot({ path: test.info().outputPath('gcode-check-upload.png'), fullPage: true });
  // Leave without finishing the upload: nothing was saved.
  await cdp.send('Network.emulateNetworkConditions', { offline: false, latency: 0, downloadThroughput: -1, uploadThroughput: -1 });
  await page.goto('/me');
});
