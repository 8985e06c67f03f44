/** Shared helpers for the engine tests: run G-code text through the parser or the whole inspection. */
import { Readable } from 'node:stream';
import { GcodeParser, MachineState, type ParserOptions } from '../../../lib/inspection/parser';
import { inspectStream, type InspectOptions } from '../../../lib/inspection/inspect';
import type { EngineReport } from '../../../lib/inspection/report';
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
export function inspectBytes(bytes: Buffer | string, options: InspectOptions = {}, chunkSize = 64 * 1024): Promise<EngineReport> {
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

/** Tokens that poke at the parser's edges. */
const NASTY = [
  'G2', 'G3', 'R0', 'R-0.0001', 'I0 J0', 'I1e9', 'X1e308', 'E-1e9', 'F0', 'F-1', 'F1e-300', 'NaN', 'Infinity', '*', '*999',
  '(', ')', ';', 'N', 'N-1', 'G20', 'G91', 'G92', 'G92 E1e12', 'G28', 'G10', 'G11', 'M207 S1e9', 'M220 S0', 'M220 S1e9',
  'M221 S0.0001', 'M204 S0', 'M205 J0', 'M203 X0', 'T99', 'T-1', 'G4 P1e12', 'SET_VELOCITY_LIMIT ACCEL=0', '\r', '\t', 'x', '.', '-', '--', '1.2.3',
];

/**
 * A slice of 50…maxLines lines of `source` at a random place, with 1–20 random edits: a nasty token
 * inserted, a few characters cut, a token put in front, or a new line of token and number.
 */
export function mutateLines(rnd: () => number, source: readonly string[], maxLines: number): string[] {
  const start = Math.floor(rnd() * Math.max(0, source.length - maxLines));
  const lines = source.slice(start, start + 50 + Math.floor(rnd() * (maxLines - 50)));
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
  return lines;
}
