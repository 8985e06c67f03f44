/**
 * The engine against real slicer output (tests/fixtures, sliced by Debian's PrusaSlicer 2.5.0,
 * Slic3r 1.3.0 and CuraEngine 4.13.0 from our own STL shapes). Outside references:
 *  - the slicer's own totals written in each file (manifest `slicer_reports`): filament length
 *    within 0.5 %, print-time estimate within 10 %;
 *  - the settings each file was sliced with (manifest `settings`): layer height, first layer height;
 *  - the object count the files were sliced with (manifest `objects`);
 *  - the STL bounding box (read with our STL reader) for the printed size.
 * Our figures are in the test names, so a run prints the comparison table.
 */
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { inspectFile } from '../../../lib/inspection/inspect';
import { parseStl } from '../../../lib/stl';

const FIXTURES = join(__dirname, '../../fixtures');

interface ManifestEntry {
  file: string;
  stl: string;
  slicer: string;
  variant: string;
  settings: { layer_height_mm: number; first_layer_height_mm: number; filament_diameter_mm: number };
  slicer_reports: { filament_length_mm: number | null; estimated_time_s: number | null };
  objects: number;
}

const manifest = JSON.parse(readFileSync(join(FIXTURES, 'manifest.json'), 'utf8')) as ManifestEntry[];

const results = await Promise.all(
  manifest.map(async (m) => ({
    m,
    r: await inspectFile(join(FIXTURES, m.file), { filamentDiameterMm: m.settings.filament_diameter_mm, skipToolpathSettings: true }),
    stl: parseStl(readFileSync(join(FIXTURES, m.stl))),
  })),
);

const pct = (ours: number, theirs: number) => ((ours / theirs - 1) * 100).toFixed(2);

describe('filament length vs the slicer total (±0.5 %)', () => {
  for (const { m, r } of results) {
    const theirs = m.slicer_reports.filament_length_mm;
    if (theirs === null) continue;
    it(`${m.file}: ours ${r.filament.lengthMm.toFixed(1)} mm, ${m.slicer} ${theirs} mm (${pct(r.filament.lengthMm, theirs)} %)`, () => {
      expect(Math.abs(r.filament.lengthMm / theirs - 1)).toBeLessThanOrEqual(0.005);
    });
  }
});

describe('print time vs the slicer estimate (±10 %)', () => {
  for (const { m, r } of results) {
    const theirs = m.slicer_reports.estimated_time_s;
    if (theirs === null) continue;
    it(`${m.file}: ours ${r.time.estimatedS.toFixed(0)} s, ${m.slicer} ${theirs} s (${pct(r.time.estimatedS, theirs)} %)`, () => {
      expect(Math.abs(r.time.estimatedS / theirs - 1)).toBeLessThanOrEqual(0.1);
    });
  }
});

describe('layers, objects and size vs the settings and the STL', () => {
  for (const { m, r, stl } of results) {
    const h = m.settings.layer_height_mm;
    const first = m.settings.first_layer_height_mm;
    // Layers expected from the part height: the first layer, then steps of h to the top (±1 for the
    // slicer's handling of the last partial layer).
    const expectedLayers = Math.round((stl.sizeMm.z - first) / h) + 1;
    it(`${m.file}: ${r.layers.count} layers of ${r.layers.heightMm} mm, first ${r.layers.firstHeightMm} mm (expected ~${expectedLayers}, ${h}, ${first})`, () => {
      expect(r.layers.heightMm).toBeCloseTo(h, 6);
      expect(r.layers.firstHeightMm).toBeCloseTo(first, 6);
      expect(Math.abs(r.layers.count - expectedLayers)).toBeLessThanOrEqual(1);
    });
    it(`${m.file}: ${r.objects} object(s), manifest ${m.objects}`, () => {
      expect(r.objects).toBe(m.objects);
    });
    const s = r.sizeMm!;
    it(`${m.file}: size ${s.x.toFixed(2)} × ${s.y.toFixed(2)} × ${s.z.toFixed(2)} mm vs STL ${stl.sizeMm.x} × ${stl.sizeMm.y} × ${stl.sizeMm.z}`, () => {
      // Z: the top layer sits within one layer height of the model top.
      expect(Math.abs(s.z - stl.sizeMm.z)).toBeLessThanOrEqual(h + 1e-6);
      if (m.objects === 1) {
        // X/Y within 1 % (the rulebook's scale tolerance); slicers arrange several objects anew.
        expect(Math.abs(s.x / stl.sizeMm.x - 1)).toBeLessThanOrEqual(0.01);
        expect(Math.abs(s.y / stl.sizeMm.y - 1)).toBeLessThanOrEqual(0.01);
      }
    });
  }
});

describe('every fixture inspects cleanly', () => {
  for (const { m, r } of results) {
    it(`${m.file}: no parser warnings, flow ${r.flow.p95Mm3s?.toFixed(1)} mm³/s p95, ${r.flow.peakMm3s?.toFixed(1)} peak`, () => {
      expect(r.warnings.filter((w) => w.severity !== 'info')).toEqual([]);
      expect(r.commands.unknownTotal).toBe(0);
      expect(r.flow.peakMm3s).toBeGreaterThanOrEqual(r.flow.p95Mm3s!);
      expect(r.flow.p95Mm3s).toBeGreaterThanOrEqual(r.flow.meanMm3s!);
    });
  }
  it('stripping comments changes no measurement (nocomments variants vs their originals)', () => {
    for (const { m, r } of results.filter((x) => x.m.variant === 'nocomments')) {
      const orig = results.find((x) => m.file === x.m.file.replace('.gcode.gz', '-nocomments.gcode.gz'))!.r;
      expect(r.filament.lengthMm).toBeCloseTo(orig.filament.lengthMm, 6);
      expect(r.time.estimatedS).toBeCloseTo(orig.time.estimatedS, 6);
      expect(r.layers.count).toBe(orig.layers.count);
      expect(r.objects).toBe(orig.objects);
      expect(r.flow.peakMm3s).toBeCloseTo(orig.flow.peakMm3s!, 6);
    }
  });
});
