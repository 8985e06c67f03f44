/**
 * The one place files are kept. Keys are relative paths ("entries/12/gcode-<sha>.gcode.gz"); the
 * local driver stores them under HOTLAP_DATA_DIR/uploads. Callers never build disk paths
 * themselves, so a hosted object store can replace the local driver behind this interface.
 */
import fs from 'node:fs';
import fsp from 'node:fs/promises';
import path from 'node:path';
import { dataDir } from '@/lib/db';

export function storageRoot(): string {
  return path.join(dataDir(), 'uploads');
}

const KEY_RE = /^[a-z0-9][a-z0-9._/-]{0,250}$/;

function resolveKey(key: string): string {
  // Keys are ours, never user input, but check anyway: no "..", no absolute paths.
  if (!KEY_RE.test(key) || key.includes('..')) throw new Error(`Invalid storage key ${JSON.stringify(key)}`);
  return path.join(storageRoot(), key);
}

/** Moves a finished temporary upload into storage (rename when possible, copy across devices). */
export async function putFile(tmpPath: string, key: string): Promise<void> {
  const dest = resolveKey(key);
  await fsp.mkdir(path.dirname(dest), { recursive: true });
  try {
    await fsp.rename(tmpPath, dest);
  } catch (err) {
    if ((err as NodeJS.ErrnoException).code !== 'EXDEV') throw err;
    await fsp.copyFile(tmpPath, dest);
    await fsp.unlink(tmpPath);
  }
}

export async function putBuffer(key: string, data: Uint8Array): Promise<void> {
  const dest = resolveKey(key);
  await fsp.mkdir(path.dirname(dest), { recursive: true });
  await fsp.writeFile(dest, data);
}

export function openRead(key: string): fs.ReadStream {
  return fs.createReadStream(resolveKey(key));
}

/** A local path for engines that read files (the inspection engine, image tools). */
export function localPath(key: string): string {
  return resolveKey(key);
}

export async function exists(key: string): Promise<boolean> {
  return fsp.access(resolveKey(key)).then(() => true, () => false);
}

export async function removeFile(key: string): Promise<void> {
  await fsp.rm(resolveKey(key), { force: true });
}
