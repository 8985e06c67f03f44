import { readFileSync } from 'node:fs';
import { gunzipSync } from 'node:zlib';
import path from 'node:path';
import { describe, expect, it } from 'vitest';
import { createDeclaredSettingsReader, parseDurationS, type DeclaredSettings } from '@/lib/inspection/declared';

const FIXTURES = path.resolve(__dirname, '../../fixtures');

interface ManifestEntry {
  file: string;
  slicer: string;
  variant: 'original' | 'nocomments' | 'lying';
  settings: Record<string, number | string>;
  slicer_reports: { filament_length_mm: number | null; estimated_time_s: number | null };
  declared_lie?: Record<string, number>;
}
const manifest: ManifestEntry[] = JSON.parse(readFileSync(path.join(FIXTURES, 'manifest.json'), 'utf8'));

/** Feed every comment of a fixture (text after ';', trimmed — the parser's comment contract). */
function readDeclared(file: string): DeclaredSettings {
  const text = gunzipSync(readFileSync(path.join(FIXTURES, file))).toString('latin1');
  const r = createDeclaredSettingsReader();
  let lineNo = 0;
  for (const line of text.split('\n')) {
    lineNo++;
    const i = line.indexOf(';');
    if (i >= 0) r.comment(line.slice(i + 1).trim(), lineNo);
  }
  return r.result();
}

function feed(lines: string[]): DeclaredSettings {
  const r = createDeclaredSettingsReader();
  lines.forEach((l, i) => r.comment(l, i + 1));
  return r.result();
}

const SETTING_KEYS = ['infill_percent', 'walls', 'top_layers', 'bottom_layers', 'layer_height_mm', 'first_layer_height_mm', 'nozzle_mm', 'line_width_mm', 'filament_diameter_mm'] as const;

describe('declared settings on real slicer output (source: the fixtures\' manifest, written from the slicer invocations)', () => {
  for (const f of manifest.filter((m) => m.variant === 'original' && !m.slicer.startsWith('curaengine'))) {
    it(`${f.file}: the settings block gives the settings it was sliced with`, () => {
      const d = readDeclared(f.file);
      const dialect = f.slicer.startsWith('prusaslicer') ? 'prusaslicer' : 'slic3r';
      expect(d.dialect).toBe(dialect);
      expect(d.generator).toMatch(dialect === 'prusaslicer' ? /^PrusaSlicer 2\.5\.0/ : /^Slic3r 1\.3\.0/);
      for (const k of SETTING_KEYS) expect(d.values[k].value, k).toBeCloseTo(Number(f.settings[k]), 6);
      // The slicer's own totals as the manifest records them from the file.
      expect(d.reported.filament_length_mm.value).toBeCloseTo(f.slicer_reports.filament_length_mm!, 2);
      expect(d.reported.estimated_time_s.value).toBe(f.slicer_reports.estimated_time_s);
      expect(d.values.walls.key).toBe('perimeters');
      expect(d.values.infill_percent.key).toBe('fill_density');
    });
  }

  it('PrusaSlicer: keys and line numbers are reported, material from filament_type', () => {
    const d = readDeclared('gcode/prusa-beacon-020.gcode.gz');
    expect(d.values.top_layers.key).toBe('top_solid_layers');
    expect(d.values.top_layers.lineNo).toBeGreaterThan(1000);
    expect(d.values.line_width_mm.key).toBe('perimeters extrusion width');
    expect(d.values.material_family.value).toBe('pla');
    expect(d.reported.estimated_time_s.key).toBe('estimated printing time (normal mode)');
  });

  it('Slic3r 1.3: "filament used = …mm (…cm3)" and no time estimate', () => {
    const d = readDeclared('gcode/slic3r-beacon-020.gcode.gz');
    expect(d.reported.filament_length_mm.value).toBeCloseTo(4920.8, 3);
    expect(d.reported.filament_length_mm.key).toBe('filament used');
    expect(d.reported.estimated_time_s.value).toBeNull();
  });

  for (const f of manifest.filter((m) => m.variant === 'original' && m.slicer.startsWith('curaengine'))) {
    it(`${f.file}: CuraEngine short header`, () => {
      const d = readDeclared(f.file);
      expect(d.dialect).toBe('cura');
      expect(d.generator).toBe('Cura_SteamEngine 4.13.0');
      expect(d.values.layer_height_mm.value).toBeCloseTo(Number(f.settings.layer_height_mm), 6);
      expect(d.values.layer_height_mm.key).toBe('Layer height');
      expect(d.reported.estimated_time_s.value).toBe(f.slicer_reports.estimated_time_s);
      expect(d.reported.filament_length_mm.value).toBeCloseTo(f.slicer_reports.filament_length_mm!, 2);
      // CuraEngine on its own writes no settings block: walls and infill are not declared.
      expect(d.values.walls.value).toBeNull();
      expect(d.values.infill_percent.value).toBeNull();
    });
  }

  for (const f of manifest.filter((m) => m.variant === 'nocomments')) {
    it(`${f.file}: no comments → dialect unknown, everything null`, () => {
      const d = readDeclared(f.file);
      expect(d.dialect).toBe('unknown');
      expect(d.generator).toBeNull();
      for (const k of SETTING_KEYS) expect(d.values[k].value, k).toBeNull();
      expect(d.reported.filament_length_mm.value).toBeNull();
      expect(d.reported.estimated_time_s.value).toBeNull();
    });
  }

  for (const f of manifest.filter((m) => m.variant === 'lying')) {
    it(`${f.file}: reads what the edited block claims`, () => {
      const d = readDeclared(f.file);
      for (const [k, v] of Object.entries(f.declared_lie ?? {})) {
        expect(d.values[k as (typeof SETTING_KEYS)[number]].value, k).toBe(v);
        expect(v).not.toBe(f.settings[k]);
      }
    });
  }
});

