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

/** Samples the retained memory of the page's dedicated worker through the DevTools protocol (workers have no performance.memory): JS heap plus ArrayBuffer backing stores (where file chunks live), after a collection. */
async function workerHeapSampler(page: Page) {
  const cdp = await page.context().newCDPSession(page);
  let session: string | null = null;
  let nextId = 1;
  const pending = new Map<number, (r: { usedSize: number; backingStorageSize?: number }) => void>();
  cdp.on('Target.attachedToTarget', (e) => {
    if (e.targetInfo.type === 'worker') session = e.sessionId;
  });
  cdp.on('Target.receivedMessageFromTarget', (e) => {
    const m = JSON.parse(e.message) as { id?: number; result?: { usedSize: number; backingStorageSize?: number } };
    if (m.id && pending.has(m.id)) pending.get(m.id)!(m.result ?? { usedSize: 0 }), pending.delete(m.id);
  });
  await cdp.send('Target.setAutoAttach', { autoAttach: true, waitForDebuggerOnStart: false, flatten: false });
  const ask = async <T>(method: string): Promise<T | null> => {
    const id = nextId++;
    const answer = new Promise<T>((res) => pending.set(id, res as never));
    await cdp.send('Target.sendMessageToTarget', { sessionId: session!, message: JSON.stringify({ id, method }) }).catch(() => undefined);
    return Promise.race([answer, new Promise<null>((res) => setTimeout(() => res(null), 2000))]);
  };
  // Retained memory, not garbage waiting for the collector: collect first, then read the heap.
  return async (): Promise<number | null> => {
    if (!session) return null;
    await ask('HeapProfiler.collectGarbage');
    const r = await ask<{ usedSize: number; backingStorageSize?: number }>('Runtime.getHeapUsage');
    return r ? r.usedSize + (r.backingStorageSize ?? 0) : null;
  };
}
/** Checks a stack of `sizeMb` of fixture text (built in the page as a Blob) in the bundle's worker, sampling its memory. */
async function checkStack(page: Page, sizeMb: number) {
  await page.goto(`/seasons/${SEASON}/check`);
  const memory = await workerHeapSampler(page);
  const one = gunzipSync(fs.readFileSync(path.join(FIXTURES, 'prusa-beacon-020.gcode.gz'))).toString('latin1');
  await page.evaluate(({ one, sizeMb }) => {
    const parts: BlobPart[] = [];
    let size = 0;
    while (size < sizeMb * 1024 * 1024) {
      parts.push(one);
      size += one.length;
    }
    const file = new File(parts, 'stack.gcode');
    const worker = new Worker('/engine/gcode-check.js');
    const w = window as unknown as { checkProgress: number[]; checkDone: unknown; checkSize: number };
    w.checkProgress = [];
    w.checkDone = null;
    w.checkSize = file.size;
    worker.onmessage = (e) => {
      if (e.data.type === 'progress') w.checkProgress.push(e.data.bytesRead);
      else w.checkDone = e.data;
    };
    worker.postMessage({ file, name: file.name, options: {} });
  }, { one, sizeMb });
  let peak = 0;
  for (;;) {
    const used = await memory();
    if (used !== null) peak = Math.max(peak, used);
    if (await page.evaluate(() => (window as unknown as { checkDone: unknown }).checkDone !== null)) break;
    await page.waitForTimeout(50);
  }
  const r = await page.evaluate(() => {
    const w = window as unknown as { checkProgress: number[]; checkDone: { type: string; elapsedMs?: number; message?: string }; checkSize: number };
    return { progress: w.checkProgress, done: w.checkDone, size: w.checkSize };
  });
  return { ...r, peak };
}

test('a 100 MB G-code streams through the check with progress, in memory that does not grow with the file', async ({ page }) => {
  test.setTimeout(240_000);
  const small = await checkStack(page, 10);
  const big = await checkStack(page, 100);
  for (const r of [small, big]) {
    expect(r.done.type, r.done.message).toBe('done');
    // Progress came in steps, increasing, up to the whole file.
    expect(r.progress.every((b, i) => i === 0 || b >= r.progress[i - 1])).toBe(true);
    expect(r.progress.at(-1)).toBe(r.size);
    expect(r.peak).toBeGreaterThan(0);
  }
  expect(big.progress.length).toBeGreaterThan(10);
  const mb = (n: number) => (n / 1024 / 1024).toFixed(1);
  console.log(
    `browser check of ${mb(big.size)} MB: ${((big.done.elapsedMs ?? 0) / 1000).toFixed(1)} s, ${big.progress.length} progress messages; ` +
      `worker JS heap + buffers peak ${mb(big.peak)} MB (${mb(small.peak)} MB for ${mb(small.size)} MB)`,
  );
  // The worker streams: ten times the file, about the same memory (the engine's fixed buffers), far below the file's size.
  expect(big.peak).toBeLessThan(big.size / 1.5);
  expect(big.peak).toBeLessThan(small.peak * 1.5 + 8 * 1024 * 1024);
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
