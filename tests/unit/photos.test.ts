import { describe, it, expect, afterAll } from 'vitest';
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import sharp from 'sharp';
import exifr from 'exifr';
import { processPhoto, blankExifGps, exifTiffOffsets, readExif } from '@/lib/photos';

const dir = fs.mkdtempSync(path.join(os.tmpdir(), 'hotlap-photos-test-'));
afterAll(() => fs.rmSync(dir, { recursive: true, force: true }));

const GPS_EXIF = {
  IFD0: { Make: 'Invented Camera' },
  IFD2: { DateTimeOriginal: '2026:11:20 14:03:07' },
  // GPS IFD (libvips names it IFD3): 51° 30′ N, 0° 7′ W.
  IFD3: { GPSLatitudeRef: 'N', GPSLatitude: '51/1 30/1 0/1', GPSLongitudeRef: 'W', GPSLongitude: '0/1 7/1 0/1' },
};

async function photo(format: 'jpeg' | 'webp' | 'png', withGps: boolean, w = 1200, h = 800) {
  let img = sharp({ create: { width: w, height: h, channels: 3, background: '#d74707' } });
  img = format === 'jpeg' ? img.jpeg() : format === 'webp' ? img.webp() : img.png();
  if (withGps) img = img.withExif(GPS_EXIF);
  const file = path.join(dir, `in-${Math.random().toString(36).slice(2)}.${format}`);
  await img.toFile(file);
  return file;
}

describe('photo cleaning', () => {
  it('a JPEG with GPS: the stored copy has no GPS, the capture time is kept, a thumbnail is made', async () => {
    const file = await photo('jpeg', true);
    // Checked with exifr (an independent EXIF reader) that the input really carries GPS.
    expect((await exifr.gps(file))?.latitude).toBeCloseTo(51.5, 6);
    const p = await processPhoto(file, 'jpeg', 'Photo 1');
    try {
      expect(p.meta.capturedAt).toBe('2026-11-20T14:03:07');
      expect(p.meta.locationRemoved).toBe(true);
      expect(await exifr.gps(p.cleanPath)).toBeUndefined();
      const clean = await sharp(p.cleanPath).metadata();
      expect(clean.format).toBe('jpeg');
      expect(clean.exif).toBeUndefined();
      const thumb = await sharp(p.thumbPath!).metadata();
      expect(Math.max(thumb.width!, thumb.height!)).toBe(480);
      expect(await exifr.gps(p.thumbPath!)).toBeUndefined();
    } finally {
      await p.cleanup();
    }
  });

  it('a WebP with GPS is cleaned too; a PNG without metadata has no capture time', async () => {
    // exifr does not open WebP; read the TIFF block of its EXIF chunk (RFC 9649 §2.7) directly.
    const gpsOfBlocks = async (b: Buffer) => Promise.all(exifTiffOffsets(b).map((t) => exifr.gps(b.subarray(t))));
    const input = await photo('webp', true);
    expect((await gpsOfBlocks(fs.readFileSync(input)))[0]?.latitude).toBeCloseTo(51.5, 6);
    const webp = await processPhoto(input, 'webp', 'Photo 2');
    expect(webp.cleanMime).toBe('image/webp');
    expect(webp.meta).toMatchObject({ capturedAt: '2026-11-20T14:03:07', locationRemoved: true });
    expect((await gpsOfBlocks(fs.readFileSync(webp.cleanPath))).filter(Boolean)).toEqual([]);
    expect((await sharp(webp.cleanPath).metadata()).exif).toBeUndefined();
    await webp.cleanup();
    const png = await processPhoto(await photo('png', false, 300, 200), 'png', 'Photo 3');
    expect(png.meta).toMatchObject({ capturedAt: null, locationRemoved: false, widthPx: 300, heightPx: 200 });
    await png.cleanup();
  });

  it('a damaged image is refused with a sentence', async () => {
    const file = path.join(dir, 'broken.jpg');
    fs.writeFileSync(file, Buffer.concat([Buffer.from([0xff, 0xd8, 0xff, 0xe0]), Buffer.alloc(200, 7)]));
    await expect(processPhoto(file, 'jpeg', 'Photo 4')).rejects.toMatchObject({ status: 422, message: expect.stringContaining('could not be read') });
  });

  it('a HEIC header followed by junk is refused with a sentence, not stored as it came', async () => {
    // A HEIF container (ISO/IEC 23008-12 "ftyp" box, brand heic) holding an EXIF block with GPS, as
    // phones write it; the picture data is not decodable by the bundled libvips (no HEVC decoder).
    const jpeg = fs.readFileSync(await photo('jpeg', true, 16, 16));
    const exifAt = jpeg.indexOf(Buffer.from('Exif\0\0', 'latin1'));
    const app1Len = jpeg.readUInt16BE(exifAt - 2);
    const exifBlock = jpeg.subarray(exifAt, exifAt - 2 + app1Len);
    const ftyp = Buffer.concat([Buffer.from([0, 0, 0, 24]), Buffer.from('ftypheic', 'latin1'), Buffer.from([0, 0, 0, 0]), Buffer.from('mif1heic', 'latin1')]);
    const body = Buffer.concat([Buffer.from([0, 0, 0, 0]), exifBlock, Buffer.alloc(64, 0x5a)]);
    const mdat = Buffer.concat([Buffer.alloc(4), Buffer.from('mdat', 'latin1'), body]);
    mdat.writeUInt32BE(mdat.length, 0);
    const heic = Buffer.concat([ftyp, mdat]);
    const file = path.join(dir, 'phone.heic');
    fs.writeFileSync(file, heic);
    // Before: exifr reads GPS from the embedded TIFF block.
    expect((await exifr.gps(heic.subarray(exifTiffOffsets(heic)[0])))?.latitude).toBeCloseTo(51.5, 6);
    await expect(processPhoto(file, 'heic', 'Photo 5')).rejects.toMatchObject({ status: 422, message: expect.stringMatching(/Photo 5 could not be decoded.*export it as JPEG/) });
  });

  it('blankExifGps blanks the GPS directory of an EXIF block and keeps the capture time', async () => {
    const jpeg = fs.readFileSync(await photo('jpeg', true, 16, 16));
    const buf = Buffer.from(jpeg);
    expect(blankExifGps(buf)).toBe(1);
    const tiff = buf.subarray(exifTiffOffsets(buf)[0]);
    expect(await exifr.gps(tiff)).toBeUndefined();
    // The capture time survives (it lives in the EXIF sub-IFD, not the GPS one).
    expect((await readExif(tiff)).capturedAt).toBe('2026-11-20T14:03:07');
  });

  it('blankExifGps leaves a file without EXIF untouched', () => {
    const b = Buffer.from('no metadata here');
    expect(blankExifGps(b)).toBe(0);
    expect(b.toString()).toBe('no metadata here');
  });
});
