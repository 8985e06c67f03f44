import { describe, it, expect } from 'vitest';
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { Readable } from 'node:stream';
import { buildPreviewFromFile, buildPreviewFromStream } from '@/lib/inspection/inspect';
import {
  decodeLayer,
  flowBucket,
  simplify,
  lineWidthMm,
  parseStoredPreview,
  PREVIEW_FLOW_BUCKETS_MM3S,
  PROPS_AREA_PER_MM2,
  PROPS_SPEED_PER_MMS,
} from '@/lib/inspection/preview';
import { InspectionError } from '@/lib/inspection';
import { parseStl } from '@/lib/stl';

const FIX = path.join(__dirname, '..', '..', 'fixtures');
const manifest = JSON.parse(fs.readFileSync(path.join(FIX, 'manifest.json'), 'utf8')) as {
  file: string;
  stl: string;
  variant: string;
  objects: number;
  settings: { layer_height_mm: number; first_layer_height_mm: number };
}[];

const fromText = (g: string) => buildPreviewFromStream(Readable.from([Buffer.from(g)]));

/** Filament mm per mm of path for a bead of width w and height h, with a 1.75 mm filament. */
function ePerMm(w: number, h: number) {
  // Cross-section of a bead as a rectangle with semicircular ends: A = (w − h)·h + π·h²/4
  // (Slic3r/PrusaSlicer flow model, "Flow Math" in the Slic3r manual).
  const a = (w - h) * h + (Math.PI * h * h) / 4;
  return a / (Math.PI * (1.75 / 2) ** 2);
}

describe('simplify (Ramer–Douglas–Peucker)', () => {
  // Douglas & Peucker (1973): a point within the tolerance of the chord is dropped, one beyond it is kept.
  it('drops a point 0.01 mm off the chord at 0.05 mm tolerance and keeps one 0.1 mm off', () => {
    expect(simplify([0, 0, 1, 0.01, 2, 0], 0.05)).toEqual([0, 0, 2, 0]);
    expect(simplify([0, 0, 1, 0.1, 2, 0], 0.05)).toEqual([0, 0, 1, 0.1, 2, 0]);
  });
  it('keeps the corners of a square path', () => {
    const sq = [0, 0, 5, 0, 10, 0, 10, 5, 10, 10, 5, 10, 0, 10, 0, 0];
    expect(simplify(sq, 0.05)).toEqual([0, 0, 10, 0, 10, 10, 0, 10, 0, 0]);
  });
  it('keeps a path that doubles back on itself (distance to the segment, not the line)', () => {
    expect(simplify([0, 0, 10, 0, 5, 0], 0.05)).toEqual([0, 0, 10, 0, 5, 0]);
  });
});

describe('flow buckets', () => {
  it('puts a flow in the bucket whose lower edge is at or below it', () => {
    expect(flowBucket(0)).toBe(0);
    expect(flowBucket(4.07)).toBe(PREVIEW_FLOW_BUCKETS_MM3S.indexOf(4));
    expect(flowBucket(12)).toBe(PREVIEW_FLOW_BUCKETS_MM3S.indexOf(12));
    expect(flowBucket(1000)).toBe(PREVIEW_FLOW_BUCKETS_MM3S.length - 1);
  });
});

