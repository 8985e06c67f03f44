import { readFileSync, readdirSync } from 'node:fs';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { StlError, parseStl, parseStlStream, type StlSummary } from '@/lib/stl';
import {
  BEACON,
  beacon,
  beaconVolumeMm3,
  cube20,
  cuboid,
  cylinder,
  toAsciiStl,
  toBinaryStl,
  type Mesh,
} from '@/scripts/fixtures/shapes';

const FIXTURES = join(__dirname, '../../fixtures/stl');

/** Feeds a buffer to the stream reader in fixed-size chunks. */
async function* chunks(buf: Buffer, size: number): AsyncGenerator<Buffer> {
  for (let i = 0; i < buf.length; i += size) yield buf.subarray(i, i + size);
}

function stlError(fn: () => unknown): StlError {
  try {
    fn();
  } catch (e) {
    if (e instanceof StlError) return e;
    throw e;
  }
  throw new Error('expected an StlError, got none');
}

async function stlErrorAsync(p: Promise<unknown>): Promise<StlError> {
  try {
    await p;
  } catch (e) {
    if (e instanceof StlError) return e;
    throw e;
  }
  throw new Error('expected an StlError, got none');
}

const encodings = {
  binary: (m: Mesh) => toBinaryStl(m),
  ascii: (m: Mesh) => Buffer.from(toAsciiStl(m), 'utf8'),
};

/**
 * Exact volume of a right prism over a regular n-gon inscribed in a circle of radius r:
 * the n-gon is n isosceles triangles with apex angle 2π/n and legs r, each of area ½·r²·sin(2π/n)
 * (plane geometry, area of a regular polygon from its circumradius), so V = (n/2)·r²·sin(2π/n)·h.
 */
const prismVolume = (n: number, r: number, h: number) => (n / 2) * r * r * Math.sin((2 * Math.PI) / n) * h;

describe.each(Object.entries(encodings))('%s STL', (format, encode) => {
  it('measures a cube of side a: volume a³ and the exact bounding box', () => {
    // a = 12.5 and the corner are exact in float32, so the closed form holds to float64 rounding
    const a = 12.5;
    const s = parseStl(encode(cuboid('cube', [a, a, a], [-2.5, 4, 0.5])));
    expect(s.format).toBe(format);
    expect(s.triangleCount).toBe(12);
    expect(s.volumeMm3).toBeCloseTo(a ** 3, 9); // cube volume a³
    expect(s.signedVolumeMm3).toBeGreaterThan(0); // outward winding
    expect(s.bbox).toEqual({ min: [-2.5, 4, 0.5], max: [10, 16.5, 13] });
    expect(s.sizeMm).toEqual({ x: a, y: a, z: a });
  });

  it('measures the 64-sided cylinder as the inscribed prism (n/2)·r²·sin(2π/n)·h', () => {
    const [r, h, n] = [10, 20, 64];
    const s = parseStl(encode(cylinder(r, h, n)));
    expect(s.triangleCount).toBe(4 * n);
    // float32 vertices (binary) and 9-digit text (ASCII) leave ~1e-7 relative error
    expect(Math.abs(s.volumeMm3 - prismVolume(n, r, h)) / prismVolume(n, r, h)).toBeLessThan(1e-6);
    expect(s.sizeMm.z).toBe(h);
    expect(s.bbox.min[0]).toBeCloseTo(-r, 5); // vertex at angle π
    expect(s.bbox.max[0]).toBeCloseTo(r, 5); // vertex at angle 0
  });

  it('approaches πr²h as the segment count grows, from below, as the series predicts', () => {
    const [r, h] = [10, 20];
    let lastError = Infinity;
    for (const n of [16, 64, 256, 1024]) {
      const s = parseStl(encode(cylinder(r, h, n)));
      const relError = 1 - s.volumeMm3 / (Math.PI * r * r * h);
      // sin x / x = 1 − x²/6 + …, with x = 2π/n: relative shortfall ≈ (2π/n)²/6 (Taylor series)
      const predicted = (2 * Math.PI / n) ** 2 / 6;
      expect(relError).toBeGreaterThan(0);
      expect(Math.abs(relError - predicted) / predicted).toBeLessThan(0.01);
      expect(relError).toBeLessThan(lastError);
      lastError = relError;
    }
    expect(lastError).toBeLessThan(1e-5);
  });

  it('gives the same summary when streamed in chunks of any size', async () => {
    const buf = encode(beacon());
    const whole = parseStl(buf);
    for (const size of [1, 7, 49, 50, 51, 84, 4096]) {
      const streamed: StlSummary = await parseStlStream(chunks(buf, size));
      expect(streamed).toEqual(whole);
    }
  });

  it('reports inside-out winding as a negative signed volume', () => {
    const m = cube20();
    const flipped: Mesh = { name: 'flipped', triangles: m.triangles.map(([a, b, c]) => [a, c, b] as const) };
    const s = parseStl(encode(flipped));
    expect(s.signedVolumeMm3).toBeCloseTo(-8000, 6);
    expect(s.volumeMm3).toBeCloseTo(8000, 6);
  });

  it('refuses more triangles or bytes than the limits allow', async () => {
    const buf = encode(cube20());
    expect(stlError(() => parseStl(buf, { maxTriangles: 5 })).code).toBe('too-many-triangles');
    expect(stlError(() => parseStl(buf, { maxBytes: 100 })).code).toBe('too-large');
    expect((await stlErrorAsync(parseStlStream(chunks(buf, 16), { maxBytes: 100 }))).code).toBe('too-large');
  });
});

