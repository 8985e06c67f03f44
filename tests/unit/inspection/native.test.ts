/**
 * The native engine (lib/inspection/native/, C++) against the TypeScript engine, its reference:
 * the same report — every field, every number — on all fixtures, on crafted edge cases that reach
 * each parser and planner branch, on seeded mutations of real files, and with every option.
 *
 * Numbers must be identical, except where a transcendental function is involved (arcs use sin,
 * cos and atan2, whose last bit may differ between V8's and the C library's): there a relative
 * difference up to 1e-9 is allowed. The test is skipped where the addon was not built, unless
 * HOTLAP_REQUIRE_NATIVE=1 (set by .ci/run), where a missing build fails it.
 */
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import { gunzipSync } from 'node:zlib';
import { afterEach, describe, expect, it } from 'vitest';
import { inspectFile, inspectionEngine, type InspectOptions } from '../../../lib/inspection/inspect';
import { loadNativeEngine, nativeEngineLoadError } from '../../../lib/inspection/nativeEngine';
import { InspectionError } from '../../../lib/inspection/reader';
import { toJsonReport } from '../../../lib/inspection/report';
import { mulberry32 } from '../../support/prng';
import { inspectBytes, mutateLines } from './engineHelpers';

const FIXTURES = join(__dirname, '../../fixtures/gcode');
const manifest = JSON.parse(readFileSync(join(__dirname, '../../fixtures/manifest.json'), 'utf8')) as { file: string }[];
const built = loadNativeEngine() !== null;
const required = process.env.HOTLAP_REQUIRE_NATIVE === '1';

/** Paths where two values differ; numbers within `rel` (relative) count as equal. */
function differences(a: unknown, b: unknown, rel: number, path = '$', out: string[] = []): string[] {
  if (out.length > 20) return out;
  if (typeof a === 'number' && typeof b === 'number') {
    if (Object.is(a, b)) return out;
    const scale = Math.max(Math.abs(a), Math.abs(b));
    if (!(Number.isFinite(a) && Number.isFinite(b) && Math.abs(a - b) <= rel * scale)) out.push(`${path}: ${a} vs ${b}`);
    return out;
  }
  if (a instanceof Map || a instanceof Set) return differences([...(a as Map<unknown, unknown>)], b instanceof Map || b instanceof Set ? [...(b as Map<unknown, unknown>)] : b, rel, path, out);
  if (Array.isArray(a) && Array.isArray(b)) {
    if (a.length !== b.length) out.push(`${path}: length ${a.length} vs ${b.length}`);
    for (let i = 0; i < Math.min(a.length, b.length); i++) differences(a[i], b[i], rel, `${path}[${i}]`, out);
    return out;
  }
  if (a && b && typeof a === 'object' && typeof b === 'object') {
    const keys = new Set([...Object.keys(a), ...Object.keys(b)]);
    for (const k of keys) {
      const va = (a as Record<string, unknown>)[k];
      const vb = (b as Record<string, unknown>)[k];
      if (!(k in a) || !(k in b)) out.push(`${path}.${k}: ${k in a ? 'only TypeScript' : 'only native'}`);
      else differences(va, vb, rel, `${path}.${k}`, out);
    }
    return out;
  }
  if (a !== b) out.push(`${path}: ${JSON.stringify(a)} vs ${JSON.stringify(b)}`);
  return out;
}

/** Both engines on the same input; the reports (and their JSON) must agree. */
async function sameReport(run: (engine: InspectOptions['engine']) => Promise<unknown>, rel = 0): Promise<'report' | 'typed-error'> {
  const settle = (engine: InspectOptions['engine']) =>
    run(engine).then(
      (r) => ({ ok: true as const, r }),
      (e: unknown) => ({ ok: false as const, e }),
    );
  const [ts, nat] = await Promise.all([settle('typescript'), settle('native')]);
  if (!ts.ok || !nat.ok) {
    // Unreadable input is refused by the shared reader, so both must fail the same way.
    const msg = (x: typeof ts) => (x.ok ? 'a report' : x.e instanceof InspectionError ? `${x.e.code}: ${x.e.message}` : String(x.e));
    expect(msg(nat)).toBe(msg(ts));
    if (!ts.ok && !(ts.e instanceof InspectionError)) throw ts.e;
    return 'typed-error';
  }
  expect(differences(ts.r, nat.r, rel)).toEqual([]);
  expect(differences(toJsonReport(ts.r as never), toJsonReport(nat.r as never), rel)).toEqual([]);
  return 'report';
}

