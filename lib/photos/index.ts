/**
 * Entry photos: read the capture time (kept for judges), remove location metadata before anyone
 * else can see the photo, and make a thumbnail.
 *
 * Decodable images (JPEG, PNG, WebP, and HEIF files the bundled libvips can decode) are re-encoded
 * by sharp, which writes no metadata unless asked (sharp docs: "withMetadata … by default all
 * metadata will be removed"), after applying the EXIF orientation so the picture stays upright.
 * HEIC photos coded with HEVC cannot be decoded by sharp's prebuilt libvips; for those the EXIF
 * GPS directory is blanked in place (same length, so the container stays valid), the original is
 * kept without a thumbnail, and the result is checked again — if GPS is still found we refuse.
 */
import fsp from 'node:fs/promises';
import os from 'node:os';
import path from 'node:path';
import crypto from 'node:crypto';
import sharp from 'sharp';
import exifr from 'exifr';
import { HttpError } from '@/lib/errors';

export type PhotoType = 'jpeg' | 'png' | 'webp' | 'heic';
export const PHOTO_TYPES: readonly PhotoType[] = ['jpeg', 'png', 'webp', 'heic'];
export const THUMBNAIL_SIZE_PX = 480;
/** Refuse decompression bombs: 100 megapixels is well above any phone camera. */
export const MAX_PHOTO_PIXELS = 100_000_000;

export interface PhotoMeta {
  /** Capture time as the camera wrote it (EXIF DateTimeOriginal, local time of the camera, no zone), ISO-like. */
  capturedAt: string | null;
  /** True when the upload carried GPS data that was removed. */
  locationRemoved: boolean;
  widthPx: number | null;
  heightPx: number | null;
  /** Why there is no thumbnail, when there is none. */
  noThumbnailReason?: string;
}

export interface ProcessedPhoto {
  /** The cleaned photo to store (a new temporary file). */
  cleanPath: string;
  cleanMime: string;
  cleanExt: string;
  /** Thumbnail JPEG (temporary file) or null. */
  thumbPath: string | null;
  meta: PhotoMeta;
  cleanup(): Promise<void>;
}

interface ExifInfo {
  capturedAt: string | null;
  hasGps: boolean;
}

/** "2026:11:20 14:03:07" → "2026-11-20T14:03:07". */
function exifDate(raw: unknown): string | null {
  if (typeof raw !== 'string') return null;
  const m = raw.match(/^(\d{4}):(\d{2}):(\d{2})[ T](\d{2}):(\d{2}):(\d{2})/);
  return m ? `${m[1]}-${m[2]}-${m[3]}T${m[4]}:${m[5]}:${m[6]}` : null;
}

async function parseTags(input: string | Buffer): Promise<ExifInfo | null> {
  const tags = (await exifr.parse(input, { tiff: true, exif: true, gps: true, reviveValues: false, translateValues: false })) as Record<string, unknown> | undefined;
  if (!tags) return null;
  const hasGps = Object.keys(tags).some((k) => k.startsWith('GPS') || k === 'latitude' || k === 'longitude');
  return { capturedAt: exifDate(tags.DateTimeOriginal) ?? exifDate(tags.CreateDate) ?? null, hasGps };
}

/**
 * Capture time and GPS presence. exifr reads JPEG, PNG, HEIC and TIFF containers; for the others
 * (WebP) and as a fallback we read every embedded "Exif\0\0" TIFF block directly.
 */
export async function readExif(input: string | Buffer): Promise<ExifInfo> {
  const found: ExifInfo = { capturedAt: null, hasGps: false };
  try {
    const direct = await parseTags(input);
    if (direct) return direct;
  } catch {
    /* container exifr does not know: try the embedded blocks */
  }
  try {
    const buf = typeof input === 'string' ? await fsp.readFile(input) : input;
    for (const t of exifTiffOffsets(buf)) {
      const info = await parseTags(buf.subarray(t)).catch(() => null);
      if (!info) continue;
      found.capturedAt ??= info.capturedAt;
      found.hasGps ||= info.hasGps;
    }
  } catch {
    // Unreadable metadata is not an error: the photo simply has no capture time we can trust.
  }
  return found;
}

const TYPE_SIZES: Record<number, number> = { 1: 1, 2: 1, 3: 2, 4: 4, 5: 8, 6: 1, 7: 1, 8: 2, 9: 4, 10: 8, 11: 4, 12: 8 };
const GPS_IFD_TAG = 0x8825;

/** Offsets of TIFF headers that follow an "Exif\0\0" marker (JPEG APP1, WebP/PNG chunks, HEIF Exif item). */
export function exifTiffOffsets(buf: Buffer): number[] {
  const out: number[] = [];
  const marker = Buffer.from('Exif\0\0', 'latin1');
  let i = buf.indexOf(marker);
  while (i >= 0) {
    const t = i + marker.length;
    if (t + 8 <= buf.length && ((buf[t] === 0x49 && buf[t + 1] === 0x49 && buf[t + 2] === 0x2a) || (buf[t] === 0x4d && buf[t + 1] === 0x4d && buf[t + 3] === 0x2a))) out.push(t);
    i = buf.indexOf(marker, i + 1);
  }
  return out;
}

