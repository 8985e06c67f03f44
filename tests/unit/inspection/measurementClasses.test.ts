/**
 * Three classes of measurement error, each pinned with our own real slicer output
 * (scripts/fixtures/slice.sh, settings recorded in tests/fixtures/manifest.json):
 *  - bottom solid layers on CuraEngine files with no settings block;
 *  - 10 % sparse infill of straight lines that alternate direction layer by layer (CuraEngine);
 *  - the wall count where Slic3r adds extra perimeters on a sloped wall (its default), with the
 *    layers that have the extra loops listed.
 */
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import { gunzipSync } from 'node:zlib';
import { describe, expect, it } from 'vitest';
import { inspectFile } from '../../../lib/inspection/inspect';
import { toJsonReport } from '../../../lib/inspection/report';

const FIXTURES = join(__dirname, '../../fixtures');
interface Entry {
  file: string;
  slicer: string;
  settings: { walls: number; bottom_layers: number; top_layers: number; infill_percent: number; infill_pattern: string; layer_height_mm: number };
}
const manifest = JSON.parse(readFileSync(join(FIXTURES, 'manifest.json'), 'utf8')) as Entry[];
const entry = (name: string) => manifest.find((m) => m.file === `gcode/${name}.gcode.gz`)!;
const inspect = (name: string) => inspectFile(join(FIXTURES, 'gcode', `${name}.gcode.gz`));
const text = (name: string) => gunzipSync(readFileSync(join(FIXTURES, 'gcode', `${name}.gcode.gz`))).toString('latin1');

describe('CuraEngine from the command line: no settings block in the file', () => {
  // Source: CuraEngine 4.13.0 run alone (cura-engine 1:4.13.0-1 in Debian), sliced with
  // -s bottom_layers=3 / 4 -s initial_bottom_layers=3 / 4 -s infill_sparse_density=10
  // -s infill_pattern=lines -s infill_line_distance=4.0 (fdmprinter.def.json's formula:
  // line width 0.4 × 100 ÷ 10 % × 1 for lines); manifest.json settings.
  const files = ['cura-slab-b3-lines10', 'cura-cube20-b4-lines10'];

  it.each(files)('%s carries no settings block (nothing declared)', async (name) => {
    expect(text(name)).not.toMatch(/;SETTING_3|bottom_layers|infill_sparse_density/);
    const r = await inspect(name);
    expect(r.settings.bottom_layers.declared).toBeNull();
    expect(r.settings.infill_percent.declared).toBeNull();
  });

  it.each(files)('%s: bottom solid layers read what it was sliced with (3 and 4), not CuraEngine’s default 6', async (name) => {
    const r = await inspect(name);
    expect(entry(name).settings.bottom_layers).toBe(name.includes('b3') ? 3 : 4); // source: slice.sh / manifest.json
    expect(r.settings.bottom_layers.measured, r.settings.bottom_layers.detail).toBe(entry(name).settings.bottom_layers);
    expect(r.settings.top_layers.measured).toBe(entry(name).settings.top_layers);
  });

  it.each(files)('%s: 10 %% lines that alternate direction each layer read 10 %% (± 1), not ~20 %%', async (name) => {
    // The lines pattern turns by 90° every layer (fdmprinter infill_angles default [45, 135] for lines):
    // the file's own infill moves on two consecutive sparse layers run at right angles.
    const r = await inspect(name);
    expect(entry(name).settings.infill_pattern).toBe('lines');
    expect(Math.abs(r.settings.infill_percent.measured! - 10), r.settings.infill_percent.detail).toBeLessThanOrEqual(1);
  });
});

describe('Slic3r 1.3 extra perimeters on a sloped wall', () => {
  // Source: Slic3r 1.3.0 (slic3r 1.3.0+dfsg1-5 in Debian) with --perimeters 2 and its default
  // extra_perimeters = 1 (the file's own settings block says so), and the same STL with
  // --no-extra-perimeters. The silo: cylinder to Z 12, then a roof stepping 0.625 mm in per layer.
  it('reports the count most layers have (2, as configured) and lists the roof layers with the extra loop', async () => {
    expect(text('slic3r-silo-020')).toMatch(/^; extra_perimeters = 1$/m);
    expect(text('slic3r-silo-020')).toMatch(/^; perimeters = 2$/m);
    const r = await inspect('slic3r-silo-020');
    const walls = r.settings.walls;
    expect(walls.measured, walls.detail).toBe(entry('slic3r-silo-020').settings.walls);
    expect(walls.declared).toBe(2);
    const layers = walls.extraLoopLayers!;
    expect(layers.length).toBeGreaterThanOrEqual(8);
    expect(walls.extraLoopLayerCount).toBe(layers.length);
    for (const l of layers) {
      expect(l.zMm).toBeGreaterThan(12); // only on the roof
      expect(l.zMm).toBeLessThan(15.2);
      expect(l.walls).toBe(3);
    }
    // No mismatch flag: the configured count is what most layers have.
    expect(r.warnings.map((w) => w.code)).not.toContain('settings_mismatch_walls');
    // The report contract carries both to the review desk.
    const json = toJsonReport(r);
    expect(json.settings.walls.measured).toBe(2);
    expect(json.settings.walls.extra_loop_layers?.map((l) => l.z_mm)).toEqual(layers.map((l) => Math.round(l.zMm * 1000) / 1000));
  });

  it('lists no layers when the same part is sliced with extra perimeters off (so the list is that feature)', async () => {
    expect(text('slic3r-silo-020-noextra')).toMatch(/^; extra_perimeters = 0$/m);
    const r = await inspect('slic3r-silo-020-noextra');
    expect(r.settings.walls.measured).toBe(2);
    expect(r.settings.walls.extraLoopLayers).toEqual([]);
    expect(toJsonReport(r).settings.walls.extra_loop_layers).toEqual([]);
  });
});