/** Crafted files: each exercises branches the slicer fixtures do not. */
const CRAFTED: Record<string, string> = {
  arcs: 'G21\nG90\nM82\nG92 E0\nG1 Z0.2 F600\nG1 X10 Y10 F3000\nG2 X20 Y10 I5 J0 E1.5 F1800\nG3 X10 Y10 I-5 J0 E3\nG2 X15 Y15 R5 E3.5\nG3 X10 Y10 R-5 E4\nG2 X10 Y10 I3 J3 E6\ng3 x12 y12 r0.0001 e6.1\nG2 X30 Y30 I1e9 J0 E7\n',
  units_modes:
    'G20\nG91\nM83\nG1 Z0.01 F60\nG1 X1 Y0.5 E0.05 F120\nG21\nG90\nG92 X0 Y0 Z0.3\nG1 X5 E0.2\nG91\nG1 X-2 Y3 E0.1\nG90\nG28\nG28 X Y\nG1 X50 Y50 Z0.3 F9000\nM82\nG92 E0\nG1 X60 E1\nG92 E10\nG1 X70 E12\n',
  retraction:
    'M207 S1.5 F1800\nM83\nG1 Z0.2 F600\nG1 X0 Y0\nG1 X10 E1 F1200\nG10\nG1 X20 Y20 F9000\nG11\nG1 X30 E1 F1200\nG10\nG10\nG11\nG11\nG1 E-0.8 F2400\nG1 E0.8\nG1 X40 E1\n',
  checksums:
    'N1 G28*18\nN2 G1 Z0.2 F600*99\nN3 M110 N0*0\nN4 G1 X10 Y10 E1 F1200*12\nN5 G1 X20 E2*7\nG1 X30 E3 *\nN-1 G1 X40 E4\nn7 g1 x50 e5*123\n',
  limits:
    'M201 X5000 Y4000 Z100 E10000\nM203 X500 Y400 Z12 E80\nM204 P2500 T4000 R1500\nM205 X8 Y8 Z0.4 E4.5\nM83\nG1 Z0.2 F600\nG1 X10 Y0 E0.5 F6000\nG1 X10 Y10 E0.5\nG1 X0 Y10 E0.5\nM204 S1000\nM205 J0.02\nG1 X0 Y0 E0.5\nSET_VELOCITY_LIMIT VELOCITY=300 ACCEL=7000 SQUARE_CORNER_VELOCITY=5 MINIMUM_CRUISE_RATIO=0.4 ACCEL_TO_DECEL=3500\nG1 X10 Y0 E0.5\nG1 X10 Y10 E0.5\nset_velocity_limit accel=0\nM220 S150\nG1 X0 Y10 E0.5\nM221 S90\nG1 X0 Y0 E0.5\nM220 S100\nM221 S100\nG4 P500\nG4 S2\nG4\n',
  temps_tools:
    'M104 S215\nM140 S60\nM190 S60\nM109 S220 T0\nM106 S128\nM106 P1 S255\nM107\nT1\nM83\nG1 Z0.2 F600\nG1 X10 E1 F1200\nT0\nG1 X20 E1\nT99\nT-1\nM117 Printing G1 X999 E999\nM118 echo G1\nM23 file.gcode\nG1 X30 E1\n',
  bad_numbers:
    'M83\nG1 Z0.2 F600\nG1 X1.2.3 Y4 E0.1 F1200\nG1 X1e Y5 E0.1\nG1 X- Y6 E0.1\nG1 X+. Y7 E0.1\nG1 X1e308 Y8 E0.1\nG1 X9 Y9 E1e308\nG1 F-5 X10\nG1 F0 X11\nG1 F1e-300 X12\nG1 X13 E-1e9\nG1 XNaN E0.1\nG1 X14 Y14 E0.1 F1e12\nG123\nM9999\nQ77\nFOO_BAR X=1\n*\nG1 X15 (inline comment) E0.1 ; tail\n(only a comment)\n;only a comment\n\n\t \n',
  labels:
    ';TYPE:External perimeter\nM83\nG1 Z0.2 F600\nG1 X10 E0.5 F1200\n;TYPE:Perimeter\nG1 X20 E0.5\n;TYPE:Internal infill\nG1 X30 E0.5\n;TYPE:WALL-OUTER\nG1 X40 E0.5\n;TYPE:SKIN\nG1 X50 E0.5\n;FEATURE: Outer wall\nG1 X60 E0.5\n;FEATURE: Sparse infill\nG1 X70 E0.5\n;TYPE:Custom\nG1 X80 E0.5\n;TYPE:Skirt/Brim\nG1 X90 E0.5\n;TYPE:support-interface\nG1 X100 E0.5\n;TYPE:something new\nG1 X110 E0.5\nG1 X120 E0.5 ; perimeter\nG1 X130 E0.5 ; infill\n;LAYER_CHANGE\n;Z:0.4\nG1 Z0.4\nG1 X10 E0.5\n',
  vase_and_objects:
    'M83\nG1 Z0.2 F600\nG1 X0 Y0 F9000\nG1 X10 Y0 E0.4 F1200\nG1 X10 Y10 E0.4\nG1 X0 Y10 E0.4\nG1 X0 Y0 E0.4\nG1 X100 Y100 F9000\nG1 X110 Y100 E0.4 F1200\nG1 X110 Y110 E0.4\nG1 X100 Y110 E0.4\nG1 X100 Y100 E0.4\nG1 X100 Y100 Z0.25 E0.1\nG1 X110 Y100 Z0.3 E0.4\nG1 X110 Y110 Z0.35 E0.4\nG1 X100 Y110 Z0.4 E0.4\nG1 X100 Y100 Z0.45 E0.4\nG1 Z10\nG1 E-2\nG1 Z0 E2\n',
  no_extrusion: 'G28\nG1 X10 Y10 F3000\nG1 X20 Y20\nM84\n',
  comments_only: '; generated by a hand\n; fill_density = 20%\n; perimeters = 3\n;FLAVOR:Marlin\n;Layer height: 0.2\n(parenthesised)\n',
  crlf_cr: 'M83\r\nG1 Z0.2 F600\r\nG1 X10 E1 F1200\rG1 X20 E1\rG1 X30 E1\r\n\r\nG1 X40 E1',
  long_line: `M83\nG1 Z0.2 F600\nG1 X10 E1 F1200\n;${'x'.repeat(70 * 1024)}\nG1 X20 E1\nG1 X30 ${'Y1 '.repeat(30000)}E1\nG1 X40 E1\n`,
};

