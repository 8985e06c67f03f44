/**
 * The environment-neutral front of the engine: lines out of byte chunks, the text checks, and the
 * one error type for input that cannot be inspected. No node:* imports — the same code runs in
 * Node (reader.ts feeds it from files and streams) and in a browser Web Worker.
 *
 * Lines are handed to a LineSink as (bytes, start, end) ranges, without building strings, with
 * memory bounded by one chunk plus one carried-over line (at most MAX_LINE_BYTES). Binary G-code
 * (the "GCDE" container some slicers can write) and other non-text input are refused with a
 * sentence the entrant can act on.
 */
import { MAX_LINE_BYTES } from './engineConstants';

export type InspectionErrorCode =
  | 'not-found'
  | 'unreadable'
  | 'empty'
  | 'binary-gcode'
  | 'binary'
  | 'truncated-gzip'
  | 'corrupt-gzip';

/** The one error type the engine throws for input it cannot inspect. */
export class InspectionError extends Error {
  readonly code: InspectionErrorCode;
  constructor(code: InspectionErrorCode, message: string) {
    super(message);
    this.name = 'InspectionError';
    this.code = code;
  }
}

/** Receives lines; `start`/`end` index into `buf`, the line break is excluded. */
export interface LineSink {
  line(buf: Uint8Array, start: number, end: number): void;
  /** The NEXT line handed to line() was longer than MAX_LINE_BYTES and has been cut. */
  longLine?(bytes: number): void;
  /**
   * Optional: takes a run of complete lines at once, [start, end) with an LF at end − 1, finds
   * the breaks itself, cuts lines over MAX_LINE_BYTES as line()/longLine() would see them, and
   * returns the number of lines. The parser implements it to save a search per line.
   */
  lines?(buf: Uint8Array, start: number, end: number): number;
}

export interface ReadStats {
  bytesIn: number;
  bytesText: number;
  gzip: boolean;
  lines: number;
}

const LF = 10;
const CR = 13;

/**
 * Splits byte chunks into lines. A line break is LF, CRLF or a lone CR (the parser also treats a CR
 * inside a line as a break, so mixed files work). A line spanning chunks is copied into a fixed
 * carry buffer.
 */
export class LineSplitter {
  private readonly sink: LineSink;
  private readonly carry = new Uint8Array(MAX_LINE_BYTES);
  private carryLen = 0;
  /** Bytes of the current line dropped because it was too long. */
  private dropped = 0;
  lines = 0;
  bytes = 0;
  private checked = false;

  constructor(sink: LineSink) {
    this.sink = sink;
  }

  push(chunk: Uint8Array): void {
    if (chunk.length === 0) return;
    if (!this.checked) {
      this.checked = true;
      checkTextStart(chunk);
    }
    this.bytes += chunk.length;
    let pos = 0;
    const n = chunk.length;
    // Index of the chunk's last LF, for handing the complete lines to a block-reading sink.
    const lastLf = this.sink.lines ? chunk.lastIndexOf(LF) : -1;
    while (pos < n) {
      if (pos <= lastLf && this.carryLen === 0 && this.dropped === 0) {
        this.lines += this.sink.lines!(chunk, pos, lastLf + 1);
        pos = lastLf + 1;
        continue;
      }
      let lf = chunk.indexOf(LF, pos);
      if (lf < 0) {
        // No LF left in this chunk: a CR-only file is split on CR. A CR that is the chunk's last
        // byte may be the first half of a CRLF, so it is carried (the parser ignores a trailing CR).
        const cr = chunk.indexOf(CR, pos);
        if (cr >= 0 && cr < n - 1) {
          lf = cr;
        } else {
          this.append(chunk, pos, n);
          return;
        }
      }
      if (this.carryLen === 0 && this.dropped === 0) {
        if (lf - pos > MAX_LINE_BYTES) {
          this.lines++;
          this.sink.longLine?.(lf - pos);
          this.sink.line(chunk, pos, pos + MAX_LINE_BYTES);
        } else {
          this.lines++;
          this.sink.line(chunk, pos, lf);
        }
      } else {
        this.append(chunk, pos, lf);
        this.flushCarry();
      }
      pos = lf + 1;
    }
  }

  private append(chunk: Uint8Array, from: number, to: number): void {
    const room = MAX_LINE_BYTES - this.carryLen;
    const len = to - from;
    if (len <= room) {
      this.carry.set(chunk.subarray(from, to), this.carryLen);
      this.carryLen += len;
    } else {
      if (room > 0) this.carry.set(chunk.subarray(from, from + room), this.carryLen);
      this.carryLen = MAX_LINE_BYTES;
      this.dropped += len - room;
    }
  }

  private flushCarry(): void {
    this.lines++;
    if (this.dropped > 0) this.sink.longLine?.(this.carryLen + this.dropped);
    this.sink.line(this.carry, 0, this.carryLen);
    this.carryLen = 0;
    this.dropped = 0;
  }

  /** Call once at end of input. */
  end(): void {
    if (this.carryLen > 0 || this.dropped > 0) this.flushCarry();
  }
}

/**
 * Refuses binary input by looking at the first decoded bytes: the binary G-code magic "GCDE",
 * any NUL byte, or more than 10 % control bytes other than TAB/LF/CR/FF (text G-code has none).
 */
export function checkTextStart(chunk: Uint8Array): void {
  if (chunk.length >= 4 && chunk[0] === 0x47 && chunk[1] === 0x43 && chunk[2] === 0x44 && chunk[3] === 0x45) {
    throw new InspectionError(
      'binary-gcode',
      'This is binary G-code, which is not supported: export plain-text G-code from the slicer (turn off binary G-code output) and upload that.',
    );
  }
  const n = Math.min(chunk.length, 4096);
  let control = 0;
  for (let i = 0; i < n; i++) {
    const c = chunk[i];
    if (c === 0) {
      throw new InspectionError(
        'binary',
        'This file is binary, not G-code text: upload the plain-text .gcode (or .gcode.gz) the slicer exported.',
      );
    }
    if (c < 32 && c !== 9 && c !== 10 && c !== 13 && c !== 12) control++;
  }
  if (control > n * 0.1) {
    throw new InspectionError(
      'binary',
      'This file is binary, not G-code text: upload the plain-text .gcode (or .gcode.gz) the slicer exported.',
    );
  }
}

export function emptyError(): InspectionError {
  return new InspectionError('empty', 'The file is empty: there is no G-code to inspect.');
}
