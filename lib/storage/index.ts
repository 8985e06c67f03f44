/**
 * The one place files are kept, as streams: put a stream (or a finished temporary upload), get a
 * stream, stat, delete. Nobody outside lib/storage sees a path or a bucket. The driver is chosen by
 * STORAGE_URL (lib/storage/drivers.ts): local disk under HOTLAP_DATA_DIR/uploads by default, or an
 * S3-compatible bucket. Keys are relative ("entries/12/gcode-<sha>.gcode.gz"), made by their
 * callers from ids and hashes, never from user input.
 *
 * Every web server and every inspection worker must see the same storage (the same STORAGE_URL,
 * or one shared folder), since a file put by one is read by another.
 */
import path from 'node:path';
import type { Readable } from 'node:stream';
import { dataDir } from '@/lib/db';
import { createDriver, storageConfig, STORAGE_ENV_VARS, StorageNotFoundError, type StorageDriver } from './drivers';

export { StorageNotFoundError, type StorageDriver } from './drivers';

const HOLDER = Symbol.for('hotlap.storage');
type Holder = { sig?: string; driver?: StorageDriver };
const holder = () => ((globalThis as unknown as Record<symbol, Holder>)[HOLDER] ??= {});

/** The settings as read from this process's environment (the local default under the data folder). */
function currentConfig() {
  return storageConfig(process.env, path.join(dataDir(), 'uploads'));
}

/** The driver for this process's settings (made once per setting, so tests may switch). */
export function storage(): StorageDriver {
  const config = currentConfig();
  const sig = JSON.stringify(config);
  const h = holder();
  if (!h.driver || h.sig !== sig) {
    h.driver = createDriver(config);
    h.sig = sig;
  }
  return h.driver;
}

/** Which driver is in use, for logs and the health check: 'local' or 's3'. */
export const storageKind = () => storage().kind;

/**
 * The environment a worker thread needs to open this same storage (worker threads get no other
 * environment from the server): the storage variables that are set, and the local folder made absolute.
 */
export function storageEnv(): Record<string, string> {
  const env: Record<string, string> = {};
  for (const k of STORAGE_ENV_VARS) if (process.env[k]) env[k] = process.env[k]!;
  const config = currentConfig();
  if (config.kind === 'local') env.STORAGE_URL = config.root;
  return env;
}

/** Stores a finished temporary upload under `key` and removes the temporary file. */
export function putFile(tmpPath: string, key: string): Promise<void> {
  return storage().adopt(tmpPath, key);
}

export function putStream(key: string, body: Readable, opts?: { contentType?: string }): Promise<void> {
  return storage().put(key, body, opts);
}

export function putBuffer(key: string, data: Uint8Array, opts?: { contentType?: string }): Promise<void> {
  return storage().put(key, data, opts);
}

/** A stream of the stored bytes; rejects with StorageNotFoundError when the object is gone. */
export function openRead(key: string): Promise<Readable> {
  return storage().get(key);
}

/** The whole object in memory: only for small files (photos, thumbnails), never G-code. */
export async function readBuffer(key: string, maxBytes = 64 * 1024 * 1024): Promise<Buffer> {
  const chunks: Buffer[] = [];
  let n = 0;
  for await (const c of await openRead(key)) {
    n += (c as Buffer).length;
    if (n > maxBytes) throw new Error(`Stored object ${key} is larger than ${maxBytes} bytes.`);
    chunks.push(c as Buffer);
  }
  return Buffer.concat(chunks);
}

export async function exists(key: string): Promise<boolean> {
  return (await storage().stat(key)) !== null;
}

/** Size in bytes, or null when there is no such object. */
export async function sizeOf(key: string): Promise<number | null> {
  return (await storage().stat(key))?.sizeBytes ?? null;
}

export function removeFile(key: string): Promise<void> {
  return storage().delete(key);
}

export const isStorageNotFound = (err: unknown): err is StorageNotFoundError => err instanceof StorageNotFoundError;