describe.skipIf(!built && !required)('native engine = TypeScript engine', () => {
  it('is built (required here)', () => {
    expect(nativeEngineLoadError()).toBeNull();
  });

  for (const f of manifest) {
    it(`fixture ${f.file}`, async () => {
      const path = join(join(FIXTURES, '..'), f.file);
      expect(await sameReport((engine) => inspectFile(path, { engine }))).toBe('report');
    });
  }

  it('with options: other filament, material, limits, parser options, no toolpath analysis', async () => {
    const path = join(FIXTURES, 'prusa-beacon-020.gcode.gz');
    const options: InspectOptions = {
      filamentDiameterMm: 2.85,
      material: 'petg',
      limits: { accelPrintMms2: 1200, accelTravelMms2: 5000, jerkXMms: 10, jerkYMms: 10, maxFeedXMms: 300 },
      parser: { verifyChecksums: false, arcToleranceMm: 0.05, firmwareRetractMm: 2, firmwareRetractFeedMms: 40, maxWarnings: 3 },
    };
    expect(await sameReport((engine) => inspectFile(path, { ...options, engine }))).toBe('report');
    expect(await sameReport((engine) => inspectFile(path, { skipToolpathSettings: true, engine }))).toBe('report');
  });

  for (const [name, text] of Object.entries(CRAFTED)) {
    it(`crafted: ${name}, whole and in small chunks`, async () => {
      for (const chunk of [1 << 20, 7, 1]) {
        if (chunk === 1 && text.length > 5000) continue;
        expect(await sameReport((engine) => inspectBytes(text, { engine, skipToolpathSettings: false }, chunk), 1e-9)).toBe('report');
      }
    });
  }

  it('60 seeded mutations of real files (bytes, tokens, CR/LF, chunk borders)', async () => {
    const rnd = mulberry32(20261202);
    const sources = ['prusa-cube20-relative-e.gcode.gz', 'cura-beacon-020.gcode.gz', 'slic3r-cylinder-025.gcode.gz'].map((f) =>
      gunzipSync(readFileSync(join(FIXTURES, f))).toString('latin1').split('\n'),
    );
    const outcomes = { report: 0, 'typed-error': 0 };
    for (let c = 0; c < 60; c++) {
      const lines = mutateLines(rnd, sources[c % sources.length], 200 + Math.floor(rnd() * 3000));
      const bytes = Buffer.from(lines.join(rnd() < 0.2 ? '\r\n' : '\n'), 'latin1');
      // A few byte-level flips as well, anywhere.
      for (let k = Math.floor(rnd() * 4); k > 0; k--) bytes[Math.floor(rnd() * bytes.length)] = Math.floor(rnd() * 256);
      outcomes[await sameReport((engine) => inspectBytes(bytes, { engine, skipToolpathSettings: false }, 1 + Math.floor(rnd() * 70000)), 1e-9)]++;
    }
    expect(outcomes.report).toBeGreaterThan(40);
  });
});

describe('engine choice', () => {
  const saved = process.env.HOTLAP_ENGINE;
  afterEach(() => {
    if (saved === undefined) delete process.env.HOTLAP_ENGINE;
    else process.env.HOTLAP_ENGINE = saved;
  });

  it("HOTLAP_ENGINE=ts overrides 'auto', given or by default, but not an explicit engine", () => {
    process.env.HOTLAP_ENGINE = 'ts';
    expect(inspectionEngine()).toBe('typescript');
    expect(inspectionEngine({ engine: 'auto' })).toBe('typescript');
    if (built) expect(inspectionEngine({ engine: 'native' })).toBe('native');
  });

  it('extra sinks need the TypeScript engine', () => {
    delete process.env.HOTLAP_ENGINE;
    const sink = { segment() {} };
    expect(inspectionEngine({ sinks: [sink] })).toBe('typescript');
    expect(() => inspectionEngine({ engine: 'native', sinks: [sink] })).toThrow(/no extra sinks/);
  });
});
