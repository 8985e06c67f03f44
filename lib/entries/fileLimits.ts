/**
 * Entry file limits and accepted types: one definition for the server's upload spec
 * (lib/entries/files.ts) and the browser's drop areas, which refuse a wrong file at once with the
 * same limits. Client-safe (no server imports). The server still checks every file by its content.
 */
import { formatBytes } from '@/lib/format';

const MB = 1024 * 1024;
export const GCODE_MAX_BYTES = 200 * MB;
export const PHOTO_MAX_BYTES = 20 * MB;
export const PHOTO_MAX_COUNT = 6;
export const PROJECT_MAX_BYTES = 20 * MB;

/** File-name endings of G-code as slicers export it, plain or gzipped. */
export const GCODE_EXTENSIONS = ['.gcode', '.gco', '.g', '.gcode.gz', '.gco.gz', '.g.gz', '.gz'] as const;
export const PHOTO_EXTENSIONS = ['.jpg', '.jpeg', '.png', '.webp', '.heic', '.heif'] as const;
export const PHOTO_MIME_TYPES = ['image/jpeg', 'image/png', 'image/webp', 'image/heic', 'image/heif'] as const;

/** What the browser knows of a chosen file before anything is uploaded. */
export interface PickedFile {
  name: string;
  size: number;
  type: string;
}

const mb = (n: number) => `${Math.round(n / MB)} MB`;
const endsWithAny = (name: string, exts: readonly string[]) => exts.some((e) => name.toLowerCase().endsWith(e));

/**
 * The sentence for a file that cannot be the entry's G-code, judged by its name and size (the
 * server then checks the content); null when it may be.
 */
export function gcodeFileProblem(f: PickedFile): string | null {
  const n = f.name.toLowerCase();
  if (n.endsWith('.bgcode')) return `${f.name} is binary G-code (.bgcode). Export plain-text G-code instead, optionally gzipped as .gcode.gz.`;
  if (n.endsWith('.stl') || n.endsWith('.3mf')) return `${f.name} is a 3-D model, not G-code. Slice it first and add the .gcode your slicer exports.`;
  if (endsWithAny(n, PHOTO_EXTENSIONS) || f.type.startsWith('image/')) return `${f.name} is a photo, not G-code. Add it under Photos, and the .gcode or .gcode.gz here.`;
  if (!endsWithAny(n, GCODE_EXTENSIONS)) return `${f.name} is not a .gcode or .gcode.gz file. Add the G-code your slicer exported.`;
  if (f.size === 0) return `${f.name} is empty.`;
  if (f.size > GCODE_MAX_BYTES) return `${f.name} is ${formatBytes(f.size)}; the G-code may be at most ${mb(GCODE_MAX_BYTES)}. Gzip it (.gcode.gz) to make it smaller.`;
  return null;
}

/** The sentence for a file that cannot be a photo of the entry (name, type, size); null when it may be. */
export function photoFileProblem(f: PickedFile): string | null {
  const typed = (PHOTO_MIME_TYPES as readonly string[]).includes(f.type.toLowerCase());
  if (!typed && !endsWithAny(f.name, PHOTO_EXTENSIONS)) return `${f.name} is not a JPEG, PNG, WebP or HEIC photo.`;
  if (f.size === 0) return `${f.name} is empty.`;
  if (f.size > PHOTO_MAX_BYTES) return `${f.name} is ${formatBytes(f.size)}; each photo may be at most ${mb(PHOTO_MAX_BYTES)}.`;
  return null;
}

/** The sentence for a slicer settings or project file that cannot be stored; null when it may be. */
export function projectFileProblem(f: PickedFile): string | null {
  if (f.size === 0) return `${f.name} is empty.`;
  if (f.size > PROJECT_MAX_BYTES) return `${f.name} is ${formatBytes(f.size)}; the project file may be at most ${mb(PROJECT_MAX_BYTES)}.`;
  return null;
}

/** The sentence when more photos were chosen than an entry keeps; null when the count is fine. */
export function photoCountProblem(count: number): string | null {
  return count > PHOTO_MAX_COUNT ? `An entry keeps at most ${PHOTO_MAX_COUNT} photos; you chose ${count}. Keep the ones that show the piece best.` : null;
}
