/**
 * STL reader: measures a mesh (triangle count, bounding box, enclosed volume) from ASCII or binary
 * STL, from a whole Buffer or chunk by chunk from a stream, holding at most a few hundred bytes of
 * the file at a time. Framework-free; used to check test-piece uploads.
 *
 * Formats (the de-facto STL definition, 3D Systems' StereoLithography Interface Specification):
 *  - binary: 80-byte header, uint32 LE triangle count n, then n records of 50 bytes
 *    (normal + 3 vertices as 12 float32 LE, then a uint16 attribute byte count), so the file is
 *    exactly 84 + 50·n bytes.
 *  - ASCII: `solid name`, then per triangle `facet normal nx ny nz / outer loop / vertex x y z ×3 /
 *    endloop / endfacet`, then `endsolid name`.
 * A binary header may itself begin with "solid" (several exporters do that), so "starts with solid"
 * alone does not make a file ASCII: the size rule and a text check decide.
 */

export type StlFormat = 'ascii' | 'binary';

export type StlErrorCode =
  | 'empty'
  | 'truncated'
  | 'garbage'
  | 'non-finite'
  | 'no-triangles'
  | 'syntax'
  | 'too-large'
  | 'too-many-triangles';

/** A problem with the uploaded file, worded for the person who uploaded it. */
export class StlError extends Error {
  readonly code: StlErrorCode;
  /** 1-based line of an ASCII file where the problem was found */
  readonly line?: number;
  constructor(code: StlErrorCode, message: string, line?: number) {
    super(message);
    this.name = 'StlError';
    this.code = code;
    this.line = line;
  }
}

export interface StlLimits {
  /** refuse files larger than this many bytes (default 256 MiB) */
  maxBytes?: number;
  /** refuse meshes with more triangles than this (default 10 million) */
  maxTriangles?: number;
}

export interface StlReadOptions extends StlLimits {
  /** total size when known (file size, Content-Length): lets a stream use the binary size rule */
  totalBytes?: number;
}

export type Vec3Mm = [number, number, number];

export interface StlSummary {
  format: StlFormat;
  triangleCount: number;
  bbox: { min: Vec3Mm; max: Vec3Mm };
  sizeMm: { x: number; y: number; z: number };
  /**
   * |Σ signed tetrahedron volumes| (divergence theorem). Only meaningful for a closed mesh: on an
   * open or self-intersecting one it is a number without physical sense.
   */
  volumeMm3: number;
  /** the same sum before abs: negative means the facets are wound inside-out */
  signedVolumeMm3: number;
  /** things worth telling but not fatal, e.g. bytes after the last binary record */
  warnings: string[];
}

export const DEFAULT_STL_LIMITS: Required<StlLimits> = {
  maxBytes: 256 * 1024 * 1024,
  maxTriangles: 10_000_000,
};

const HEADER_BYTES = 80;
const PREAMBLE_BYTES = 84;
const RECORD_BYTES = 50;
/** bytes looked at to tell ASCII from binary when the total size is unknown */
const SNIFF_BYTES = 512;
/** longest ASCII token we accept; real numbers and keywords are far shorter */
const MAX_TOKEN_CHARS = 256;

const fmtInt = (n: number): string => n.toLocaleString('en-US');

/** Accumulates bbox and volume over triangles; shared by both formats. */
class MeshMeasure {
  triangleCount = 0;
  private min: Vec3Mm = [Infinity, Infinity, Infinity];
  private max: Vec3Mm = [-Infinity, -Infinity, -Infinity];
  private volume6 = 0;
  // Volumes are summed relative to the first vertex instead of the origin: same result for a
  // closed mesh, far less cancellation when the part sits far from the origin.
  private ref: Vec3Mm | null = null;

  constructor(private readonly maxTriangles: number) {}

