/** Reader and engine on bad input: clear reasons or warnings, never a crash, a hang or unbounded memory. */
import { mkdtempSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { gzipSync } from 'node:zlib';
import { describe, expect, it } from 'vitest';
import { inspectFile } from '../../../lib/inspection/inspect';
import { MAX_LINE_BYTES } from '../../../lib/inspection/engineConstants';
import { InspectionError, LineSplitter } from '../../../lib/inspection/reader';
import { inspectBytes } from './engineHelpers';

const dir = mkdtempSync(join(tmpdir(), 'hotlap-bad-'));
const file = (name: string, data: Buffer | string) => {
  const p = join(dir, name);
  writeFileSync(p, data);
  return p;
};
const SAMPLE = 'G21\nG90\nM83\nG1 Z0.2 F600\nG1 X10 Y0 E0.5 F1200\nG1 X10 Y10 E0.5\n';

async function rejectsWith(p: Promise<unknown>, code: string, text: RegExp): Promise<void> {
  const err = await p.then(
    () => null,
    (e: unknown) => e,
  );
  expect(err).toBeInstanceOf(InspectionError);
  expect((err as InspectionError).code).toBe(code);
  expect((err as InspectionError).message).toMatch(text);
}

describe('files the engine cannot read', () => {
  it('missing file', async () => {
    await rejectsWith(inspectFile(join(dir, 'nope.gcode')), 'not-found', /not found/i);
  });

  it('empty file, also when compressed', async () => {
    await rejectsWith(inspectFile(file('empty.gcode', '')), 'empty', /empty/);
    await rejectsWith(inspectFile(file('empty.gcode.gz', gzipSync(Buffer.alloc(0)))), 'empty', /empty/);
  });

  it('binary G-code says it is unsupported and how to export text', async () => {
    const bgcode = Buffer.concat([Buffer.from('GCDE'), Buffer.from([1, 0, 0, 0, 0, 0, 0, 0, 0, 0])]);
    await rejectsWith(inspectFile(file('part.bgcode', bgcode)), 'binary-gcode', /binary G-code.*not supported.*plain-text/i);
    // …also inside gzip
    await rejectsWith(inspectFile(file('part.bgcode.gz', gzipSync(bgcode))), 'binary-gcode', /turn off binary G-code/);
  });

  it('a large gzipped binary file stops at the first chunk instead of hanging', async () => {
    const big = Buffer.alloc(8 * 1024 * 1024);
    big.write('GCDE');
    for (let i = 4; i < big.length; i += 4096) big[i] = i & 0xff;
    await rejectsWith(inspectFile(file('big.bgcode.gz', gzipSync(big))), 'binary-gcode', /binary G-code/);
  });

  it('binary junk', async () => {
    const junk = Buffer.alloc(5000);
    for (let i = 0; i < junk.length; i++) junk[i] = (i * 7919) & 0xff;
    await rejectsWith(inspectFile(file('junk.gcode', junk)), 'binary', /binary, not G-code text/);
  });

  it('truncated gzip', async () => {
    const big = Buffer.from(SAMPLE.repeat(5000));
    const gz = gzipSync(big);
    await rejectsWith(inspectFile(file('cut.gcode.gz', gz.subarray(0, Math.floor(gz.length / 2)))), 'truncated-gzip', /ends early/);
  });
});

describe('input the engine copes with', () => {
  it('gzip is recognised by its magic bytes, not the name', async () => {
    const a = await inspectFile(file('plain.gcode.gz', SAMPLE));
    const b = await inspectFile(file('packed.gcode', gzipSync(SAMPLE)));
    expect(a.file.gzip).toBe(false);
    expect(b.file.gzip).toBe(true);
    expect(b.filament.totalLengthMm).toBeCloseTo(a.filament.totalLengthMm, 12);
  });

  it('a 100 KB line is cut with a warning and the next line still counts', async () => {
    const r = await inspectBytes(`G1 X1 F600 ;${'x'.repeat(100 * 1024)}\nM83\nG1 X5 E1\n`, {}, 4096);
    expect(r.commands.longLines).toBe(1);
    expect(r.warnings.map((w) => w.code)).toContain('long-line');
    expect(r.filament.totalLengthMm).toBe(1);
  });

  it('the line splitter keeps at most 64 KB of a line whatever the chunking', () => {
    const lines: number[] = [];
    const s = new LineSplitter({ line: (_b, a, e) => lines.push(e - a) });
    const huge = Buffer.alloc(300 * 1024, 0x41);
    for (let i = 0; i < huge.length; i += 1000) s.push(huge.subarray(i, i + 1000));
    s.push(Buffer.from('\nG1\r\n'));
    s.end();
    expect(lines).toEqual([MAX_LINE_BYTES, 3]);
  });

  it('CRLF split across chunks, and CR-only files, give the same moves', async () => {
    const lf = await inspectBytes(SAMPLE);
    const crlf = await inspectBytes(SAMPLE.replace(/\n/g, '\r\n'), {}, 7);
    const cr = await inspectBytes(SAMPLE.replace(/\n/g, '\r'), {}, 5);
    for (const r of [crlf, cr]) {
      expect(r.filament.totalLengthMm).toBe(lf.filament.totalLengthMm);
      expect(r.motion.moves).toBe(lf.motion.moves);
      expect(r.file.lines).toBe(lf.file.lines);
    }
  });

  it('a file with no extrusion gets a blocking warning, not a crash', async () => {
    const r = await inspectBytes('G28\nG1 X10 Y10 F3000\nG1 X0\n');
    expect(r.warnings.find((w) => w.code === 'no_extrusion')?.severity).toBe('blocking');
    expect(r.flow.peakMm3s).toBeNull();
    expect(r.layers.count).toBe(0);
    expect(r.sizeMm).toBeNull();
    expect(r.objects).toBe(0);
  });

  it('malformed numbers, unknown commands and absurd values become warnings in the report', async () => {
    const r = await inspectBytes('G1 X1.2.3 F600\nM9999\nFOO_BAR X=1\nG1 F-5 X2\nG1 X1e308\nG1 E1e309\n');
    const codes = r.warnings.map((w) => w.code);
    expect(codes).toEqual(expect.arrayContaining(['malformed-number', 'absurd-value', 'unknown_commands']));
    expect(r.commands.unknown).toEqual({ M9999: 1, FOO_BAR: 1 });
  });

  it('a text file that is not G-code gives an empty report with reasons, not an error', async () => {
    const r = await inspectBytes('Hello, this is a shopping list.\nEggs\nMilk\n');
    expect(r.motion.moves).toBe(0);
    expect(r.warnings.some((w) => w.code === 'no_extrusion')).toBe(true);
  });
});
