/**
 * The environment-neutral core (engine.ts): the push API gives the same report as the Node file
 * reader whatever the chunk sizes, and nothing it imports touches a node:* module, so the same
 * code runs in a browser Web Worker.
 */
import { readFileSync } from 'node:fs';
import { dirname, join, resolve } from 'node:path';
import { gunzipSync } from 'node:zlib';
import { describe, expect, it } from 'vitest';
import { createInspector, inspectFile } from '../../../lib/inspection/inspect';
import { toJsonReport } from '../../../lib/inspection/report';
import { InspectionReportSchema, parseInspectionReport, ReportContractError } from '../../../lib/inspection/contract';
import { readdirSync } from 'node:fs';
import { InspectionError } from '../../../lib/inspection/lines';
import { mulberry32 } from '../../support/prng';

const FIXTURES = join(__dirname, '../../fixtures/gcode');
const ENGINE_DIR = join(__dirname, '../../../lib/inspection');

/** Every module engine.ts reaches through relative imports (type-only imports included: harmless). */
function importGraph(entry: string): Map<string, string[]> {
  const seen = new Map<string, string[]>();
  const visit = (file: string) => {
    if (seen.has(file)) return;
    const src = readFileSync(file, 'utf8');
    const specs = [...src.matchAll(/^(?:import|export)[^'"]*?from\s+'([^']+)'/gm)].map((m) => m[1]);
    seen.set(file, specs);
    for (const s of specs) if (s.startsWith('.')) visit(resolve(dirname(file), `${s}.ts`));
  };
  visit(entry);
  return seen;
}

describe('createInspector (push API)', () => {
  it('imports no node:* module anywhere below engine.ts (it must bundle for a Web Worker)', () => {
    const graph = importGraph(join(ENGINE_DIR, 'engine.ts'));
    expect(graph.size).toBeGreaterThan(8);
    for (const [file, specs] of graph) {
      for (const s of specs) {
        expect(s.startsWith('node:') || ['fs', 'path', 'zlib', 'stream', 'os'].includes(s), `${file} imports ${s}`).toBe(false);
        if (!s.startsWith('.')) expect(['zod'], `${file} imports ${s}`).toContain(s);
      }
    }
  });

  it.each(['prusa-beacon-020', 'cura-beacon-020', 'slic3r-cylinder-025'])('%s: random chunk sizes give the report inspectFile gives', async (name) => {
    const file = join(FIXTURES, `${name}.gcode.gz`);
    const gz = readFileSync(file);
    const text = gunzipSync(gz);
    const expected = await inspectFile(file);
    const rnd = mulberry32(name.length * 7919);
    const inspector = createInspector({ name: `${name}.gcode.gz` });
    for (let at = 0; at < text.length; ) {
      // 1 byte to 200 KB: lines split at every kind of place, CRLF pairs included.
      const n = 1 + Math.floor(rnd() * rnd() * 200_000);
      inspector.push(new Uint8Array(text.buffer, text.byteOffset + at, Math.min(n, text.length - at)));
      at += n;
    }
    expect(inspector.bytes).toBe(text.length);
    const report = inspector.end({ bytesIn: gz.length, gzip: true });
    expect(report).toEqual(toJsonReport(expected));
  });

  it('refuses binary input on the first push and an empty input at end, with the engine error type', () => {
    const a = createInspector();
    expect(() => a.push(new Uint8Array([0x47, 0x43, 0x44, 0x45, 1, 0, 0, 0]))).toThrow(InspectionError);
    const b = createInspector();
    expect(() => b.end()).toThrow(/empty/);
    const c = createInspector();
    c.push(new TextEncoder().encode('G1 X1 E1\n'));
    c.end();
    expect(() => c.end()).toThrow(/has ended/);
  });
});

describe('the report contract (InspectionReportSchema)', () => {
  const files = readdirSync(FIXTURES).filter((f) => f.endsWith('.gcode.gz'));

  it.each(files)('%s: the report with rules and claims matches the schema exactly (no unknown keys)', async (f) => {
    const r = await inspectFile(join(FIXTURES, f), {
      rules: [{ metric: 'walls', comparator: 'gte', value: 2, severity: 'blocking' }],
      claims: { claimedTimeMs: 600_000 },
    });
    const json = JSON.parse(JSON.stringify(toJsonReport(r)));
    const parsed = InspectionReportSchema.strict().safeParse(json);
    expect(parsed.error?.issues ?? []).toEqual([]);
    expect(parseInspectionReport(json)).toEqual(json);
  });

  it('refuses a report of another shape with a sentence naming the field', () => {
    expect(() => parseInspectionReport({ time: { estimatedS: 1 } })).toThrow(ReportContractError);
    expect(() => parseInspectionReport({ time: { estimatedS: 1 } })).toThrow(/does not match the report contract \(file:/);
  });
});