describe('the cube fixtures', () => {
  it('read identically as binary and ASCII', () => {
    const bin = parseStl(readFileSync(join(FIXTURES, 'cube20.stl')));
    const ascii = parseStl(readFileSync(join(FIXTURES, 'cube20-ascii.stl')));
    expect(bin.format).toBe('binary');
    expect(ascii.format).toBe('ascii');
    expect({ ...ascii, format: 'binary' }).toEqual(bin);
    expect(bin.volumeMm3).toBe(8000); // 20³, exact: every coordinate is a small integer
  });
});

describe('format detection', () => {
  it('reads a binary STL whose header starts with "solid" as binary', async () => {
    const buf = toBinaryStl(cube20(), 'solid cube exported by a tool that starts binary headers this way');
    expect(buf.subarray(0, 5).toString('latin1')).toBe('solid');
    expect(parseStl(buf).format).toBe('binary');
    expect(parseStl(buf).volumeMm3).toBe(8000);
    // without a size hint, the stream reader must tell it from the bytes alone
    const streamed = await parseStlStream(chunks(buf, 13));
    expect(streamed.format).toBe('binary');
    expect(streamed.volumeMm3).toBe(8000);
  });

  it('accepts ASCII keywords in upper case and several solids in one file', () => {
    const one = toAsciiStl(cuboid('a', [1, 1, 1]));
    const two = toAsciiStl(cuboid('b', [1, 1, 1], [5, 0, 0])).toUpperCase();
    const s = parseStl(Buffer.from(one + two));
    expect(s.triangleCount).toBe(24);
    expect(s.volumeMm3).toBeCloseTo(2, 12);
  });
});

describe('broken files', () => {
  it('empty file', () => {
    const e = stlError(() => parseStl(Buffer.alloc(0)));
    expect(e.code).toBe('empty');
    expect(e.message).toMatch(/empty/);
  });

  it('truncated binary: the count promises more triangles than the bytes hold', async () => {
    const buf = toBinaryStl(cube20());
    const cut = buf.subarray(0, buf.length - 30);
    const e = stlError(() => parseStl(cut));
    expect(e.code).toBe('truncated');
    expect(e.message).toContain('12 triangles');
    expect(e.message).toContain('11 complete triangles');
    expect((await stlErrorAsync(parseStlStream(chunks(cut, 10)))).code).toBe('truncated');
  });

  it('truncated binary that starts with "solid" is still reported as truncated', () => {
    const buf = toBinaryStl(cube20(), 'solid but binary');
    const e = stlError(() => parseStl(buf.subarray(0, 84 + 50 * 3)));
    expect(e.code).toBe('truncated');
  });

  it('garbage bytes', () => {
    // deterministic pseudo-random bytes (linear congruential generator, Numerical Recipes constants)
    const junk = Buffer.alloc(1000);
    let x = 12345;
    for (let i = 0; i < junk.length; i++) {
      x = (Math.imul(x, 1664525) + 1013904223) >>> 0;
      junk[i] = x >>> 24;
    }
    expect(stlError(() => parseStl(junk)).code).toBe('garbage');
    expect(stlError(() => parseStl(Buffer.from('hello, this is a note and not a mesh'))).code).toBe('garbage');
  });

  it('binary text that is neither STL form', () => {
    const e = stlError(() => parseStl(Buffer.from('%PDF-1.4\n' + 'x'.repeat(300))));
    expect(e.code).toBe('garbage');
    expect(e.message).toMatch(/not an STL/);
  });

  it('NaN and infinite coordinates', () => {
    const buf = toBinaryStl(cube20());
    buf.writeFloatLE(NaN, 84 + 50 * 4 + 12 + 4); // y of the first vertex of triangle 5
    const e = stlError(() => parseStl(buf));
    expect(e.code).toBe('non-finite');
    expect(e.message).toContain('Triangle 5');

    const ascii = toAsciiStl(cube20()).replace(/vertex (\S+) (\S+) (\S+)/, 'vertex $1 inf $3');
    const a = stlError(() => parseStl(Buffer.from(ascii)));
    expect(a.code).toBe('non-finite');
    expect(a.line).toBe(4);
  });

  it('zero triangles', () => {
    const empty = Buffer.alloc(84); // header + count 0: a valid but empty binary STL
    expect(stlError(() => parseStl(empty)).code).toBe('no-triangles');
    expect(stlError(() => parseStl(Buffer.from('solid nothing\nendsolid nothing\n'))).code).toBe('no-triangles');
  });

  it('ASCII syntax error names the line', () => {
    const lines = toAsciiStl(cube20()).split('\n');
    // line 11 (1-based) is the second vertex of the second facet
    expect(lines[10]).toMatch(/^ {3}vertex /);
    lines[10] = lines[10].replace('vertex', 'vertx');
    const e = stlError(() => parseStl(Buffer.from(lines.join('\n'))));
    expect(e.code).toBe('syntax');
    expect(e.line).toBe(11);
    expect(e.message).toBe('Line 11: expected "vertex" but found "vertx".');
  });

  it('ASCII facet with a word where a number belongs', () => {
    const text = 'solid t\nfacet normal 0 0 1\nouter loop\nvertex 0 0 zero\n';
    const e = stlError(() => parseStl(Buffer.from(text)));
    expect(e.code).toBe('syntax');
    expect(e.line).toBe(4);
  });

  it('ASCII cut off mid-facet or before endsolid', () => {
    const text = toAsciiStl(cube20());
    const mid = stlError(() => parseStl(Buffer.from(text.slice(0, 400))));
    expect(mid.code).toBe('truncated');
    expect(mid.message).toMatch(/middle of the facet/);
    const noEnd = stlError(() => parseStl(Buffer.from(text.replace(/endsolid.*\n$/, ''))));
    expect(noEnd.code).toBe('truncated');
  });

  it('binary bytes inside an ASCII file', () => {
    const text = toAsciiStl(cube20());
    const damaged = Buffer.from(text);
    damaged[600] = 0x00;
    expect(['garbage', 'syntax']).toContain(stlError(() => parseStl(damaged)).code);
  });

  it('extra bytes after the last binary record are ignored with a warning', () => {
    const buf = Buffer.concat([toBinaryStl(cube20()), Buffer.from('padding')]);
    const s = parseStl(buf);
    expect(s.volumeMm3).toBe(8000);
    expect(s.warnings).toEqual(['7 bytes after the last of the 12 triangles were ignored.']);
  });
});

