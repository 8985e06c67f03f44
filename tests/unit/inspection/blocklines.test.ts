/**
 * The parser reads runs of complete lines at once (GcodeParser.lines, finding line breaks itself);
 * it must see exactly what it sees line by line through LineSplitter: the same moves, dwells,
 * comments, statistics and warnings in the same order, on real slicer output, on crafted edge
 * cases (CRLF, lone CR, long lines, checksums, free-text M-codes, text commands) and on mutated
 * files, whatever the chunk sizes.
 */
import { readdirSync, readFileSync } from 'node:fs';
import { join } from 'node:path';
import { gunzipSync } from 'node:zlib';
import { describe, expect, it } from 'vitest';
import { GcodeParser, MachineState } from '../../../lib/inspection/parser';
import { MAX_LINE_BYTES } from '../../../lib/inspection/engineConstants';
import { LineSplitter } from '../../../lib/inspection/reader';
import { mulberry32 } from '../../support/prng';

const GCODE = join(__dirname, '../../fixtures/gcode');

/** Everything a parser hands out or keeps, as plain data. */
function run(input: Buffer, chunkSizes: number[], blocks: boolean) {
  const events: unknown[] = [];
  const machine = new MachineState();
  const parser = new GcodeParser(
    {
      segment: (s) => events.push({ ...s }),
      comment: (text, lineNo) => events.push({ comment: text, lineNo }),
      dwell: (t, lineNo) => events.push({ dwell: t, lineNo }),
    },
    { maxWarnings: 40 },
    machine,
  );
  // Without blocks, the splitter sees a sink with line() and longLine() only.
  const sink = blocks ? parser : { line: (b: Buffer, s: number, e: number) => parser.line(b, s, e), longLine: (n: number) => parser.longLine(n) };
  const splitter = new LineSplitter(sink);
  let pos = 0;
  for (let k = 0; pos < input.length; k++) {
    const size = chunkSizes[k % chunkSizes.length];
    // Copy each chunk: the splitter may keep no reference to a chunk it has been handed.
    splitter.push(Buffer.from(input.subarray(pos, pos + size)));
    pos += size;
  }
  splitter.end();
  parser.end();
  const stats = { ...parser.stats, unknownCommands: [...parser.stats.unknownCommands], toolsUsed: [...parser.stats.toolsUsed] };
  return { events, stats, warnings: parser.warnings, splitterLines: splitter.lines, machine: { ...machine, setBy: [...machine.setBy] } };
}

function expectSame(input: Buffer, chunkSizes: number[]) {
  const a = run(input, chunkSizes, false);
  const b = run(input, chunkSizes, true);
  expect(b.stats).toEqual(a.stats);
  expect(b.warnings).toEqual(a.warnings);
  expect(b.splitterLines).toBe(a.splitterLines);
  expect(b.machine).toEqual(a.machine);
  expect(b.events.length).toBe(a.events.length);
  expect(b.events).toEqual(a.events);
}

const long = (n: number, fill: string) => fill.repeat(Math.ceil(n / fill.length)).slice(0, n);

const CRAFTED: Record<string, string> = {
  crlf: 'G21\r\nG90\r\nM83\r\nG1 X1 Y1 E0.1 F600\r\nG1 X2 ; comment\r\n;TYPE:External perimeter\r\nG1 X3 E0.2\r\n',
  'lone CR': 'G21\rG90\rM83\rG1 X1 Y1 E0.1 F600\rG1 X2\r;TYPE:Perimeter\rG1 X3 E0.2\r',
  'mixed breaks': 'M83\nG1 X1 E1 F600\r\nG1 X2 E1\rG1 X3 E1\n\n\r\nG1 X4 E1',
  'no final break': 'M83\nG1 X1 E1 F600\nG1 X2 E1',
  checksums: 'N1 G21*19\nN2 G90*20\nN3 M83*9\nN4 G1 X5 E1 F600*99\nN5 G1 X6 E1*\n',
  'free text': 'M117 Printing; 50% done\nM117 text\rG1 X9 E1 F600\nM118 X5 E9\nG1 X10 E1\n',
  'text commands': 'SET_VELOCITY_LIMIT ACCEL=2500 SQUARE_CORNER_VELOCITY=6\nSET_RETRACTION RETRACT_LENGTH=0.8\nM83\nG10\nG1 X5 E1 F900\nG11\nEXCLUDE_OBJECT_START NAME=a\n',
  'bad words': 'M83\nG1 X1.2.3 Y5 F600\nG1 X--5 Y6 ~ E1\nG1 Xabc Y7 E1\nG1 X1e308 E1\nG1 X10E5\n(paren comment) G1 X4 E1 (unclosed\n',
  arcs: 'G21\nG90\nM83\nG1 X10 Y0 F1200\nG2 X0 Y10 I-10 J0 E2\nG3 X10 Y0 R10 E1\nG4 P200\nG4 S1\n',
  [`line of exactly ${MAX_LINE_BYTES} bytes`]: `M83\nG1 X1 E1 F600\n;${long(MAX_LINE_BYTES - 1, 'abc ')}\nG1 X2 E1\n`,
  [`line of ${MAX_LINE_BYTES + 1} bytes`]: `M83\nG1 X1 E1 F600\n;${long(MAX_LINE_BYTES, 'abc ')}\nG1 X2 E1\n`,
  'long move line': `M83\nG1 X1 E1 F600 ${long(200_000, 'Y2 ')}\nG1 X3 E1\n`,
  'long junk lines': `M83\n${long(150_000, '~!')}\n${long(70_000, 'Q')}\r\nG1 X3 E1 F600\n${long(66_000, '#')}`,
};

describe('block line reading', () => {
  for (const [name, text] of Object.entries(CRAFTED)) {
    it(`matches line-by-line reading: ${name}`, () => {
      const input = Buffer.from(text, 'latin1');
      for (const sizes of [[1 << 20], [7], [3, 64, 1], [65_536, 65_537], [100_001]]) expectSame(input, sizes);
    });
  }

  const fixtures = readdirSync(GCODE).filter((f) => f.endsWith('.gcode.gz'));
  it(`matches line-by-line reading on all ${fixtures.length} slicer fixtures`, { timeout: 120_000 }, () => {
    for (const f of fixtures) {
      const input = gunzipSync(readFileSync(join(GCODE, f)));
      expectSame(input, [1 << 20]);
      expectSame(input, [4093, 70_001]);
    }
  });

  it('matches line-by-line reading on 60 mutated files', { timeout: 120_000 }, () => {
    const base = gunzipSync(readFileSync(join(GCODE, 'prusa-beacon-020.gcode.gz'))).subarray(0, 300_000);
    const rnd = mulberry32(20261202);
    const alphabet = Buffer.from('\n\r\r\n;()*NGMXYZEF-+.e 0123456789~\t', 'latin1');
    for (let k = 0; k < 60; k++) {
      const b = Buffer.from(base);
      for (let m = 0; m < 200; m++) b[Math.floor(rnd() * b.length)] = alphabet[Math.floor(rnd() * alphabet.length)];
      // Now and then a long run without line breaks.
      if (k % 5 === 0) b.fill(0x41 + (k % 20), 1000 + k * 997, 1000 + k * 997 + 70_000);
      expectSame(b, [1 << 20]);
      expectSame(b, [1 + Math.floor(rnd() * 50_000)]);
    }
  });
});