  add(v: Float64Array): void {
    // v holds 9 numbers: x0 y0 z0 x1 y1 z1 x2 y2 z2
    if (this.triangleCount >= this.maxTriangles) {
      throw new StlError(
        'too-many-triangles',
        `The mesh has more than ${fmtInt(this.maxTriangles)} triangles, the most we accept. Simplify it (decimate) and upload again.`,
      );
    }
    this.triangleCount++;
    for (let i = 0; i < 9; i++) {
      const a = i % 3;
      const x = v[i];
      if (x < this.min[a]) this.min[a] = x;
      if (x > this.max[a]) this.max[a] = x;
    }
    if (!this.ref) this.ref = [v[0], v[1], v[2]];
    const [rx, ry, rz] = this.ref;
    const ax = v[0] - rx, ay = v[1] - ry, az = v[2] - rz;
    const bx = v[3] - rx, by = v[4] - ry, bz = v[5] - rz;
    const cx = v[6] - rx, cy = v[7] - ry, cz = v[8] - rz;
    // 6 × signed volume of tetrahedron (ref, a, b, c) = a · (b × c)
    this.volume6 += ax * (by * cz - bz * cy) + ay * (bz * cx - bx * cz) + az * (bx * cy - by * cx);
  }

  summary(format: StlFormat, warnings: string[]): StlSummary {
    if (this.triangleCount === 0) {
      throw new StlError('no-triangles', 'The STL file holds no triangles, so there is no shape to measure.');
    }
    const signed = this.volume6 / 6;
    return {
      format,
      triangleCount: this.triangleCount,
      bbox: { min: [...this.min] as Vec3Mm, max: [...this.max] as Vec3Mm },
      sizeMm: { x: this.max[0] - this.min[0], y: this.max[1] - this.min[1], z: this.max[2] - this.min[2] },
      volumeMm3: Math.abs(signed),
      signedVolumeMm3: signed,
      warnings,
    };
  }
}

interface FormatParser {
  write(chunk: Uint8Array): void;
  end(): StlSummary;
}

class BinaryParser implements FormatParser {
  private preamble = new Uint8Array(PREAMBLE_BYTES);
  private preambleFill = 0;
  private expected = -1;
  private record = new Uint8Array(RECORD_BYTES);
  private recordView = new DataView(this.record.buffer);
  private recordFill = 0;
  private recordsRead = 0;
  private extraBytes = 0;
  private bytesSeen = 0;
  private readonly v = new Float64Array(9);
  private readonly measure: MeshMeasure;

  constructor(
    private readonly limits: Required<StlLimits>,
    private readonly totalBytes: number | undefined,
    private readonly startsWithSolid: boolean,
  ) {
    this.measure = new MeshMeasure(limits.maxTriangles);
  }

  write(chunk: Uint8Array): void {
    this.bytesSeen += chunk.length;
    let i = 0;
    if (this.expected < 0) {
      const take = Math.min(PREAMBLE_BYTES - this.preambleFill, chunk.length);
      this.preamble.set(chunk.subarray(0, take), this.preambleFill);
      this.preambleFill += take;
      i = take;
      if (this.preambleFill < PREAMBLE_BYTES) return;
      this.expected = new DataView(this.preamble.buffer).getUint32(HEADER_BYTES, true);
      this.checkCount();
    }
    while (i < chunk.length) {
      if (this.recordsRead >= this.expected) {
        this.extraBytes += chunk.length - i;
        return;
      }
      const take = Math.min(RECORD_BYTES - this.recordFill, chunk.length - i);
      this.record.set(chunk.subarray(i, i + take), this.recordFill);
      this.recordFill += take;
      i += take;
      if (this.recordFill === RECORD_BYTES) {
        this.readRecord();
        this.recordFill = 0;
      }
    }
  }

  private checkCount(): void {
    const n = this.expected;
    const needed = PREAMBLE_BYTES + RECORD_BYTES * n;
    if (this.totalBytes !== undefined && this.totalBytes < needed) {
      throw this.shortError(this.totalBytes);
    }
    if (n > this.limits.maxTriangles) {
      throw new StlError(
        'too-many-triangles',
        `The STL header says the mesh has ${fmtInt(n)} triangles; we accept at most ${fmtInt(this.limits.maxTriangles)}. Simplify it (decimate) and upload again.`,
      );
    }
  }

