/** Shared helpers for the engine tests: run G-code text through the parser or the whole inspection. */
import { Readable } from 'node:stream';
import { GcodeParser, MachineState, type ParserOptions } from '../../../lib/inspection/parser';
import { inspectStream, type InspectOptions } from '../../../lib/inspection/inspect';
import type { InspectionReport } from '../../../lib/inspection/report';
import type { Segment } from '../../../lib/inspection/types';

export interface Parsed {
  segments: Segment[];
  dwellsS: number[];
  parser: GcodeParser;
  machine: MachineState;
}

/** Parses G-code text line by line (LF) and copies every segment. */
export function parse(text: string, options: ParserOptions = {}): Parsed {
  const segments: Segment[] = [];
  const dwellsS: number[] = [];
  const machine = new MachineState();
  const parser = new GcodeParser(
    {
      segment: (s) => segments.push({ ...s }),
      dwell: (t) => dwellsS.push(t),
    },
    options,
    machine,
  );
  const buf = Buffer.from(text, 'latin1');
  let start = 0;
  for (;;) {
    const lf = buf.indexOf(10, start);
    if (lf < 0) {
      if (start < buf.length) parser.line(buf, start, buf.length);
      break;
    }
    parser.line(buf, start, lf);
    start = lf + 1;
  }
  parser.end();
  return { segments, dwellsS, parser, machine };
}

export function sum(xs: number[]): number {
  return xs.reduce((a, b) => a + b, 0);
}

/** Inspects in-memory bytes through the streaming reader (chunkSize splits the input to test chunk borders). */
export function inspectBytes(bytes: Buffer | string, options: InspectOptions = {}, chunkSize = 64 * 1024): Promise<InspectionReport> {
  const buf = typeof bytes === 'string' ? Buffer.from(bytes, 'latin1') : bytes;
  const chunks: Buffer[] = [];
  for (let i = 0; i < buf.length; i += chunkSize) chunks.push(buf.subarray(i, i + chunkSize));
  return inspectStream(Readable.from(chunks), { skipToolpathSettings: true, ...options });
}

/** Every number reachable in a value, with its path (for NaN / Infinity checks). */
export function numbersIn(value: unknown, path = '$', out: { path: string; value: number }[] = []): { path: string; value: number }[] {
  if (typeof value === 'number') out.push({ path, value });
  else if (Array.isArray(value)) value.forEach((v, i) => numbersIn(v, `${path}[${i}]`, out));
  else if (value && typeof value === 'object') for (const [k, v] of Object.entries(value)) numbersIn(v, `${path}.${k}`, out);
  return out;
}
