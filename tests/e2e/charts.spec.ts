/**
 * Charts in the browser: an entrant's history draws one line per test piece (no line joins two
 * pieces), and no axis drops or overlaps a tick label, at 1400×900 and 390×844. Screenshots go to
 * /tmp/shots-h19c (or HOTLAP_SHOTS_DIR) to be looked at.
 */
import fs from 'node:fs';
import path from 'node:path';
import { test, expect, type Page } from '@playwright/test';
import { sql } from '../support/db';
import { insertEntrant, insertEntry, insertMachine, insertSeason, stamp } from '../support/standings-fixtures';

const SHOTS = process.env.HOTLAP_SHOTS_DIR || '/tmp/shots-h19c';
const db = () => {
  const f = process.env.HOTLAP_E2E_DB;
  if (!f) throw new Error('HOTLAP_E2E_DB is set by tests/e2e/global-setup.ts');
  return f;
};

let entrantId: number;
let seasonSlug: string;

async function addPiece(seasonId: number, name: string, sizeMm: number) {
  const t = stamp(new Date());
  await sql(db(), 'INSERT INTO test_pieces (season_id, name, format, triangle_count, size_x_mm, size_y_mm, size_z_mm, volume_mm3, created_at, updated_at) VALUES (?, ?, ?, ?, ?, ?, ?, ?, ?, ?)', [seasonId, name, 'binary', 1200, sizeMm, sizeMm, sizeMm, sizeMm ** 3 / 3, t, t]);
}

test.beforeAll(async () => {
  fs.mkdirSync(SHOTS, { recursive: true });
  entrantId = await insertEntrant(db(), 'Chart Walker');
  const machine = await insertMachine(db(), entrantId, 'Chart Rig');
  // Three seasons: two on the same "Stepped tower", one on a "Bridge block" between them in time.
  const plan = [
    ['2026-03-01T00:00:00Z', 'Stepped tower', 40, 1_900_000],
    ['2026-06-01T00:00:00Z', 'Bridge block', 25, 700_000],
    ['2026-09-01T00:00:00Z', 'Stepped tower', 40, 1_750_000],
  ] as const;
  for (const [i, [opensAt, piece, size, timeMs]] of plan.entries()) {
    const s = await insertSeason(db(), { classes: ['open'], name: `Chart Season ${i + 1}`, opensAt });
    await addPiece(s.seasonId, piece, size);
    await insertEntry(db(), { seasonId: s.seasonId, classId: s.classIds.open, entrantId, machineId: machine, timeMs, submittedAt: opensAt.replace('T00', 'T12'), peak: 20 + i });
    seasonSlug = s.slug;
  }
  // A few more entrants in the last season, so its overview has something to draw.
  const last = (await sql<{ id: number }>(db(), 'SELECT id FROM seasons WHERE slug = ?', [seasonSlug]))[0].id;
  const cls = (await sql<{ id: number }>(db(), 'SELECT id FROM classes WHERE season_id = ?', [last]))[0].id;
  for (let i = 0; i < 12; i++) {
    const who = await insertEntrant(db(), `Chart Peer ${i}`);
    await insertEntry(db(), { seasonId: last, classId: cls, entrantId: who, machineId: await insertMachine(db(), who, `Peer Rig ${i}`), timeMs: 1_500_000 + i * 41_000, submittedAt: `2026-09-${String(2 + i * 2).padStart(2, '0')}T10:00:00Z`, peak: 15 + i * 1.7 });
  }
});

