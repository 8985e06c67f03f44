/**
 * Entry files: G-code and photo checks by content and storage under one key scheme. Who may read a
 * stored file is decided in one place: lib/storage/access.ts.
 */
import fs from 'node:fs';
import crypto from 'node:crypto';
import zlib from 'node:zlib';
import type { Transaction } from 'sequelize';
import { StoredFile } from '@/models';
import { HttpError } from '@/lib/errors';
import { sniffBytes, sniffFile, type SniffedType } from '@/lib/uploads/sniff';
import type { UploadSpec, UploadedFile } from '@/lib/uploads';
import { putFile, removeFile } from '@/lib/storage';
import { processPhoto, type PhotoType, type ProcessedPhoto } from '@/lib/photos';
import type { StoredFileKind } from '@/lib/domain';
import { ENTRY_DETAIL_FIELDS } from './schema';

import { GCODE_MAX_BYTES, PHOTO_MAX_BYTES, PHOTO_MAX_COUNT, PROJECT_MAX_BYTES } from './fileLimits';

export { GCODE_MAX_BYTES, PHOTO_MAX_BYTES, PHOTO_MAX_COUNT, PROJECT_MAX_BYTES };

export const ENTRY_UPLOAD_SPEC: UploadSpec = {
  files: {
    gcode: { maxBytes: GCODE_MAX_BYTES, maxCount: 1, label: 'the G-code (.gcode or .gcode.gz)' },
    photos: { maxBytes: PHOTO_MAX_BYTES, maxCount: PHOTO_MAX_COUNT, label: 'the photos' },
    project: { maxBytes: PROJECT_MAX_BYTES, maxCount: 1, label: 'the slicer settings or project file' },
  },
  fields: ENTRY_DETAIL_FIELDS as string[],
  maxTotalBytes: GCODE_MAX_BYTES + PHOTO_MAX_COUNT * PHOTO_MAX_BYTES + PROJECT_MAX_BYTES,
};

const IMAGE_NAMES: Partial<Record<SniffedType, string>> = { jpeg: 'a JPEG image', png: 'a PNG image', webp: 'a WebP image', heic: 'a HEIC photo' };

/** First bytes of a gzip stream's content (for type checks), without inflating the rest. */
async function gunzipHead(path: string, bytes = 4096): Promise<Buffer> {
  return new Promise((resolve) => {
    const chunks: Buffer[] = [];
    let got = 0;
    const src = fs.createReadStream(path, { highWaterMark: 64 * 1024 });
    const gz = zlib.createGunzip();
    const done = () => {
      src.destroy();
      gz.destroy();
      resolve(Buffer.concat(chunks).subarray(0, bytes));
    };
    gz.on('data', (d: Buffer) => {
      chunks.push(d);
      got += d.length;
      if (got >= bytes) done();
    });
    gz.on('end', done);
    gz.on('error', done);
    src.on('error', done);
    src.pipe(gz);
  });
}

export interface CheckedGcode {
  file: UploadedFile;
  gzip: boolean;
}

/** A .gcode or .gcode.gz by content: plain text or gzip of text. Anything else gets a sentence. */
export async function checkGcode(file: UploadedFile): Promise<CheckedGcode> {
  const type = await sniffFile(file.tmpPath);
  const refuse = (msg: string) => new HttpError(415, msg, { gcode: msg });
  if (type === 'text') return { file, gzip: false };
  if (type === 'gzip') {
    const inner = sniffBytes(await gunzipHead(file.tmpPath));
    if (inner === 'text') return { file, gzip: true };
    if (inner === 'bgcode') throw refuse(`${file.originalName} holds binary G-code. Export plain-text G-code instead (in PrusaSlicer: Printer Settings → General → untick "Supports binary G-code").`);
    throw refuse(`${file.originalName} is a gzip file, but what it holds is not G-code text.`);
  }
  if (type === 'bgcode') throw refuse(`${file.originalName} is binary G-code (.bgcode). Export plain-text G-code instead (in PrusaSlicer: Printer Settings → General → untick "Supports binary G-code"), optionally gzipped as .gcode.gz.`);
  if (IMAGE_NAMES[type]) throw refuse(`${file.originalName} is ${IMAGE_NAMES[type]}, not G-code. Upload the .gcode or .gcode.gz file your slicer exported.`);
  if (type === 'stl-binary') throw refuse(`${file.originalName} is an STL model, not G-code. Slice it first and upload the .gcode.`);
  throw refuse(`${file.originalName} is not G-code text. Upload the .gcode or .gcode.gz file your slicer exported.`);
}