describe('fixture shapes', () => {
  /** Closed and consistently wound: every directed edge appears once, its reverse once. */
  function expectClosedManifold(m: Mesh) {
    const key = (p: readonly number[]) => p.join(',');
    const directed = new Map<string, number>();
    for (const t of m.triangles) {
      for (let i = 0; i < 3; i++) {
        const k = `${key(t[i])}>${key(t[(i + 1) % 3])}`;
        directed.set(k, (directed.get(k) ?? 0) + 1);
      }
    }
    for (const [k, count] of directed) {
      expect(count, `edge ${k} used twice in one direction`).toBe(1);
      const [a, b] = k.split('>');
      expect(directed.get(`${b}>${a}`), `edge ${k} has no opposite`).toBe(1);
    }
  }

  it('are closed, consistently wound meshes', () => {
    for (const m of [beacon(), cube20(), cylinder(10, 20, 64), cuboid('c', [1, 2, 3])]) expectClosedManifold(m);
  });

  it('all committed STL fixtures parse', () => {
    const files = readdirSync(FIXTURES).filter((f) => f.endsWith('.stl'));
    expect(files.length).toBeGreaterThanOrEqual(6);
    for (const f of files) {
      const s = parseStl(readFileSync(join(FIXTURES, f)));
      expect(s.triangleCount, f).toBeGreaterThan(0);
      expect(s.signedVolumeMm3, f).toBeGreaterThan(0);
    }
  });

  it('the Beacon fixture has the volume of its boxes and its designed size', () => {
    const s = parseStl(readFileSync(join(FIXTURES, 'beacon.stl')));
    // exact volume by adding/subtracting the boxes; float32 rounding of 3.2 mm walls allows ~1e-6
    expect(Math.abs(s.volumeMm3 - beaconVolumeMm3()) / beaconVolumeMm3()).toBeLessThan(1e-6);
    expect(beaconVolumeMm3()).toBeCloseTo(16620.48, 6); // 36²·3 + (30² − 23.6²)·37 − 10·3.2·10 + 20·6·3
    expect(s.sizeMm.x).toBe(BEACON.baseSizeMm);
    expect(s.sizeMm.y).toBe(BEACON.baseSizeMm / 2 + BEACON.towerSizeMm / 2 + BEACON.ledgeDepthMm);
    expect(s.sizeMm.z).toBe(BEACON.towerTopMm);
  });

  it('the cylinder fixture matches the 64-gon prism', () => {
    const s = parseStl(readFileSync(join(FIXTURES, 'cylinder.stl')));
    expect(Math.abs(s.volumeMm3 - prismVolume(64, 10, 20)) / prismVolume(64, 10, 20)).toBeLessThan(1e-6);
  });
});
