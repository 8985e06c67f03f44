/**
 * The G-code fixtures against their manifest: the settings blocks that PrusaSlicer and Slic3r
 * wrote themselves must agree with the manifest's true settings (and the lying variants must
 * disagree exactly where declared_lie says), so the manifest is checked by the slicers' own output.
 */
import { readFileSync, readdirSync, statSync } from 'node:fs';
import { join } from 'node:path';
import { gunzipSync } from 'node:zlib';
import { describe, expect, it } from 'vitest';
import { parseDurationS, parseSlicerReports, stripComments, type ManifestEntry } from '@/scripts/fixtures/postprocess';

const DIR = join(__dirname, '../../fixtures');
const manifest: ManifestEntry[] = JSON.parse(readFileSync(join(DIR, 'manifest.json'), 'utf8'));
const gcode = (e: ManifestEntry) => gunzipSync(readFileSync(join(DIR, e.file))).toString('utf8');

/** "; key = value" from a PrusaSlicer/Slic3r settings block */
function block(text: string, key: string): string | undefined {
  return new RegExp(`^; ${key} = (.*)$`, 'm').exec(text)?.[1];
}

describe('fixture manifest', () => {
  it('lists every gzipped G-code file exactly once, and the whole set stays small', () => {
    const files = readdirSync(join(DIR, 'gcode')).filter((f) => f.endsWith('.gcode.gz')).map((f) => `gcode/${f}`);
    expect(manifest.map((e) => e.file).sort()).toEqual(files.sort());
    const totalBytes = files.reduce((sum, f) => sum + statSync(join(DIR, f)).size, 0);
    expect(totalBytes).toBeLessThan(15 * 1024 * 1024);
    for (const e of manifest) expect(statSync(join(DIR, e.stl)).isFile(), e.stl).toBe(true);
  });

  it('has at least one original of each slicer and both kinds of variant', () => {
    for (const slicer of ['prusaslicer', 'slic3r', 'curaengine']) {
      expect(manifest.some((e) => e.variant === 'original' && e.slicer.startsWith(slicer)), slicer).toBe(true);
    }
    expect(manifest.filter((e) => e.variant === 'nocomments').length).toBeGreaterThanOrEqual(2);
    expect(manifest.filter((e) => e.variant === 'lying').length).toBeGreaterThanOrEqual(2);
  });

  describe.each(manifest.filter((e) => !e.slicer.startsWith('curaengine')).map((e) => [e.file, e] as const))(
    '%s',
    (_file, e) => {
      const text = gcode(e);
      if (e.variant === 'nocomments') {
        it('has no settings block left', () => expect(block(text, 'perimeters')).toBeUndefined());
        return;
      }
      it("the slicer's own settings block agrees with the manifest (lies where declared)", () => {
        const claimed = { ...e.settings, ...(e.declared_lie ?? {}) };
        expect(Number(block(text, 'layer_height'))).toBe(claimed.layer_height_mm);
        expect(Number(block(text, 'first_layer_height'))).toBe(claimed.first_layer_height_mm);
        expect(Number(block(text, 'perimeters'))).toBe(claimed.walls);
        expect(Number(block(text, 'top_solid_layers'))).toBe(claimed.top_layers);
        expect(Number(block(text, 'bottom_solid_layers'))).toBe(claimed.bottom_layers);
        expect(block(text, 'fill_density')).toBe(`${claimed.infill_percent}%`);
        expect(block(text, 'fill_pattern')).toBe(claimed.infill_pattern);
        expect(Number(block(text, 'nozzle_diameter'))).toBe(claimed.nozzle_mm);
        expect(Number(block(text, 'filament_diameter'))).toBe(claimed.filament_diameter_mm);
        expect(Number(block(text, 'perimeter_extrusion_width'))).toBe(claimed.line_width_mm);
      });
      if (e.variant === 'lying') {
        it('really lies: every declared value differs from the true one', () => {
          for (const [k, v] of Object.entries(e.declared_lie ?? {})) {
            expect(v, k).not.toBe(e.settings[k as keyof typeof e.settings]);
          }
        });
      }
    },
  );

  it('CuraEngine files carry the real header, not the standalone placeholders', () => {
    for (const e of manifest.filter((m) => m.slicer.startsWith('curaengine') && m.variant === 'original')) {
      const text = gcode(e);
      expect(text).not.toMatch(/^;TIME:6666$/m);
      expect(text).not.toMatch(/^;Filament used: 0m$/m);
      expect(Number(/^;Layer height: (.*)$/m.exec(text)?.[1])).toBe(e.settings.layer_height_mm);
      // ;LAYER_COUNT: is the number of layers the engine printed; the objects' tops are at whole layers
      const layers = Number(/^;LAYER_COUNT:(\d+)/m.exec(text)?.[1]);
      const maxZ = Number(/^;MAXZ:(.*)$/m.exec(text)?.[1]);
      expect(e.settings.first_layer_height_mm + (layers - 1) * e.settings.layer_height_mm).toBeCloseTo(maxZ, 6);
    }
  });

  it('slicer_reports are what the file says, and stripping comments leaves no ";"', () => {
    for (const e of manifest) {
      const text = gcode(e);
      expect(parseSlicerReports(text), e.file).toEqual(e.slicer_reports);
      if (e.variant === 'nocomments') expect(text.includes(';'), e.file).toBe(false);
    }
  });

  it('the demo file reports what PrusaSlicer printed in its header', () => {
    const demo = manifest.find((m) => m.file === 'gcode/prusa-beacon-020.gcode.gz')!;
    const text = gcode(demo);
    expect(text).toMatch(/^; generated by PrusaSlicer 2\.5\.0/m);
    // the file carries its motion limits (machine_limits_usage = emit_to_gcode)
    expect(text).toMatch(/^M201 X10000 Y10000/m);
    expect(text).toMatch(/^M203 X500 Y500/m);
    expect(demo.slicer_reports.estimated_time_s).toBeGreaterThan(60);
  });
});

describe('fixture helpers', () => {
  it('parse PrusaSlicer durations', () => {
    expect(parseDurationS('23m 47s')).toBe(23 * 60 + 47);
    expect(parseDurationS('1d 2h 3m 4s')).toBe(86400 + 7200 + 180 + 4);
    expect(parseDurationS('soon')).toBeNull();
  });

  it('strip whole-line and trailing comments', () => {
    expect(stripComments('; header\nG1 X1 ; move\n;TYPE:Perimeter\nG1 Y2\n')).toBe('G1 X1\nG1 Y2\n');
  });
});