describe('preview of hand-written G-code', () => {
  const h = 0.2;
  const w = 0.45;
  const e10 = (ePerMm(w, h) * 10).toFixed(5);
  // A 10 mm square at 50 mm/s (F3000), absolute E: flow = A × v = 0.0814 mm² × 50 mm/s ≈ 4.07 mm³/s.
  const square = (z: number, e0: number, f: number) => {
    const e = Number(e10);
    return [
      `G1 Z${z} F600`,
      'G1 X10 Y10 F9000',
      `G1 X20 Y10 E${(e0 + e).toFixed(5)} F${f}`,
      `G1 X20 Y20 E${(e0 + 2 * e).toFixed(5)}`,
      `G1 X10 Y20 E${(e0 + 3 * e).toFixed(5)}`,
      `G1 X10 Y10 E${(e0 + 4 * e).toFixed(5)}`,
    ].join('\n');
  };
  const gcode = ['G21', 'G90', 'M82', 'G92 E0', square(0.2, 0, 3000), square(0.4, 4 * Number(e10), 12000), ''].join('\n');

  it('finds two layers at their Z with one closed polyline each', async () => {
    const p = await fromText(gcode);
    expect(p.layers.map((l) => l.zMm)).toEqual([0.2, 0.4]);
    const polys = decodeLayer(p, p.layers[0].paths);
    expect(polys).toHaveLength(1);
    expect(polys[0].xyMm.length / 2).toBe(5); // 4 corners + back to the start
    // Corners come back within half a grid unit of where the G-code put them.
    const expected = [10, 10, 20, 10, 20, 20, 10, 20, 10, 10];
    polys[0].xyMm.forEach((v, i) => expect(Math.abs(v - expected[i])).toBeLessThanOrEqual(p.unitMm / 2 + 1e-9));
  });

  it('colours each layer by its commanded volumetric flow', async () => {
    const p = await fromText(gcode);
    // 0.0814 mm² × 50 mm/s = 4.07 mm³/s; × 200 mm/s = 16.3 mm³/s (same bead, four times the feed).
    expect(p.layers[0].peakFlowMm3s).toBeCloseTo(4.07, 1);
    expect(p.layers[1].peakFlowMm3s).toBeCloseTo(16.28, 1);
    expect(decodeLayer(p, p.layers[0].paths)[0].bucket).toBe(PREVIEW_FLOW_BUCKETS_MM3S.indexOf(4));
    expect(decodeLayer(p, p.layers[1].paths)[0].bucket).toBe(PREVIEW_FLOW_BUCKETS_MM3S.indexOf(15));
    expect(p.bucketLengthMm[PREVIEW_FLOW_BUCKETS_MM3S.indexOf(4)]).toBeCloseTo(40, 6);
  });

  it('keeps each record’s commanded speed and bead cross-section, and each layer’s height, for the speed and line-width colours', async () => {
    const p = await fromText(gcode);
    expect(p.version).toBe(3);
    // One record per layer → one [speed, area] pair each, in the records' order.
    expect(p.layers[0].props).toHaveLength(2);
    expect(p.layers[0].props![0] / PROPS_SPEED_PER_MMS).toBe(50); // F3000 = 50 mm/s
    expect(p.layers[1].props![0] / PROPS_SPEED_PER_MMS).toBe(200); // F12000 = 200 mm/s
    // Cross-section back to the width the G-code was written for (rounded-rectangle bead, as ePerMm above).
    const area = p.layers[0].props![1] / PROPS_AREA_PER_MM2;
    expect(area).toBeCloseTo((w - h) * h + (Math.PI * h * h) / 4, 4);
    expect(p.layers[0].heightMm).toBe(0.2);
    expect(p.layers[1].heightMm).toBe(0.2);
    expect(lineWidthMm(area, p.layers[1].heightMm!)).toBeCloseTo(w, 3);
    expect(lineWidthMm(area, 0)).toBeNull();
  });

  it('breaks a polyline where the commanded speed changes, even at the same flow bucket', async () => {
    const e = ePerMm(w, h);
    const g = ['G21', 'G90', 'M83', 'G1 Z0.2 F600', 'G1 X0 Y0 F9000', `G1 X10 Y0 E${(e * 10).toFixed(5)} F3000`, `G1 X20 Y0 E${(e * 10 * 0.9).toFixed(5)} F3300`, ''].join('\n');
    const p = await fromText(g);
    // 50 mm/s and 55 mm/s with a thinner bead: about the same flow, two records with their own speed.
    const speeds = [];
    for (let i = 0; i < p.layers[0].props!.length; i += 2) speeds.push(p.layers[0].props![i] / PROPS_SPEED_PER_MMS);
    expect(speeds).toEqual([50, 55]);
  });

  it('still reads a stored format-2 preview (no speed or cross-section); refuses unknown formats', async () => {
    const p = await fromText(gcode);
    const old = { ...p, version: 2, layers: p.layers.map(({ props: _props, heightMm: _h, ...l }) => l) };
    const back = parseStoredPreview(JSON.parse(JSON.stringify(old)));
    expect(back?.version).toBe(2);
    expect(back?.layers[0].props).toBeUndefined();
    expect(parseStoredPreview({ ...p, version: 1 })).toBeNull();
    expect(parseStoredPreview(JSON.parse(JSON.stringify(p)))?.layers[1].props).toEqual(p.layers[1].props);
  });

  it('encodes coordinates as integers that fit an Int16', async () => {
    const p = await fromText(gcode);
    for (const l of p.layers) for (const v of l.paths) {
      expect(Number.isInteger(v)).toBe(true);
      expect(Math.abs(v)).toBeLessThanOrEqual(32767);
    }
  });

  it('grows the grid unit when a part is wider than 327 mm', async () => {
    const wide = ['G90', 'M83', 'G1 Z0.2', 'G1 X0 Y0', 'G1 X500 Y0 E20 F3000', ''].join('\n');
    const p = await fromText(wide);
    expect(p.unitMm).toBeGreaterThan(0.01);
    expect(p.sizeUnits.x).toBeLessThanOrEqual(32767);
    expect(p.warnings.join(' ')).toMatch(/500\.0 mm/);
  });

  it('answers bad input with the engine’s clear errors', async () => {
    const dir = fs.mkdtempSync(path.join(os.tmpdir(), 'preview-'));
    const empty = path.join(dir, 'empty.gcode');
    fs.writeFileSync(empty, '');
    await expect(buildPreviewFromFile(empty)).rejects.toBeInstanceOf(InspectionError);
    await expect(buildPreviewFromFile(path.join(dir, 'missing.gcode'))).rejects.toThrow(/not found/i);
    await expect(buildPreviewFromFile(empty, { filamentDiameterMm: 0 })).rejects.toThrow(/not plausible/);
    fs.rmSync(dir, { recursive: true, force: true });
  });

  it('caps the points it keeps on a huge file and says so', async () => {
    const lines = ['G90', 'M83', 'G1 Z0.2'];
    for (let i = 0; i < 2000; i++) lines.push(`G1 X${i % 2 ? 0 : 10} Y${i * 0.5} E0.3 F3000`);
    const p = await buildPreviewFromStream(Readable.from([Buffer.from(lines.join('\n'))]), { maxPoints: 100 });
    expect(p.stats.pointsIn).toBeLessThanOrEqual(101);
    expect(p.warnings[0]).toMatch(/more than 100 path points/);
  });
});