export interface CheckedPhoto {
  processed: ProcessedPhoto;
  originalName: string;
  /** Hashes of the cleaned photo and its thumbnail, taken here: not inside the write transaction. */
  clean: { sha256: string; sizeBytes: number };
  thumb: { sha256: string; sizeBytes: number } | null;
}

/** Checks each photo by content and cleans it (location removed, thumbnail). Cleans up on failure. */
export async function checkPhotos(files: UploadedFile[]): Promise<CheckedPhoto[]> {
  const out: CheckedPhoto[] = [];
  try {
    for (const [i, f] of files.entries()) {
      const type = await sniffFile(f.tmpPath);
      if (!['jpeg', 'png', 'webp', 'heic'].includes(type)) {
        const msg = `${f.originalName} is not a JPEG, PNG, WebP or HEIC photo.`;
        throw new HttpError(415, msg, { photos: msg });
      }
      const processed = await processPhoto(f.tmpPath, type as PhotoType, `Photo ${i + 1} (${f.originalName})`);
      const [clean, thumb] = await Promise.all([sha256Of(processed.cleanPath), processed.thumbPath ? sha256Of(processed.thumbPath) : null]);
      out.push({ processed, originalName: f.originalName, clean, thumb });
    }
    return out;
  } catch (err) {
    await Promise.all(out.map((p) => p.processed.cleanup()));
    if (err instanceof HttpError && !err.fields) throw new HttpError(err.status, err.message, { photos: err.message });
    throw err;
  }
}

async function sha256Of(path: string): Promise<{ sha256: string; sizeBytes: number }> {
  const h = crypto.createHash('sha256');
  let sizeBytes = 0;
  for await (const chunk of fs.createReadStream(path)) {
    h.update(chunk as Buffer);
    sizeBytes += (chunk as Buffer).length;
  }
  return { sha256: h.digest('hex'), sizeBytes };
}

/**
 * Moves files into storage and records them, inside the caller's transaction. Every key moved is
 * pushed to `moved` so the caller can remove them if the transaction rolls back (no orphans).
 */
export class FileWriter {
  readonly moved: string[] = [];
  constructor(private readonly entryId: number, private readonly ownerId: number, private readonly transaction: Transaction) {}

  private async put(kind: StoredFileKind, tmpPath: string, ext: string, sha256: string, rest: { originalName: string; mime: string; sizeBytes: number; meta?: Record<string, unknown> }) {
    const key = `entries/${this.entryId}/${kind}-${sha256.slice(0, 16)}-${crypto.randomBytes(4).toString('hex')}.${ext}`;
    await putFile(tmpPath, key);
    this.moved.push(key);
    return StoredFile.create(
      { ownerId: this.ownerId, entryId: this.entryId, kind, sha256, storageKey: key, meta: rest.meta ?? {}, originalName: rest.originalName, mime: rest.mime, sizeBytes: rest.sizeBytes },
      { transaction: this.transaction },
    );
  }

  gcode(g: CheckedGcode) {
    return this.put('gcode', g.file.tmpPath, g.gzip ? 'gcode.gz' : 'gcode', g.file.sha256, {
      originalName: g.file.originalName,
      mime: g.gzip ? 'application/gzip' : 'text/x-gcode',
      sizeBytes: g.file.sizeBytes,
    });
  }

  project(f: UploadedFile) {
    const ext = (f.originalName.match(/\.([a-z0-9]{1,8})$/i)?.[1] ?? 'bin').toLowerCase();
    return this.put('project', f.tmpPath, ext, f.sha256, { originalName: f.originalName, mime: 'application/octet-stream', sizeBytes: f.sizeBytes });
  }

  async photo(p: CheckedPhoto, position: number) {
    const pr = p.processed;
    const clean = p.clean;
    let thumbId: number | null = null;
    if (pr.thumbPath && p.thumb) {
      const t = p.thumb;
      const thumb = await this.put('thumbnail', pr.thumbPath, 'jpg', t.sha256, { originalName: `thumb-${p.originalName}`, mime: 'image/jpeg', sizeBytes: t.sizeBytes });
      thumbId = thumb.id;
    }
    const photo = await this.put('photo', pr.cleanPath, pr.cleanExt, clean.sha256, {
      originalName: p.originalName,
      mime: pr.cleanMime,
      sizeBytes: clean.sizeBytes,
      meta: { ...pr.meta, thumbnailId: thumbId, position },
    });
    return photo;
  }

  /** Removes everything moved so far (after a rollback). */
  async undo() {
    await Promise.all(this.moved.map((k) => removeFile(k).catch(() => {})));
  }
}
