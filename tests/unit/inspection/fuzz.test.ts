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
import { inspectBytes, mutateLines, numbersIn } from './engineHelpers';

const fixture = gunzipSync(readFileSync(join(__dirname, '../../fixtures/gcode/prusa-cube20-relative-e.gcode.gz'))).toString('latin1');
const fixtureLines = fixture.split('\n');

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
      const lines = mutateLines(rnd, fixtureLines, 400);
      expect(await runCase(Buffer.from(lines.join(rnd() < 0.2 ? '\r\n' : '\n'), 'latin1'))).toBe('report');
    }
  });
});
