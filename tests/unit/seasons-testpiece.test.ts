/**
 * Test-piece measurement as the upload handler runs it (lib/seasons/stlMeasure → lib/stl), on
 * meshes whose volume and bounding box are known in closed form, written as ASCII and as binary
 * STL, and on broken files.
 */
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { measureStlFile } from '@/lib/seasons/stlMeasure';
import { testPieceColumns } from '@/lib/seasons/testPieceColumns';
import { StlError } from '@/lib/stl';
import { cuboid, cylinder, toAsciiStl, toBinaryStl } from '@/scripts/fixtures/shapes';

const dir = fs.mkdtempSync(path.join(os.tmpdir(), 'hotlap-seasons-stl-'));
afterAll(() => fs.rmSync(dir, { recursive: true, force: true }));
const write = (name: string, data: string | Buffer) => {
  const p = path.join(dir, name);
  fs.writeFileSync(p, data);
  return p;
};

// A 25 × 20 × 15 mm box: volume = a·b·c = 7500 mm³ (elementary geometry).
const box = cuboid('box', [25, 20, 15], [-12.5, -10, 0]);
// A 64-gon prism of circumradius 10 mm and height 20 mm: V = (n/2)·r²·sin(2π/n)·h, the area of a
// regular polygon from its circumradius (CRC Standard Mathematical Tables, regular polygons) times h.
const n = 64;
const r = 10;
const h = 20;
const prismVolumeMm3 = (n / 2) * r * r * Math.sin((2 * Math.PI) / n) * h;
const prism = cylinder(r, h, n);

describe('test piece measurement', () => {
  for (const form of ['ascii', 'binary'] as const) {
    it(`measures a box from ${form} STL`, async () => {
      const file = write(`box-${form}.stl`, form === 'ascii' ? toAsciiStl(box) : toBinaryStl(box));
      const m = await measureStlFile(file);
      expect(m.format).toBe(form);
      expect(m.triangleCount).toBe(12); // 6 faces × 2 triangles
      expect(m.sizeMm.x).toBeCloseTo(25, 5);
      expect(m.sizeMm.y).toBeCloseTo(20, 5);
      expect(m.sizeMm.z).toBeCloseTo(15, 5);
      expect(m.volumeMm3).toBeCloseTo(7500, 2);
    });

    it(`maps the ${form} box to the test_pieces columns`, async () => {
      const m = await measureStlFile(write(`box-cols-${form}.stl`, form === 'ascii' ? toAsciiStl(box) : toBinaryStl(box)));
      const cols = testPieceColumns(m);
      expect(Object.keys(cols).sort()).toEqual(['format', 'sizeXMm', 'sizeYMm', 'sizeZMm', 'triangleCount', 'volumeMm3']);
      expect(cols.format).toBe(form);
      expect(cols.triangleCount).toBe(12);
      // The same 25 × 20 × 15 mm box, 7500 mm³ (elementary geometry), as columns.
      expect(cols.sizeXMm).toBeCloseTo(25, 5);
      expect(cols.sizeYMm).toBeCloseTo(20, 5);
      expect(cols.sizeZMm).toBeCloseTo(15, 5);
      expect(cols.volumeMm3).toBeCloseTo(7500, 2);
    });

    it(`measures a 64-gon cylinder from ${form} STL`, async () => {
      const file = write(`cyl-${form}.stl`, form === 'ascii' ? toAsciiStl(prism) : toBinaryStl(prism));
      const m = await measureStlFile(file);
      expect(m.format).toBe(form);
      expect(m.triangleCount).toBe(4 * n); // 2 per side quad + 1 per top and bottom fan
      // Bounding box: x spans 2r (vertices at angle 0 and π); y spans 2r·sin(π/2 rounded to the
      // nearest vertex) = 2r since 64 is divisible by 4, so a vertex sits at ±90°.
      expect(m.sizeMm.x).toBeCloseTo(2 * r, 4);
      expect(m.sizeMm.y).toBeCloseTo(2 * r, 4);
      expect(m.sizeMm.z).toBeCloseTo(h, 5);
      // float32 vertices in binary STL: relative error ~1e-7, so 1e-2 mm³ on ~6.27 cm³ is ample.
      expect(m.volumeMm3).toBeCloseTo(prismVolumeMm3, 1);
      // …and visibly less than the true cylinder πr²h = 6283.19 mm³ (the polygon is inscribed).
      expect(m.volumeMm3).toBeLessThan(Math.PI * r * r * h);
    });
  }

  it('refuses a truncated binary STL with a sentence', async () => {
    const full = toBinaryStl(box);
    const file = write('cut.stl', full.subarray(0, full.length - 30));
    const err = await measureStlFile(file).catch((e) => e);
    expect(err).toBeInstanceOf(StlError);
    expect((err as StlError).message.length).toBeGreaterThan(20);
  });

  it('refuses a file that is not an STL (a G-code) with a sentence', async () => {
    const file = write('not.stl', 'G28\nG1 X10 Y10 E1 F1200\n'.repeat(40));
    const err = await measureStlFile(file).catch((e) => e);
    expect(err).toBeInstanceOf(StlError);
  });

  it('refuses an empty file', async () => {
    const err = await measureStlFile(write('empty.stl', '')).catch((e) => e);
    expect(err).toBeInstanceOf(StlError);
    expect((err as StlError).code).toBe('empty');
  });
});