/** Tick labels of every axis inside a chart: none overlaps its neighbour, none is empty. */
async function expectReadableAxes(page: Page, testId: string) {
  // recharts 3 draws each axis's labels in a z-index layer apart from the axis line: one group per axis.
  const axes = page.getByTestId(testId).locator('g.recharts-cartesian-axis-tick-labels');
  const n = await axes.count();
  expect(n, testId).toBeGreaterThanOrEqual(2);
  for (let a = 0; a < n; a++) {
    const boxes = await axes.nth(a).locator('text').evaluateAll((els) =>
      els.map((el) => {
        const r = el.getBoundingClientRect();
        return { x: r.x, y: r.y, w: r.width, h: r.height, text: el.textContent ?? '' };
      }),
    );
    expect(boxes.length, `${testId} axis ${a}`).toBeGreaterThanOrEqual(2);
    // Inside the drawing: a label past the edge of the svg is cut off.
    const svg = (await page.getByTestId(testId).locator('.recharts-wrapper > svg').first().boundingBox())!;
    for (const b of boxes) expect(b.x >= svg.x - 1 && b.x + b.w <= svg.x + svg.width + 1, `${testId} axis ${a}: "${b.text}" is cut off`).toBe(true);
    for (const b of boxes) expect(b.text.trim(), `${testId} axis ${a}`).not.toBe('');
    for (let i = 0; i < boxes.length; i++)
      for (let j = i + 1; j < boxes.length; j++) {
        const p = boxes[i];
        const q = boxes[j];
        const overlap = p.x < q.x + q.w && q.x < p.x + p.w && p.y < q.y + q.h && q.y < p.y + p.h;
        expect(overlap, `${testId} axis ${a}: "${p.text}" overlaps "${q.text}"`).toBe(false);
      }
  }
}

for (const [w, h] of [[1400, 900], [390, 844]] as const) {
  test.describe(`at ${w}×${h}`, () => {
    test.use({ viewport: { width: w, height: h } });

    test('an entrant’s history draws one line per test piece, with readable axes', async ({ page }) => {
      await page.goto(`/entrants/${entrantId}`);
      const chart = page.getByTestId('chart-seasons');
      await expect(chart.locator('svg').first()).toBeVisible();
      // Two pieces, two lines: the tower's two seasons are joined, the block stands alone.
      await expect(chart.locator('.recharts-line')).toHaveCount(2);
      expect((await chart.locator('.recharts-legend-item').allTextContents()).sort()).toEqual(['Bridge block', 'Stepped tower']);
      const curves = await chart.locator('.recharts-line-curve').evaluateAll((els) => els.map((e) => (e.getAttribute('d') ?? '').split(/[ML]/).filter((s) => s.trim()).length));
      // The tower's line joins its two seasons; the block's single season is a dot with no line at all.
      expect(curves).toEqual([2]);
      await expect(chart.locator('.recharts-line-dot, .recharts-dot')).toHaveCount(3);
      await expectReadableAxes(page, 'chart-seasons');
      // The page never scrolls sideways: the history table scrolls inside its card.
      expect(await page.evaluate(() => document.documentElement.scrollWidth)).toBeLessThanOrEqual(w);
      await page.screenshot({ path: path.join(SHOTS, `entrant-history-${w}x${h}.png`), fullPage: true });
    });

    test('the season overview charts have round, readable axes', async ({ page }) => {
      await page.goto(`/seasons/${seasonSlug}/overview`);
      for (const id of ['chart-histogram', 'chart-scatter', 'chart-timeline']) {
        await expect(page.getByTestId(id).locator('svg').first()).toBeVisible();
        await expectReadableAxes(page, id);
      }
      // The running totals are steps (horizontal then vertical segments), not slopes.
      const d = (await page.getByTestId('chart-timeline').locator('.recharts-line-curve').first().getAttribute('d')) ?? '';
      const pts = [...d.matchAll(/[ML]\s*([\d.]+)[ ,]([\d.]+)/g)].map((m) => [Number(m[1]), Number(m[2])]);
      expect(pts.length).toBeGreaterThan(2);
      for (let i = 1; i < pts.length; i++) expect(pts[i][0] === pts[i - 1][0] || pts[i][1] === pts[i - 1][1]).toBe(true);
      await page.screenshot({ path: path.join(SHOTS, `overview-${w}x${h}.png`), fullPage: true });
    });
  });
}