describe('preview of the real slicer fixtures', () => {
  const sizes: string[] = [];
  for (const fx of manifest) {
    it(`${fx.file}: layers match the slicer's layer height and the STL's height; JSON under 1 MB`, async () => {
      const p = await buildPreviewFromFile(path.join(FIX, fx.file));
      const bytes = Buffer.byteLength(JSON.stringify(p));
      sizes.push(`${fx.file.padEnd(44)} ${String(p.layers.length).padStart(4)} layers ${String(bytes).padStart(8)} bytes`);
      expect(bytes).toBeLessThan(1_000_000);
      const stl = parseStl(fs.readFileSync(path.join(FIX, fx.stl)));
      const hMm = fx.settings.layer_height_mm;
      const firstMm = fx.settings.first_layer_height_mm;
      // Layers on the slicer's grid: first layer height, then one layer height each (manifest = the
      // settings passed to the slicer). A prime line in the start code may add one off-grid Z.
      const onGrid = p.layers.filter((l) => Math.abs((l.zMm - firstMm) / hMm - Math.round((l.zMm - firstMm) / hMm)) < 0.01);
      const expectedLayers = Math.round((stl.sizeMm.z - firstMm) / hMm) + 1;
      expect(Math.abs(onGrid.length - expectedLayers)).toBeLessThanOrEqual(1);
      expect(p.layers.length - onGrid.length).toBeLessThanOrEqual(1);
      // The top layer is at the part's height (the STL), within one layer height.
      expect(Math.abs(p.layers[p.layers.length - 1].zMm - stl.sizeMm.z)).toBeLessThanOrEqual(hMm);
      // The part's box (third layer up) spans the STL's footprint less about one line width: the
      // outer wall's centre line runs half a bead inside the surface (manifest line width ≈ 0.45 mm).
      const fxMm = (p.focusUnits.x1 - p.focusUnits.x0) * p.unitMm;
      const fyMm = (p.focusUnits.y1 - p.focusUnits.y0) * p.unitMm;
      // (Single-object plates only: the slicer may arrange the twin's two shells differently.)
      if (fx.objects === 1) {
        expect(Math.abs(fxMm - stl.sizeMm.x)).toBeLessThanOrEqual(1.2);
        expect(Math.abs(fyMm - stl.sizeMm.y)).toBeLessThanOrEqual(1.2);
      }
      // Simplification never adds points.
      expect(p.stats.pointsOut).toBeLessThanOrEqual(p.stats.pointsIn);
    });
  }
  it('prints the preview size of every fixture', () => {
    console.log(`Toolpath preview JSON size per fixture:\n${sizes.join('\n')}`);
    expect(sizes).toHaveLength(manifest.length);
  });
});