  /** The file is shorter than its count says: truncated upload, or not an STL at all. */
  private shortError(actualBytes: number): StlError {
    const n = this.expected;
    const needed = PREAMBLE_BYTES + RECORD_BYTES * n;
    // A count that could not fit in even 4× the file is more likely random bytes than a cut file.
    const plausible = n > 0 && needed <= 4 * Math.max(actualBytes, PREAMBLE_BYTES);
    if (plausible || this.startsWithSolid) {
      const complete = Math.max(0, Math.floor((actualBytes - PREAMBLE_BYTES) / RECORD_BYTES));
      return new StlError(
        'truncated',
        `This binary STL says it holds ${fmtInt(n)} triangles (${fmtInt(needed)} bytes) but the file has only ${fmtInt(actualBytes)} bytes (${fmtInt(complete)} complete triangles). It looks cut off: export or upload it again.`,
      );
    }
    return new StlError(
      'garbage',
      `This is not an STL file: it does not begin with "solid" (ASCII STL), and read as binary STL its header claims ${fmtInt(n)} triangles, which would need ${fmtInt(needed)} bytes, not ${fmtInt(actualBytes)}.`,
    );
  }

  private readRecord(): void {
    const dv = this.recordView;
    // skip the 12-byte normal: it is redundant with the winding and often wrong in real files
    for (let k = 0; k < 9; k++) this.v[k] = dv.getFloat32(12 + 4 * k, true);
    for (let k = 0; k < 9; k++) {
      if (!Number.isFinite(this.v[k])) {
        throw new StlError(
          'non-finite',
          `Triangle ${fmtInt(this.recordsRead + 1)} has a coordinate that is not a number (${this.v[k]}). The exporter wrote a broken mesh: repair it and upload again.`,
        );
      }
    }
    this.measure.add(this.v);
    this.recordsRead++;
  }

  end(): StlSummary {
    if (this.expected < 0) {
      throw new StlError(
        this.startsWithSolid ? 'truncated' : 'garbage',
        `The file has only ${fmtInt(this.bytesSeen)} bytes: too short for a binary STL (at least ${PREAMBLE_BYTES}) and it does not read as ASCII STL.`,
      );
    }
    if (this.recordsRead < this.expected) throw this.shortError(this.bytesSeen);
    const warnings: string[] = [];
    if (this.extraBytes > 0) {
      warnings.push(`${fmtInt(this.extraBytes)} bytes after the last of the ${fmtInt(this.expected)} triangles were ignored.`);
    }
    return this.measure.summary('binary', warnings);
  }
}

const NUMBER_RE = /^[+-]?(?:\d+\.?\d*|\.\d+)(?:[eE][+-]?\d+)?$/;
const NON_FINITE_RE = /^[+-]?(?:nan|inf|infinity)(?:\(.*\))?$/i;

type AsciiState =
  | 'solid' // expect "solid"
  | 'name' // rest of the "solid" line
  | 'body' // expect "facet" or "endsolid"
  | 'normal' // expect "normal"
  | 'nx' | 'ny' | 'nz'
  | 'outer' | 'loop'
  | 'vertex' // expect "vertex" (or "endloop" after 3)
  | 'vx' | 'vy' | 'vz'
  | 'endloop' | 'endfacet'
  | 'endname' // rest of the "endsolid" line
  | 'after'; // expect "solid" (another solid) or nothing

class AsciiParser implements FormatParser {
  private state: AsciiState = 'solid';
  private token = '';
  private tokenLine = 1;
  private line = 1;
  private vertexInFacet = 0;
  private readonly v = new Float64Array(9);
  private readonly measure: MeshMeasure;
  private facetLine = 0;

  constructor(limits: Required<StlLimits>) {
    this.measure = new MeshMeasure(limits.maxTriangles);
  }

  write(chunk: Uint8Array): void {
    for (let i = 0; i < chunk.length; i++) {
      const c = chunk[i];
      const isSpace = c === 0x20 || c === 0x09 || c === 0x0a || c === 0x0d || c === 0x0b || c === 0x0c;
      if (isSpace) {
        if (this.token.length > 0) this.flush();
        if (c === 0x0a) {
          this.line++;
          if (this.state === 'name') this.state = 'body';
          else if (this.state === 'endname') this.state = 'after';
        }
        continue;
      }
      if (this.state === 'name' || this.state === 'endname') continue; // free text, ignored
      if (c < 0x20 || c > 0x7e) {
        throw new StlError(
          'garbage',
          `Line ${this.line}: unexpected binary byte 0x${c.toString(16).padStart(2, '0')} in an ASCII STL. The file is damaged, or a binary STL that was altered.`,
          this.line,
        );
      }
      if (this.token.length === 0) this.tokenLine = this.line;
      if (this.token.length >= MAX_TOKEN_CHARS) {
        throw new StlError('syntax', `Line ${this.line}: a word longer than ${MAX_TOKEN_CHARS} characters; this is not ASCII STL.`, this.line);
      }
      this.token += String.fromCharCode(c);
    }
  }