describe('declared settings on composed comment blocks', () => {
  it('reads a CuraEngine SETTING_3 block split over several lines (front-end output format)', () => {
    const d = feed([
      'FLAVOR:Marlin',
      'Generated with Cura_SteamEngine 4.13.0',
      'SETTING_3 {"global_quality": "[general]\\\\nversion = 4\\\\nname = Normal\\\\n[values]\\\\nlayer_heig',
      'SETTING_3 ht = 0.16\\\\nlayer_height_0 = 0.3\\\\ninfill_sparse_density = 18\\\\nwall_line_count = 3\\\\ntop_la',
      'SETTING_3 yers = 5\\\\nbottom_layers = 6\\\\nmachine_nozzle_size = 0.6\\\\nmaterial_diameter = 2.85\\\\n"}',
    ]);
    expect(d.dialect).toBe('cura');
    expect(d.values.layer_height_mm.value).toBe(0.16);
    expect(d.values.first_layer_height_mm.value).toBe(0.3);
    expect(d.values.infill_percent.value).toBe(18);
    expect(d.values.walls.value).toBe(3);
    expect(d.values.top_layers.value).toBe(5);
    expect(d.values.bottom_layers.value).toBe(6);
    expect(d.values.nozzle_mm.value).toBe(0.6);
    expect(d.values.filament_diameter_mm.value).toBe(2.85);
    expect(d.values.walls.key).toBe('SETTING_3 wall_line_count');
  });

  it('treats CuraEngine CLI placeholders as unknown and falls back to the last TIME_ELAPSED', () => {
    // CuraEngine run on its own writes ";TIME:6666" and ";Filament used: 0m" (tests/fixtures/README.md).
    const d = feed(['FLAVOR:Marlin', 'TIME:6666', 'Filament used: 0m', 'Layer height: 0.2', 'LAYER:0', 'TIME_ELAPSED:12.5', 'LAYER:1', 'TIME_ELAPSED:812.25']);
    expect(d.reported.filament_length_mm.value).toBeNull();
    expect(d.reported.estimated_time_s.value).toBe(812.25);
    expect(d.reported.estimated_time_s.key).toBe('TIME_ELAPSED');
    expect(d.notes.join(' ')).toMatch(/placeholder/);
  });

  it('sums multi-extruder totals', () => {
    expect(feed(['Filament used: 1.5m, 0.25m']).reported.filament_length_mm.value).toBeCloseTo(1750, 6);
    expect(feed(['filament used [mm] = 1200.5, 10.5']).reported.filament_length_mm.value).toBeCloseTo(1211, 6);
  });

  it('resolves percentages: first layer of layer height, line width of nozzle, fill_density as fraction', () => {
    const d = feed(['layer_height = 0.2', 'first_layer_height = 150%', 'nozzle_diameter = 0.4,0.4', 'extrusion_width = 110%', 'fill_density = 0.2']);
    expect(d.values.first_layer_height_mm.value).toBeCloseTo(0.3, 9);
    expect(d.values.line_width_mm.value).toBeCloseTo(0.44, 9);
    expect(d.values.infill_percent.value).toBeCloseTo(20, 9);
    // extrusion_width = 0 means "automatic": no declared width.
    expect(feed(['extrusion_width = 0']).values.line_width_mm.value).toBeNull();
  });

  it('reads other slicers\' key = value and key,value styles as the generic dialect', () => {
    const d = feed(['sparse_infill_density = 12%', 'wall_loops = 3', 'top_shell_layers = 6', 'bottom_shell_layers = 5', 'initial_layer_print_height = 0.25', 'layer_height = 0.2']);
    expect(d.dialect).toBe('generic');
    expect([d.values.infill_percent.value, d.values.walls.value, d.values.top_layers.value, d.values.bottom_layers.value]).toEqual([12, 3, 6, 5]);
    expect(d.values.first_layer_height_mm.value).toBe(0.25);
    const c = feed(['layerHeight,0.15', 'infillPercentage,22', 'perimeterOutlines,4', 'extruderDiameter,0.5']);
    expect([c.values.layer_height_mm.value, c.values.infill_percent.value, c.values.walls.value, c.values.nozzle_mm.value]).toEqual([0.15, 22, 4, 0.5]);
  });

  it('ignores feature and layer markers and notes unreadable numbers', () => {
    const d = feed(['TYPE:External perimeter', 'LAYER_CHANGE', 'Z:0.2', 'HEIGHT:0.2', 'WIDTH:0.45', 'perimeters = lots']);
    expect(d.dialect).toBe('unknown');
    expect(d.values.walls.value).toBeNull();
    expect(d.notes[0]).toMatch(/Line 6: could not read a number from "perimeters"/);
  });

  it('parses slicer durations', () => {
    // PrusaSlicer writes "1d 2h 3m 4s"-style durations.
    expect(parseDurationS('23m 47s')).toBe(1427);
    expect(parseDurationS('1d 2h 3m 4s')).toBe(86400 + 7200 + 180 + 4);
    expect(parseDurationS('soon')).toBeNull();
  });

  it('keeps notes bounded when a bad line repeats', () => {
    const d = feed(Array.from({ length: 5000 }, () => 'TIME:6666'));
    expect(d.notes.length).toBe(20);
  });

  it('keeps a huge SETTING_3 block bounded', () => {
    const r = createDeclaredSettingsReader();
    const chunk = 'SETTING_3 ' + 'x'.repeat(1000);
    for (let i = 0; i < 2000; i++) r.comment(chunk, i + 1);
    const d = r.result();
    expect(d.notes.join(' ')).toMatch(/longer than 256 kB/);
  });
});
