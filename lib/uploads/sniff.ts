/**
 * File types by content, not by name. Magic numbers: JPEG FF D8 FF (JFIF/Exif, ISO/IEC 10918-1),
 * PNG 89 50 4E 47 0D 0A 1A 0A (RFC 2083), WebP "RIFF"…"WEBP" (RFC 9649), HEIC/HEIF ISO-BMFF "ftyp"
 * box with brand heic/heix/mif1/msf1 (ISO/IEC 23008-12), gzip 1F 8B (RFC 1952), binary G-code "GCDE".
 */
import fsp from 'node:fs/promises';

export type SniffedType = 'jpeg' | 'png' | 'webp' | 'heic' | 'gzip' | 'bgcode' | 'stl-binary' | 'text' | 'binary' | 'empty';

export const MIME_OF: Partial<Record<SniffedType, string>> = {
  jpeg: 'image/jpeg',
  png: 'image/png',
  webp: 'image/webp',
  heic: 'image/heic',
  gzip: 'application/gzip',
  text: 'text/plain',
  'stl-binary': 'model/stl',
};

export function sniffBytes(head: Uint8Array, totalSize?: number): SniffedType {
  if (head.length === 0) return 'empty';
  const ascii = (from: number, to: number) => String.fromCharCode(...head.subarray(from, to));
  if (head[0] === 0xff && head[1] === 0xd8 && head[2] === 0xff) return 'jpeg';
  if (head[0] === 0x89 && ascii(1, 4) === 'PNG' && head[4] === 0x0d && head[5] === 0x0a) return 'png';
  if (ascii(0, 4) === 'RIFF' && ascii(8, 12) === 'WEBP') return 'webp';
  if (ascii(4, 8) === 'ftyp' && ['heic', 'heix', 'hevc', 'heim', 'heis', 'mif1', 'msf1'].includes(ascii(8, 12))) return 'heic';
  if (head[0] === 0x1f && head[1] === 0x8b) return 'gzip';
  if (ascii(0, 4) === 'GCDE') return 'bgcode';
  // Binary STL: 80-byte header, uint32 triangle count, 50 bytes per triangle.
  if (totalSize !== undefined && head.length >= 84) {
    const n = new DataView(head.buffer, head.byteOffset, head.byteLength).getUint32(80, true);
    if (84 + 50 * n === totalSize) return 'stl-binary';
  }
  let control = 0;
  for (const b of head) if (b === 0 || (b < 9) || (b > 13 && b < 32)) control++;
  return control === 0 ? 'text' : 'binary';
}

export async function sniffFile(filePath: string): Promise<SniffedType> {
  const fh = await fsp.open(filePath, 'r');
  try {
    const { size } = await fh.stat();
    const buf = Buffer.alloc(Math.min(4096, size));
    await fh.read(buf, 0, buf.length, 0);
    return sniffBytes(buf, size);
  } finally {
    await fh.close();
  }
}
