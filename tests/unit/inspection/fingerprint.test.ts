/**
 * G-code fingerprints on real slicer output (tests/fixtures/gcode, see its README for how each file
 * was sliced): the same moves must match whatever the compression, comments or whitespace; a
 * genuinely different print must not.
 */
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import zlib from 'node:zlib';
import { describe, it, expect, beforeAll, afterAll } from 'vitest';
import { fingerprintGcodeFile } from '@/lib/inspection/fingerprint';

const FIX = path.resolve(__dirname, '..', '..', 'fixtures', 'gcode');
let dir: string;
const fx = (name: string) => path.join(FIX, name);
const tmp = (name: string, text: string | Buffer) => {
  const p = path.join(dir, name);
  fs.writeFileSync(p, text);
  return p;
};
const plainText = (name: string) => zlib.gunzipSync(fs.readFileSync(fx(name))).toString('latin1');

beforeAll(() => {
  dir = fs.mkdtempSync(path.join(os.tmpdir(), 'hotlap-fp-'));
});
afterAll(() => fs.rmSync(dir, { recursive: true, force: true }));

describe('G-code fingerprints', () => {
  it('a .gz and the plain file it holds have the same content and moves fingerprints', async () => {
    const gz = await fingerprintGcodeFile(fx('prusa-beacon-020.gcode.gz'));
    const plain = await fingerprintGcodeFile(tmp('plain.gcode', plainText('prusa-beacon-020.gcode.gz')));
    expect(plain.contentSha256).toBe(gz.contentSha256);
    expect(plain.movesSha256).toBe(gz.movesSha256);
    expect(plain.lines).toBe(gz.lines);
  });

  it('CRLF line endings, extra blank lines and spacing change the content fingerprint but not the moves one', async () => {
    const base = await fingerprintGcodeFile(fx('prusa-beacon-020.gcode.gz'));
    const text = plainText('prusa-beacon-020.gcode.gz');
    const crlf = await fingerprintGcodeFile(tmp('crlf.gcode', text.replace(/\n/g, '\r\n')));
    // Only the line breaks differ: the content fingerprint normalizes them too.
    expect(crlf.contentSha256).toBe(base.contentSha256);
    const spaced = text.split('\n').map((l, i) => (i % 7 === 0 ? `  ${l.replace(/ /g, '\t ')}  \n` : `${l}\n`)).join('');
    const edited = await fingerprintGcodeFile(tmp('spaced.gcode', spaced));
    expect(edited.contentSha256).not.toBe(base.contentSha256);
    expect(edited.movesSha256).toBe(base.movesSha256);
  });

  it('the slicer output with every comment removed matches the commented original (real PrusaSlicer and CuraEngine files)', async () => {
    for (const [full, stripped] of [['prusa-beacon-020.gcode.gz', 'prusa-beacon-020-nocomments.gcode.gz'], ['cura-beacon-020.gcode.gz', 'cura-beacon-020-nocomments.gcode.gz']]) {
      const a = await fingerprintGcodeFile(fx(full));
      const b = await fingerprintGcodeFile(fx(stripped));
      expect(b.contentSha256, stripped).not.toBe(a.contentSha256);
      expect(b.movesSha256, stripped).toBe(a.movesSha256);
    }
  });

  it('a copy whose settings comments were edited to claim other values matches its original', async () => {
    // The -lying fixture is the same toolpath with the settings block rewritten (fixtures README).
    const a = await fingerprintGcodeFile(fx('prusa-beacon-028.gcode.gz'));
    const b = await fingerprintGcodeFile(fx('prusa-beacon-028-lying.gcode.gz'));
    expect(b.contentSha256).not.toBe(a.contentSha256);
    expect(b.movesSha256).toBe(a.movesSha256);
  });

  it('parenthesized comments and lower-case words are ignored, a changed move is not', async () => {
    const a = await fingerprintGcodeFile(tmp('a.gcode', 'G28\nG1 X10 Y10 E0.5 F1800 ; first move\n'));
    const b = await fingerprintGcodeFile(tmp('b.gcode', '; header\ng28 (home all)\n\nG1 X10 Y10 (to the corner) E0.5 F1800\n'));
    const c = await fingerprintGcodeFile(tmp('c.gcode', 'G28\nG1 X10 Y10 E0.6 F1800\n'));
    expect(b.movesSha256).toBe(a.movesSha256);
    expect(c.movesSha256).not.toBe(a.movesSha256);
    expect(b.moveLines).toBe(2);
  });

  it('a genuinely different print is not a duplicate (other layer height, other slicer)', async () => {
    const a = await fingerprintGcodeFile(fx('prusa-beacon-020.gcode.gz'));
    for (const other of ['prusa-beacon-028.gcode.gz', 'slic3r-beacon-020.gcode.gz', 'cura-beacon-020.gcode.gz']) {
      const b = await fingerprintGcodeFile(fx(other));
      expect(b.movesSha256, other).not.toBe(a.movesSha256);
      expect(b.contentSha256, other).not.toBe(a.contentSha256);
    }
  });
});