  private expectWord(word: string, found: string): void {
    if (found.toLowerCase() !== word) {
      throw new StlError('syntax', `Line ${this.tokenLine}: expected "${word}" but found "${found}".`, this.tokenLine);
    }
  }

  private number(found: string, what: string): number {
    if (NUMBER_RE.test(found)) return Number(found);
    if (NON_FINITE_RE.test(found)) {
      throw new StlError(
        'non-finite',
        `Line ${this.tokenLine}: ${what} is "${found}", not a finite number. The exporter wrote a broken mesh: repair it and upload again.`,
        this.tokenLine,
      );
    }
    throw new StlError('syntax', `Line ${this.tokenLine}: expected a number for ${what} but found "${found}".`, this.tokenLine);
  }

  private flush(): void {
    const t = this.token;
    this.token = '';
    const lower = t.toLowerCase();
    switch (this.state) {
      case 'solid':
        this.expectWord('solid', t);
        this.state = 'name';
        return;
      case 'after':
        this.expectWord('solid', t);
        this.state = 'name';
        return;
      case 'body':
        if (lower === 'facet') {
          this.state = 'normal';
          this.facetLine = this.tokenLine;
        } else if (lower === 'endsolid') {
          this.state = 'endname';
        } else {
          throw new StlError('syntax', `Line ${this.tokenLine}: expected "facet" or "endsolid" but found "${t}".`, this.tokenLine);
        }
        return;
      case 'normal':
        this.expectWord('normal', t);
        this.state = 'nx';
        return;
      case 'nx':
      case 'ny':
      case 'nz':
        // Normals are not used (the winding defines orientation); some exporters write "nan" here
        // for degenerate facets, which we tolerate. A non-number word is still a syntax error.
        if (!NUMBER_RE.test(t) && !NON_FINITE_RE.test(t)) {
          throw new StlError('syntax', `Line ${this.tokenLine}: expected a number for the facet normal but found "${t}".`, this.tokenLine);
        }
        this.state = this.state === 'nx' ? 'ny' : this.state === 'ny' ? 'nz' : 'outer';
        return;
      case 'outer':
        this.expectWord('outer', t);
        this.state = 'loop';
        return;
      case 'loop':
        this.expectWord('loop', t);
        this.state = 'vertex';
        this.vertexInFacet = 0;
        return;
      case 'vertex':
        this.expectWord('vertex', t);
        this.state = 'vx';
        return;
      case 'vx':
      case 'vy':
      case 'vz': {
        const axis = this.state === 'vx' ? 0 : this.state === 'vy' ? 1 : 2;
        this.v[this.vertexInFacet * 3 + axis] = this.number(t, `vertex ${'xyz'[axis]}`);
        if (axis < 2) {
          this.state = axis === 0 ? 'vy' : 'vz';
        } else {
          this.vertexInFacet++;
          this.state = this.vertexInFacet === 3 ? 'endloop' : 'vertex';
        }
        return;
      }
      case 'endloop':
        if (lower === 'vertex') {
          throw new StlError('syntax', `Line ${this.tokenLine}: a facet has more than 3 vertices; STL facets are triangles.`, this.tokenLine);
        }
        this.expectWord('endloop', t);
        this.state = 'endfacet';
        return;
      case 'endfacet':
        this.expectWord('endfacet', t);
        this.measure.add(this.v);
        this.state = 'body';
        return;
      default:
        return;
    }
  }

  end(): StlSummary {
    if (this.token.length > 0) this.flush();
    if (this.state !== 'after' && this.state !== 'endname') {
      if (this.state === 'body' || this.state === 'name') {
        throw new StlError('truncated', `The ASCII STL ends at line ${this.line} without "endsolid": the file looks cut off. Export or upload it again.`, this.line);
      }
      throw new StlError(
        'truncated',
        `The ASCII STL ends at line ${this.line} in the middle of the facet that starts on line ${this.facetLine}: the file looks cut off. Export or upload it again.`,
        this.line,
      );
    }
    return this.measure.summary('ascii', []);
  }
}

