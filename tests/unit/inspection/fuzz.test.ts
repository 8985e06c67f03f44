/**
 * Fuzzing the reader, parser and measurements with a seeded PRNG: random bytes and randomly
 * mutated lines of a real fixture. Each case must either produce a report without NaN or Infinity
 * anywhere, or fail with the typed InspectionError — never any other exception.
 */
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import { gunzipSync, gzipSync } from 'node:zlib';
import { describe, expect, it } from 'vitest';
import { InspectionError } from '../../../lib/inspection/reader';
import { toJsonReport } from '../../../lib/inspection/report';
import { mulberry32 } from '../../support/prng';
import { inspectBytes, numbersIn } from './engineHelpers';

const fixture = gunzipSync(readFileSync(join(__dirname, '../../fixtures/gcode/prusa-cube20-relative-e.gcode.gz'))).toString('latin1');
const fixtureLines = fixture.split('\n');

/** Tokens that poke at the parser's edges. */
const NASTY = [
  'G2', 'G3', 'R0', 'R-0.0001', 'I0 J0', 'I1e9', 'X1e308', 'E-1e9', 'F0', 'F-1', 'F1e-300', 'NaN', 'Infinity', '*', '*999',
  '(', ')', ';', 'N', 'N-1', 'G20', 'G91', 'G92', 'G92 E1e12', 'G28', 'G10', 'G11', 'M207 S1e9', 'M220 S0', 'M220 S1e9',
  'M221 S0.0001', 'M204 S0', 'M205 J0', 'M203 X0', 'T99', 'T-1', 'G4 P1e12', 'SET_VELOCITY_LIMIT ACCEL=0', '\r', '\t', 'x', '.', '-', '--', '1.2.3',
];

async function runCase(bytes: Buffer): Promise<'report' | 'typed-error'> {
  try {
    const r = await inspectBytes(bytes, {}, 1 + (bytes.length % 4096));
    const bad = [...numbersIn(r), ...numbersIn(toJsonReport(r))].filter((n) => !Number.isFinite(n.value));
    expect(bad).toEqual([]);
    return 'report';
  } catch (err) {
    if (err instanceof InspectionError) return 'typed-error';
    throw err;
  }
}

describe('fuzz', () => {
  it('200 random byte strings (seeded) never crash', async () => {
    const rnd = mulberry32(20261201);
    const outcomes = { report: 0, 'typed-error': 0 };
    for (let c = 0; c < 200; c++) {
      const n = Math.floor(rnd() * 3000);
      const b = Buffer.alloc(n);
      // Half the cases are printable-ish so they get past the binary check into the parser.
      const printable = c % 2 === 0;
      for (let i = 0; i < n; i++) b[i] = printable ? 32 + Math.floor(rnd() * 95) || 10 : Math.floor(rnd() * 256);
      if (printable) for (let i = 0; i < n; i += 1 + Math.floor(rnd() * 40)) b[i] = 10;
      outcomes[await runCase(c % 10 === 9 ? gzipSync(b).subarray(0, Math.floor(rnd() * (n + 20))) : b)]++;
    }
    expect(outcomes.report).toBeGreaterThan(50);
    expect(outcomes['typed-error']).toBeGreaterThan(10);
  });

  it('300 mutated fixture slices (seeded) never crash and never give NaN', async () => {
    const rnd = mulberry32(42);
    for (let c = 0; c < 300; c++) {
      const start = Math.floor(rnd() * (fixtureLines.length - 400));
      const lines = fixtureLines.slice(start, start + 50 + Math.floor(rnd() * 350));
      const edits = 1 + Math.floor(rnd() * 20);
      for (let k = 0; k < edits; k++) {
        const li = Math.floor(rnd() * lines.length);
        const line = lines[li];
        const pos = Math.floor(rnd() * (line.length + 1));
        const op = Math.floor(rnd() * 4);
        const token = NASTY[Math.floor(rnd() * NASTY.length)];
        if (op === 0) lines[li] = line.slice(0, pos) + token + line.slice(pos);
        else if (op === 1) lines[li] = line.slice(0, pos) + line.slice(pos + 1 + Math.floor(rnd() * 5));
        else if (op === 2) lines[li] = `${token} ${line}`;
        else lines.splice(li, 0, `${token}${Math.floor(rnd() * 1e6) / 100}`);
      }
      expect(await runCase(Buffer.from(lines.join(rnd() < 0.2 ? '\r\n' : '\n'), 'latin1'))).toBe('report');
    }
  });
});
