import { describe, it, expect } from 'vitest';
import { gcodeFileProblem, photoFileProblem, photoCountProblem, projectFileProblem, GCODE_MAX_BYTES, PHOTO_MAX_BYTES, PHOTO_MAX_COUNT } from '@/lib/entries/fileLimits';
import { GCODE_MAX_BYTES as SERVER_GCODE_MAX, PHOTO_MAX_BYTES as SERVER_PHOTO_MAX, PHOTO_MAX_COUNT as SERVER_PHOTO_COUNT, ENTRY_UPLOAD_SPEC } from '@/lib/entries/files';
import { formatBytes } from '@/lib/format';

const f = (name: string, size = 1000, type = '') => ({ name, size, type });

describe('the drop areas refuse a wrong file at once, with a sentence', () => {
  it('takes what slicers export, plain or gzipped (common practice, no source: the endings PrusaSlicer, Cura and slic3r write)', () => {
    for (const name of ['beacon.gcode', 'BEACON.GCODE', 'beacon.gco', 'beacon.g', 'beacon.gcode.gz']) expect(gcodeFileProblem(f(name))).toBeNull();
  });

  it('names what the wrong file is', () => {
    expect(gcodeFileProblem(f('beacon.bgcode'))).toMatch(/binary G-code/);
    expect(gcodeFileProblem(f('beacon.stl'))).toMatch(/3-D model, not G-code/);
    expect(gcodeFileProblem(f('front.jpg', 1000, 'image/jpeg'))).toMatch(/is a photo, not G-code/);
    expect(gcodeFileProblem(f('notes.txt', 1000, 'text/plain'))).toBe('notes.txt is not a .gcode or .gcode.gz file. Add the G-code your slicer exported.');
    expect(gcodeFileProblem(f('empty.gcode', 0))).toBe('empty.gcode is empty.');
  });

  it('refuses a file over the limit and says both sizes', () => {
    expect(gcodeFileProblem(f('huge.gcode', GCODE_MAX_BYTES))).toBeNull();
    expect(gcodeFileProblem(f('huge.gcode', GCODE_MAX_BYTES + 1))).toBe('huge.gcode is 200.0 MB; the G-code may be at most 200 MB. Gzip it (.gcode.gz) to make it smaller.');
    expect(gcodeFileProblem(f('huge.gcode', 250 * 1024 * 1024))).toMatch(/^huge\.gcode is 250\.0 MB; the G-code may be at most 200 MB/);
    expect(photoFileProblem(f('big.jpg', 25 * 1024 * 1024, 'image/jpeg'))).toBe('big.jpg is 25.0 MB; each photo may be at most 20 MB.');
    expect(projectFileProblem(f('p.3mf', 21 * 1024 * 1024))).toMatch(/at most 20 MB/);
  });

  it('photos by type or by name (HEIC often comes without a type)', () => {
    expect(photoFileProblem(f('a.jpg', 10, 'image/jpeg'))).toBeNull();
    expect(photoFileProblem(f('a.HEIC', 10, ''))).toBeNull();
    expect(photoFileProblem(f('a.gcode', 10, 'text/plain'))).toBe('a.gcode is not a JPEG, PNG, WebP or HEIC photo.');
    expect(photoCountProblem(PHOTO_MAX_COUNT)).toBeNull();
    expect(photoCountProblem(PHOTO_MAX_COUNT + 2)).toMatch(/at most 6 photos; you chose 8/);
  });

  it('the browser and the server share one set of limits', () => {
    expect([GCODE_MAX_BYTES, PHOTO_MAX_BYTES, PHOTO_MAX_COUNT]).toEqual([SERVER_GCODE_MAX, SERVER_PHOTO_MAX, SERVER_PHOTO_COUNT]);
    expect(ENTRY_UPLOAD_SPEC.files.gcode.maxBytes).toBe(GCODE_MAX_BYTES);
    expect(ENTRY_UPLOAD_SPEC.files.photos.maxCount).toBe(PHOTO_MAX_COUNT);
  });

  it('sizes read as a file manager shows them (1 KB = 1024 bytes, common practice, no source)', () => {
    expect(formatBytes(812)).toBe('812 bytes');
    expect(formatBytes(49_357)).toBe('48.2 KB');
    expect(formatBytes(943_718)).toBe('921.6 KB');
    expect(formatBytes(1.9 * 1024 * 1024)).toBe('1.9 MB');
  });
});