/**
 * Blanks the GPS IFD of every EXIF block in `buf`, in place (TIFF 6.0 layout: 2-byte entry count,
 * 12-byte entries, values over 4 bytes stored at an offset). Returns the number of GPS IFDs blanked.
 */
export function blankExifGps(buf: Buffer): number {
  let blanked = 0;
  for (const t of exifTiffOffsets(buf)) {
    const le = buf[t] === 0x49;
    const u16 = (o: number) => (le ? buf.readUInt16LE(o) : buf.readUInt16BE(o));
    const u32 = (o: number) => (le ? buf.readUInt32LE(o) : buf.readUInt32BE(o));
    const inside = (o: number, n: number) => o >= t && o + n <= buf.length;
    const ifd0 = t + u32(t + 4);
    if (!inside(ifd0, 2)) continue;
    const n0 = u16(ifd0);
    for (let e = 0; e < n0; e++) {
      const entry = ifd0 + 2 + e * 12;
      if (!inside(entry, 12) || u16(entry) !== GPS_IFD_TAG) continue;
      const gps = t + u32(entry + 8);
      if (!inside(gps, 2)) continue;
      const n = u16(gps);
      for (let g = 0; g < n; g++) {
        const ge = gps + 2 + g * 12;
        if (!inside(ge, 12)) break;
        const bytes = (TYPE_SIZES[u16(ge + 2)] ?? 1) * u32(ge + 4);
        if (bytes > 4) {
          const at = t + u32(ge + 8);
          if (inside(at, bytes)) buf.fill(0, at, at + bytes);
        }
        buf.fill(0, ge, ge + 12);
      }
      // An empty GPS directory: readers find no entries.
      buf.fill(0, gps, gps + 2);
      blanked++;
    }
  }
  return blanked;
}

const OUTPUT: Record<PhotoType, { mime: string; ext: string }> = {
  jpeg: { mime: 'image/jpeg', ext: 'jpg' },
  png: { mime: 'image/png', ext: 'png' },
  webp: { mime: 'image/webp', ext: 'webp' },
  // A decodable HEIF is re-encoded as JPEG so every browser can show it.
  heic: { mime: 'image/jpeg', ext: 'jpg' },
};

/**
 * Cleans one uploaded photo. Throws a 422 HttpError with a sentence for photos we cannot make safe.
 * A photo must decode: a file that only starts like an image (a HEIC header followed by anything)
 * is refused, never stored as it came. The bundled libvips decodes HEIF only with AV1 coding (AVIF),
 * so an HEVC-coded phone HEIC is refused too, with the way out (share or export it as JPEG).
 */
export async function processPhoto(tmpPath: string, type: PhotoType, label: string): Promise<ProcessedPhoto> {
  const dir = await fsp.mkdtemp(path.join(os.tmpdir(), 'hotlap-photo-'));
  const cleanup = () => fsp.rm(dir, { recursive: true, force: true });
  const id = crypto.randomBytes(6).toString('hex');
  try {
    const exif = await readExif(tmpPath);
    let widthPx: number | null = null;
    let heightPx: number | null = null;
    try {
      const m = await sharp(tmpPath, { limitInputPixels: MAX_PHOTO_PIXELS }).metadata();
      widthPx = m.autoOrient?.width ?? m.width ?? null;
      heightPx = m.autoOrient?.height ?? m.height ?? null;
      // metadata() reads headers only; a damaged or HEVC-coded file fails at decode, so decode a tiny copy.
      await sharp(tmpPath, { limitInputPixels: MAX_PHOTO_PIXELS }).resize(8, 8).raw().toBuffer();
    } catch (err) {
      const msg = (err as Error).message ?? '';
      if (/pixel limit/i.test(msg)) throw new HttpError(422, `${label} is larger than ${MAX_PHOTO_PIXELS / 1e6} megapixels; resize it and try again.`);
      if (type === 'heic')
        throw new HttpError(422, `${label} could not be decoded as a HEIC photo here (damaged, or coded in a way we cannot read). Share or export it as JPEG (most phones do this when sharing) and upload again.`);
      throw new HttpError(422, `${label} could not be read as an image; it may be damaged. Export it again as JPEG or PNG.`);
    }

    const out = OUTPUT[type];
    const cleanPath = path.join(dir, `clean-${id}.${out.ext}`);
    const thumbPath = path.join(dir, `thumb-${id}.jpg`);
    const base = () => sharp(tmpPath, { limitInputPixels: MAX_PHOTO_PIXELS }).rotate();
    const clean = base();
    if (out.ext === 'jpg') clean.jpeg({ quality: 90 });
    else if (out.ext === 'png') clean.png();
    else clean.webp({ quality: 90 });
    await clean.toFile(cleanPath);
    await base().resize(THUMBNAIL_SIZE_PX, THUMBNAIL_SIZE_PX, { fit: 'inside', withoutEnlargement: true }).jpeg({ quality: 80 }).toFile(thumbPath);
    return {
      cleanPath, cleanMime: out.mime, cleanExt: out.ext, thumbPath,
      meta: { capturedAt: exif.capturedAt, locationRemoved: exif.hasGps, widthPx, heightPx },
      cleanup,
    };
  } catch (err) {
    await cleanup();
    throw err;
  }
}
