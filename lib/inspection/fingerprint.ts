/**
 * Content fingerprints of a G-code file, for finding the same print submitted twice however it was
 * packed or annotated. One streaming pass through the engine's line reader (plain or gzip, memory
 * bounded by one chunk), two SHA-256 digests:
 *
 * - `contentSha256`: the decompressed text, each line followed by LF. A .gz and the plain file it
 *   holds match; so do copies that differ only in line endings (CRLF, LF, CR).
 * - `movesSha256`: what the printer is told, without annotations. Per line: the `;` comment is cut,
 *   `( … )` comments are removed, spaces/tabs go, letters are upper-cased (G-code words are
 *   case-insensitive), blank lines are skipped. A copy with comments edited, added or removed, or
 *   with its whitespace changed, matches; a copy with one move changed does not.
 *
 * Framework-free: imports only node:crypto and the reader.
 */
import { createHash, type Hash } from 'node:crypto';
import type { Readable } from 'node:stream';
import { readFileLines, readStreamLines, type LineSink } from './reader';
import { MAX_LINE_BYTES } from './engineConstants';

export interface GcodeFingerprint {
  contentSha256: string;
  movesSha256: string;
  /** lines read (all of them, blank and comment-only included) */
  lines: number;
  /** lines left after comments and whitespace were removed */
  moveLines: number;
}

const SEMI = 0x3b;
const OPEN = 0x28;
const CLOSE = 0x29;
const SPACE = 0x20;
const TAB = 0x09;
const CR = 0x0d;
const LF = 0x0a;
const LOWER_A = 0x61;
const LOWER_Z = 0x7a;

/**
 * Bytes collected before a hash update: large runs keep the per-call cost of update() small (one
 * call per line doubled the time on a 65 MB file). Room for the longest line the reader hands over.
 */
const OUT_BYTES = 4 * MAX_LINE_BYTES;

class FingerprintSink implements LineSink {
  private readonly content: Hash = createHash('sha256');
  private readonly moves: Hash = createHash('sha256');
  /** Normalized lines waiting for the moves hash (each ends with LF). */
  private readonly out = Buffer.allocUnsafe(OUT_BYTES);
  private outLen = 0;
  /** Raw lines (LF-terminated) waiting for the content hash. */
  private readonly raw = Buffer.allocUnsafe(OUT_BYTES);
  private rawLen = 0;
  // Not named `lines`: the reader would take a field of that name for LineSink.lines().
  lineCount = 0;
  moveLines = 0;

  line(buf: Uint8Array, start: number, end: number): void {
    this.lineCount++;
    // A line is at most MAX_LINE_BYTES (the reader cuts longer ones), so one flush always makes room.
    if (this.rawLen + (end - start) + 1 > OUT_BYTES || this.outLen + (end - start) + 1 > OUT_BYTES) this.flush();
    // The reader splits on LF and hands a CRLF line with its CR: leave it out, so line endings do not count.
    const rawEnd = end > start && buf[end - 1] === CR ? end - 1 : end;
    this.raw.set(buf.subarray(start, rawEnd), this.rawLen);
    this.rawLen += rawEnd - start;
    this.raw[this.rawLen++] = LF;
    // A normalized line is never longer than the raw one.
    const before = this.outLen;
    let depth = 0;
    for (let i = start; i < end; i++) {
      let c = buf[i];
      if (depth > 0) {
        if (c === CLOSE) depth--;
        else if (c === OPEN) depth++;
        continue;
      }
      if (c === SEMI) break;
      if (c === OPEN) {
        depth = 1;
        continue;
      }
      if (c === SPACE || c === TAB || c === CR) continue;
      if (c >= LOWER_A && c <= LOWER_Z) c -= 32;
      this.out[this.outLen++] = c;
    }
    if (this.outLen > before) {
      this.out[this.outLen++] = LF;
      this.moveLines++;
    }
  }

  private flush(): void {
    if (this.rawLen) this.content.update(this.raw.subarray(0, this.rawLen));
    if (this.outLen) this.moves.update(this.out.subarray(0, this.outLen));
    this.rawLen = 0;
    this.outLen = 0;
  }

  result(): GcodeFingerprint {
    this.flush();
    return { contentSha256: this.content.digest('hex'), movesSha256: this.moves.digest('hex'), lines: this.lineCount, moveLines: this.moveLines };
  }
}

/** Fingerprints a G-code file (plain or gzip). Throws the reader's InspectionError for input that is not G-code text. */
export async function fingerprintGcodeFile(path: string): Promise<GcodeFingerprint> {
  const sink = new FingerprintSink();
  await readFileLines(path, sink);
  return sink.result();
}

/** Fingerprints a byte stream of G-code (plain or gzip), e.g. a stored file read from storage. */
export async function fingerprintGcodeStream(input: Readable): Promise<GcodeFingerprint> {
  const sink = new FingerprintSink();
  await readStreamLines(input, sink);
  return sink.result();
}
