import { mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { gunzipSync } from 'node:zlib';
import path from 'node:path';
import { describe, expect, it } from 'vitest';
import { readFileLines } from '@/lib/inspection/reader';
import { GcodeParser } from '@/lib/inspection/parser';
import { createToolpathSettingsAnalyzer, type MeasuredSettings, type ToolpathSettingsOptions } from '@/lib/inspection/toolpathSettings';
import { createDeclaredSettingsReader, type DeclaredSettings } from '@/lib/inspection/declared';
import { settingsMismatchFlags } from '@/lib/inspection/rules';
import type { Segment, SegmentSink, SettingsEvidence } from '@/lib/inspection/types';
import { B_EDGE, B_EMPTY, B_SOLID, B_SPARSE, ColumnTracker } from '@/lib/inspection/toolpath/columns';

const FIXTURES = path.resolve(__dirname, '../../fixtures');

interface ManifestEntry {
  file: string;
  slicer: string;
  variant: 'original' | 'nocomments' | 'lying';
  settings: {
    layer_height_mm: number;
    first_layer_height_mm: number;
    walls: number;
    top_layers: number;
    bottom_layers: number;
    infill_percent: number;
    nozzle_mm: number;
    filament_diameter_mm: number;
    line_width_mm: number;
  };
  declared_lie?: Record<string, number>;
}
const manifest: ManifestEntry[] = JSON.parse(readFileSync(path.join(FIXTURES, 'manifest.json'), 'utf8'));

async function inspectFixture(file: string, opts: Partial<ToolpathSettingsOptions> = {}): Promise<{ measured: MeasuredSettings; declared: DeclaredSettings }> {
  const analyzer = createToolpathSettingsAnalyzer({ filamentDiameterMm: 1.75, ...opts });
  const declared = createDeclaredSettingsReader();
  const sink: SegmentSink = {
    segment: (s) => analyzer.segment(s),
    comment: (t, n) => declared.comment(t, n),
    end: () => analyzer.end?.(),
  };
  const parser = new GcodeParser(sink);
  await readFileLines(path.isAbsolute(file) ? file : path.join(FIXTURES, file), parser);
  parser.end();
  return { measured: analyzer.result(), declared: declared.result() };
}

function evidence(m: MeasuredSettings, d: DeclaredSettings): SettingsEvidence {
  const pair = (declared: number | null, measured: number | null) => ({ declared, measured });
  return {
    infill_percent: pair(d.values.infill_percent.value, m.infill_percent.value),
    walls: pair(d.values.walls.value, m.walls.value),
    top_layers: pair(d.values.top_layers.value, m.top_layers.value),
    bottom_layers: pair(d.values.bottom_layers.value, m.bottom_layers.value),
    layer_height_mm: pair(d.values.layer_height_mm.value, m.layer_height_mm.value),
    nozzle_mm: pair(d.values.nozzle_mm.value, m.nozzle_mm.value),
  };
}

/**
 * Outside check: real PrusaSlicer 2.5.0, Slic3r 1.3.0 and CuraEngine 4.13.0 output of our shapes,
 * with the settings each file was sliced with recorded in tests/fixtures/manifest.json
 * (scripts/fixtures/slice.sh). Measured from toolpaths only, so the -nocomments and -lying
 * variants must give the same figures as their originals.
 */
describe('settings measured from toolpaths equal the sliced settings on every fixture', () => {
  for (const f of manifest) {
    it(`${f.file} (${f.slicer}, ${f.variant})`, async () => {
      const { measured: m, declared: d } = await inspectFixture(f.file);
      const s = f.settings;
      expect(m.walls.value, `walls: ${m.walls.detail}`).toBe(s.walls);
      expect(m.top_layers.value, `top: ${m.top_layers.detail}`).toBe(s.top_layers);
      expect(m.bottom_layers.value, `bottom: ${m.bottom_layers.detail}`).toBe(s.bottom_layers);
      expect(Math.abs(m.infill_percent.value! - s.infill_percent), `infill ${m.infill_percent.value}: ${m.infill_percent.detail}`).toBeLessThanOrEqual(2);
      expect(m.layer_height_mm.value).toBeCloseTo(s.layer_height_mm, 3);
      expect(m.first_layer_height_mm.value).toBeCloseTo(s.first_layer_height_mm, 3);
      expect(m.nozzle_mm.value).toBe(s.nozzle_mm);
      // Line width by the round-end flow model: PrusaSlicer/Slic3r extrude that model, so it is
      // recovered exactly; CuraEngine extrudes width × height rectangles, which the model reads
      // h (1 − π/4) ≈ 0.04 mm wider.
      expect(Math.abs(m.line_width_mm.value! - s.line_width_mm)).toBeLessThanOrEqual(f.slicer.startsWith('curaengine') ? 0.06 : 0.01);

      // Cross-check against the slicer's own feature labels (;TYPE: lines, or Slic3r's verbose
      // "; perimeter" comments): the loops counted as walls hold the wall-labelled extrusion.
      // Slic3r writes feature comments only with --gcode-comments (the cylinder fixtures).
      if (f.variant === 'nocomments' || f.file.startsWith('gcode/slic3r-beacon') || f.file.startsWith('gcode/slic3r-silo')) expect(m.labelledWallAgreement).toBeNull();
      else expect(m.labelledWallAgreement!, m.walls.detail).toBeGreaterThan(0.95);

      const flags = settingsMismatchFlags(evidence(m, d));
      if (f.variant === 'lying') {
        // Source of the lie: manifest declared_lie (what the edited block claims).
        const lied = Object.keys(f.declared_lie ?? {});
        expect(lied.length).toBeGreaterThan(0);
        const expected = lied.map((k) => ({ infill_percent: 'settings_mismatch_infill', walls: 'settings_mismatch_walls', top_layers: 'settings_mismatch_top_layers', bottom_layers: 'settings_mismatch_bottom_layers' })[k]).sort();
        expect(flags.map((x) => x.code).sort()).toEqual(expected);
      } else {
        expect(flags, JSON.stringify(flags)).toEqual([]);
      }
    });
  }

  it('every figure carries a detail string', async () => {
    const { measured: m } = await inspectFixture('gcode/prusa-beacon-020.gcode.gz');
    for (const k of ['walls', 'top_layers', 'bottom_layers', 'infill_percent', 'layer_height_mm', 'first_layer_height_mm', 'line_width_mm', 'nozzle_mm'] as const) {
      expect(m[k].detail.length, k).toBeGreaterThan(10);
    }
    expect(m.walls.detail).toMatch(/mode over \d+ sparse layers without extra loops.*agree/);
    expect(m.analysedLayers).toBe(m.layers - 1); // all but the prime line's "layer" at Z 0.3
  });

  it('result() can be called twice with the same answer', async () => {
    const analyzer = createToolpathSettingsAnalyzer({ filamentDiameterMm: 1.75 });
    const parser = new GcodeParser(analyzer);
    await readFileLines(path.join(FIXTURES, 'gcode/prusa-twin-020.gcode.gz'), parser);
    parser.end();
    expect(analyzer.result()).toEqual(analyzer.result());
  });

  it('copies stacked after a lift and a G92 Z shift (one tall part) give the same figures', async () => {
    const text = gunzipSync(readFileSync(path.join(FIXTURES, 'gcode/prusa-cube20-relative-e.gcode.gz'))).toString('latin1');
    const copy = (home: boolean) => (home ? text : text.replace(/^G28/gm, ';G28')) + '\nG90\nG1 Z50 F600\nG92 Z-5\n';
    const dir = mkdtempSync(path.join(tmpdir(), 'hotlap-settings-'));
    const file = path.join(dir, 'stacked.gcode');
    writeFileSync(file, copy(true) + copy(false) + copy(false), 'latin1');
    try {
      const { measured: m } = await inspectFixture(file);
      expect([m.walls.value, m.top_layers.value, m.bottom_layers.value, m.layer_height_mm.value, m.first_layer_height_mm.value]).toEqual([2, 4, 4, 0.2, 0.2]);
      expect(Math.abs(m.infill_percent.value! - 15)).toBeLessThanOrEqual(2);
      // Each copy's bed-side stack is counted: three times the columns of one copy.
      const single = (await inspectFixture('gcode/prusa-cube20-relative-e.gcode.gz')).measured;
      expect(m.bottom_layers.detail).toContain(`in ${3 * Number(/in (\d+) /.exec(single.bottom_layers.detail)![1])} `);
    } finally {
      rmSync(dir, { recursive: true, force: true });
    }
  });

  it('a tight work budget samples windows of layers and still finds the same settings', async () => {
    const { measured: m } = await inspectFixture('gcode/prusa-beacon-020.gcode.gz', { cellBudget: { baseCells: 1_200_000, cellsPerSegment: 0 } });
    expect(m.analysedLayers).toBeLessThan(m.layers / 2);
    expect(m.walls.value).toBe(2);
    expect(m.bottom_layers.value).toBe(4);
    expect(Math.abs(m.infill_percent.value! - 15)).toBeLessThanOrEqual(2);
    expect(m.walls.detail).toMatch(/Large file: \d+ of \d+ layers analysed/);
  });
});

// ---------------------------------------------------------------------------------------------
// Hand-built toolpaths: a square box drawn the way Slic3r lays it out, to test the method on
// exactly known geometry. Flow per Slic3r's flow math (rectangle with semicircular ends):
// A = (w − h) h + π h² / 4, spacing between neighbouring lines = w − h (1 − π/4).
// ---------------------------------------------------------------------------------------------
interface BoxSpec {
  sizeMm: number;
  layers: number;
  layerMm: number;
  walls: number;
  top: number;
  bottom: number;
  infillPercent: number;
  widthMm: number;
  holeMm?: number;
  /** Print the sparse infill of n layers as one layer n times as thick (on every n-th layer). */
  infillEvery?: number;
}
const FILAMENT_AREA = Math.PI * 0.875 ** 2;

function boxSegments(spec: BoxSpec, emit: (s: Segment) => void): void {
  const { sizeMm: L, layerMm: h, widthMm: w } = spec;
  const areaMm2 = (w - h) * h + (Math.PI * h * h) / 4;
  const spacing = w - h * (1 - Math.PI / 4);
  const seg: Segment = { x0: 0, y0: 0, z0: 0, x1: 0, y1: 0, z1: 0, lengthMm: 0, eMm: 0, feedMms: 100, extruding: false, feature: null, tool: 0, lineNo: 0 };
  let x = 0;
  let y = 0;
  let z = 0;
  let sectionScale = 1;
  const move = (nx: number, ny: number, nz: number, extrude: boolean) => {
    const len = Math.hypot(nx - x, ny - y, nz - z);
    Object.assign(seg, { x0: x, y0: y, z0: z, x1: nx, y1: ny, z1: nz, lengthMm: len, eMm: extrude ? (sectionScale * areaMm2 * len) / FILAMENT_AREA : 0, extruding: extrude && len > 0 });
    seg.lineNo++;
    emit(seg);
    x = nx;
    y = ny;
    z = nz;
  };
  const square = (x0: number, y0: number, x1: number, y1: number, zz: number) => {
    move(x0, y0, zz, false);
    move(x1, y0, zz, true);
    move(x1, y1, zz, true);
    move(x0, y1, zz, true);
    move(x0, y0, zz, true);
  };
  for (let layer = 0; layer < spec.layers; layer++) {
    const zz = (layer + 1) * h;
    sectionScale = 1;
    for (let k = 0; k < spec.walls; k++) {
      const inset = w / 2 + k * spacing;
      square(inset, inset, L - inset, L - inset, zz);
      if (spec.holeMm) {
        const c0 = (L - spec.holeMm) / 2 - inset;
        const c1 = (L + spec.holeMm) / 2 + inset;
        square(c0, c0, c1, c1, zz);
      }
    }
    const solid = layer < spec.bottom || layer >= spec.layers - spec.top;
    const every = spec.infillEvery ?? 1;
    // Combined infill: nothing on n − 1 layers, then one layer carrying n layers' worth.
    if (!solid && every > 1 && (layer - spec.bottom + 1) % every !== 0) continue;
    const thick = solid ? 1 : every;
    const lineSpacing = solid ? spacing : spacing / (spec.infillPercent / 100);
    sectionScale = thick;
    const edge = w / 2 + (spec.walls - 1) * spacing + w / 2 + spacing / 2;
    const holeLo = spec.holeMm ? (L - spec.holeMm) / 2 - edge : Infinity;
    const holeHi = spec.holeMm ? (L + spec.holeMm) / 2 + edge : -Infinity;
    for (let t = edge; t <= L - edge + 1e-9; t += lineSpacing) {
      // Alternate the direction per layer (rectilinear); split lines around a hole.
      const runs: [number, number][] = t > holeLo && t < holeHi ? [[edge, holeLo], [holeHi, L - edge]] : [[edge, L - edge]];
      for (const [a, b] of runs) {
        if (layer % 2 === 0) {
          move(a, t, zz, false);
          move(b, t, zz, true);
        } else {
          move(t, a, zz, false);
          move(t, b, zz, true);
        }
      }
    }
  }
}

function measureBox(spec: BoxSpec): MeasuredSettings {
  const a = createToolpathSettingsAnalyzer({ filamentDiameterMm: 1.75 });
  boxSegments(spec, (s) => a.segment(s));
  a.end?.();
  return a.result();
}

describe('settings measured on hand-built toolpaths', () => {
  const cases: BoxSpec[] = [
    { sizeMm: 20, layers: 40, layerMm: 0.2, walls: 2, top: 4, bottom: 4, infillPercent: 15, widthMm: 0.45 },
    { sizeMm: 30, layers: 30, layerMm: 0.3, walls: 3, top: 5, bottom: 3, infillPercent: 25, widthMm: 0.5 },
    { sizeMm: 24, layers: 50, layerMm: 0.12, walls: 4, top: 7, bottom: 6, infillPercent: 40, widthMm: 0.42 },
    { sizeMm: 40, layers: 30, layerMm: 0.2, walls: 2, top: 4, bottom: 4, infillPercent: 20, widthMm: 0.45, holeMm: 12 },
    { sizeMm: 20, layers: 60, layerMm: 0.1, walls: 2, top: 6, bottom: 6, infillPercent: 20, widthMm: 0.45, infillEvery: 2 },
    { sizeMm: 20, layers: 60, layerMm: 0.1, walls: 3, top: 7, bottom: 5, infillPercent: 15, widthMm: 0.45, infillEvery: 3 },
  ];
  for (const spec of cases) {
    it(`${spec.sizeMm} mm box${spec.holeMm ? ' with a hole' : ''}: ${spec.walls} walls, ${spec.top}/${spec.bottom}, ${spec.infillPercent} %${spec.infillEvery ? ` every ${spec.infillEvery} layers` : ''}, ${spec.layerMm} mm`, () => {
      const m = measureBox(spec);
      expect(m.infill_every_layers).toBe(spec.infillEvery ?? 1);
      expect(m.walls.value, m.walls.detail).toBe(spec.walls);
      expect(m.top_layers.value, m.top_layers.detail).toBe(spec.top);
      expect(m.bottom_layers.value, m.bottom_layers.detail).toBe(spec.bottom);
      expect(Math.abs(m.infill_percent.value! - spec.infillPercent), m.infill_percent.detail).toBeLessThanOrEqual(2);
      expect(m.layer_height_mm.value).toBeCloseTo(spec.layerMm, 3);
      expect(m.line_width_mm.value).toBeCloseTo(spec.widthMm, 2);
    });
  }
});

describe('ColumnTracker: solid runs over bottom surfaces and under top surfaces', () => {
  /** Feed one block's states layer by layer ('.' empty, 's' solid, 'p' sparse, 'e' edge). */
  function runs(column: string): { bottom: [number, number][]; top: [number, number][] } {
    const t = new ColumnTracker();
    const code: Record<string, number> = { '.': B_EMPTY, s: B_SOLID, p: B_SPARSE, e: B_EDGE };
    for (const ch of column) {
      t.beginLayer();
      t.set(ColumnTracker.key(0, 0), code[ch]);
      t.endLayer();
    }
    t.finish();
    return { bottom: [...t.bottomRuns], top: [...t.topRuns] };
  }
  it('counts bed-side and top-side stacks, and only those bounded by sparse infill', () => {
    expect(runs('sssspppppssss')).toEqual({ bottom: [[4, 1]], top: [[4, 1]] });
    // A thin plate, solid throughout: neither count is proven.
    expect(runs('ssssssss')).toEqual({ bottom: [], top: [] });
    // Over an overhang (air first, then material), and under a step that leaves the block empty above.
    expect(runs('...sssppppsssss...')).toEqual({ bottom: [[3, 1]], top: [[5, 1]] });
    // A run that touches an edge state proves nothing.
    expect(runs('sssepppsses')).toEqual({ bottom: [], top: [] });
  });
  it('reads short empty gaps between sparse and solid as combined infill', () => {
    expect(runs('ssss.p.p.p.pssss')).toEqual({ bottom: [[4, 1]], top: [[4, 1]] });
    // A long air gap is air: the solid run above it starts a new bottom surface.
    expect(runs('ssssp' + '.'.repeat(12) + 'ssspp')).toEqual({ bottom: [[4, 1], [3, 1]], top: [] });
  });
});

describe('settings analysis on bad or odd input', () => {
  const seg = (over: Partial<Segment>): Segment => ({ x0: 0, y0: 0, z0: 0.2, x1: 10, y1: 0, z1: 0.2, lengthMm: 10, eMm: 0.3, feedMms: 50, extruding: true, feature: null, tool: 0, lineNo: 1, ...over });

  it('no extrusion at all: every figure unknown with a reason', () => {
    const a = createToolpathSettingsAnalyzer({ filamentDiameterMm: 1.75 });
    a.segment(seg({ extruding: false, eMm: 0 }));
    a.end?.();
    const r = a.result();
    for (const k of ['walls', 'top_layers', 'bottom_layers', 'infill_percent', 'layer_height_mm', 'line_width_mm', 'nozzle_mm'] as const) {
      expect(r[k].value, k).toBeNull();
      expect(r[k].detail.length).toBeGreaterThan(5);
    }
    expect(r.layers).toBe(0);
  });

  it('random and absurd moves (NaN, 1e308, negative filament) never throw and keep memory bounded', () => {
    // Deterministic pseudo-random stream (LCG constants from Numerical Recipes).
    let state = 12345;
    const rnd = () => ((state = (state * 1664525 + 1013904223) >>> 0) / 2 ** 32);
    const specials = [Number.NaN, Number.POSITIVE_INFINITY, -1e308, 1e308, 0, -5];
    const a = createToolpathSettingsAnalyzer({ filamentDiameterMm: 1.75 });
    for (let i = 0; i < 20_000; i++) {
      const pick = (v: number) => (rnd() < 0.02 ? specials[Math.floor(rnd() * specials.length)] : v);
      const z = pick(0.2 * (1 + Math.floor(rnd() * 50)));
      a.segment(seg({ x0: pick(rnd() * 200), y0: pick(rnd() * 200), x1: pick(rnd() * 200), y1: pick(rnd() * 200), z0: z, z1: z, eMm: pick(rnd() * 2 - 0.5), extruding: rnd() < 0.8, lineNo: i }));
    }
    expect(() => a.end?.()).not.toThrow();
    const r = a.result();
    expect(r.warnings.length).toBeLessThanOrEqual(21);
    expect(r.warnings.join(' ')).toMatch(/out-of-range coordinates/);
  });

  it('a layer spread over metres in X and Y is skipped with a warning, not rasterised', () => {
    const a = createToolpathSettingsAnalyzer({ filamentDiameterMm: 1.75 });
    for (let i = 0; i < 30; i++) a.segment(seg({ x0: i * 300, x1: i * 300 + 10, y0: i * 300, y1: i * 300, lineNo: i }));
    a.end?.();
    const r = a.result();
    expect(r.warnings.join(' ')).toMatch(/too large to rasterise/);
    expect(r.walls.value).toBeNull();
  });

  it('thin single-line layers and zero-length moves do not crash', () => {
    const a = createToolpathSettingsAnalyzer({ filamentDiameterMm: 1.75 });
    a.segment(seg({ x1: 0, lengthMm: 0 }));
    for (const z of [0.2, 0.4, 0.6]) for (let i = 0; i < 25; i++) a.segment(seg({ x0: i, x1: i + 1, z0: z, z1: z, lengthMm: 1, eMm: 0.03 }));
    a.end?.();
    const r = a.result();
    expect(r.layers).toBe(3);
    expect(r.layer_height_mm.value).toBeCloseTo(0.2, 6);
    expect(r.first_layer_height_mm.value).toBeCloseTo(0.2, 6);
    expect(r.walls.value).toBeNull();
    // A lone short move (a prime blob) is not a layer for the height figures.
    const b = createToolpathSettingsAnalyzer({ filamentDiameterMm: 1.75 });
    b.segment(seg({}));
    b.end?.();
    expect(b.result().layer_height_mm.value).toBeNull();
  });
});