function startsWithSolid(prefix: Uint8Array): boolean {
  let i = 0;
  while (i < prefix.length && (prefix[i] === 0x20 || prefix[i] === 0x09 || prefix[i] === 0x0a || prefix[i] === 0x0d)) i++;
  const word = Buffer.from(prefix.subarray(i, i + 5)).toString('latin1').toLowerCase();
  return word === 'solid';
}

function isText(prefix: Uint8Array): boolean {
  for (const c of prefix) {
    if (!(c === 0x09 || c === 0x0a || c === 0x0d || (c >= 0x20 && c <= 0x7e))) return false;
  }
  return true;
}

/**
 * Chooses the format from the first bytes (and the total size when known):
 * exact binary size 84 + 50·n wins; otherwise "solid" followed by plain text is ASCII;
 * everything else is read as binary (which then reports truncation or garbage).
 */
function detectFormat(prefix: Uint8Array, totalBytes: number | undefined): StlFormat {
  if (totalBytes !== undefined && prefix.length >= PREAMBLE_BYTES) {
    const n = new DataView(prefix.buffer, prefix.byteOffset, prefix.byteLength).getUint32(HEADER_BYTES, true);
    if (PREAMBLE_BYTES + RECORD_BYTES * n === totalBytes) return 'binary';
  }
  if (startsWithSolid(prefix) && isText(prefix)) return 'ascii';
  return 'binary';
}

/**
 * Push-style reader: write() chunks as they arrive, end() for the summary. Memory stays bounded:
 * a few hundred bytes of sniffing, one 50-byte record, or one ASCII token.
 */
export class StlReader {
  private readonly limits: Required<StlLimits>;
  private readonly totalBytes?: number;
  private sniff: Uint8Array[] = [];
  private sniffBytes = 0;
  private parser: FormatParser | null = null;
  private bytes = 0;

  constructor(options: StlReadOptions = {}) {
    this.limits = {
      maxBytes: options.maxBytes ?? DEFAULT_STL_LIMITS.maxBytes,
      maxTriangles: options.maxTriangles ?? DEFAULT_STL_LIMITS.maxTriangles,
    };
    this.totalBytes = options.totalBytes;
    if (this.totalBytes !== undefined && this.totalBytes > this.limits.maxBytes) throw this.tooLarge(this.totalBytes);
  }

  private tooLarge(bytes: number): StlError {
    return new StlError(
      'too-large',
      `The STL file is ${fmtInt(bytes)} bytes; we accept at most ${fmtInt(this.limits.maxBytes)}. Simplify the mesh or export it as binary STL.`,
    );
  }

  write(chunk: Uint8Array | string): void {
    const bytes = typeof chunk === 'string' ? Buffer.from(chunk, 'utf8') : chunk;
    this.bytes += bytes.length;
    if (this.bytes > this.limits.maxBytes) throw this.tooLarge(this.bytes);
    if (this.parser) {
      this.parser.write(bytes);
      return;
    }
    this.sniff.push(bytes);
    this.sniffBytes += bytes.length;
    if (this.sniffBytes >= SNIFF_BYTES) this.choose();
  }

  private choose(): void {
    const all = Buffer.concat(this.sniff);
    this.sniff = [];
    const format = detectFormat(all.subarray(0, SNIFF_BYTES), this.totalBytes);
    this.parser = format === 'ascii'
      ? new AsciiParser(this.limits)
      : new BinaryParser(this.limits, this.totalBytes, startsWithSolid(all));
    this.parser.write(all);
  }

  end(): StlSummary {
    if (!this.parser) {
      if (this.sniffBytes === 0) throw new StlError('empty', 'The STL file is empty (0 bytes).');
      this.choose();
    }
    return this.parser!.end();
  }
}

/** Reads a whole STL held in memory. */
export function parseStl(data: Uint8Array, limits: StlLimits = {}): StlSummary {
  const reader = new StlReader({ ...limits, totalBytes: data.length });
  reader.write(data);
  return reader.end();
}

/** Reads an STL from a stream (a Node Readable or any async iterable of chunks) without buffering it. */
export async function parseStlStream(
  source: AsyncIterable<Uint8Array | string>,
  options: StlReadOptions = {},
): Promise<StlSummary> {
  const reader = new StlReader(options);
  for await (const chunk of source) reader.write(chunk);
  return reader.end();
}
