/**
 * The storage drivers behind lib/storage: local disk (the default) and S3-compatible object storage.
 * Both take and give streams; neither lets a path or a bucket name out. This module reads no
 * database and no framework, so the inspection worker (a worker thread, or a worker process on
 * another machine) bundles it and reads its G-code from storage itself.
 *
 * Which driver: `STORAGE_URL`. Unset (or `file:` / a plain folder) → local disk under the folder
 * (default HOTLAP_DATA_DIR/uploads); `s3://bucket/optional/prefix` → that bucket, configured from
 * the AWS SDK's usual variables: `S3_ENDPOINT` (an S3-compatible service; unset for AWS itself),
 * `AWS_REGION`, `AWS_ACCESS_KEY_ID` / `AWS_SECRET_ACCESS_KEY` (or any credential the SDK's default
 * chain finds), `S3_FORCE_PATH_STYLE=1` for services that do not serve bucket sub-domains.
 */
import fs from 'node:fs';
import fsp from 'node:fs/promises';
import path from 'node:path';
import crypto from 'node:crypto';
import { Readable } from 'node:stream';
import { pipeline } from 'node:stream/promises';

export interface StoredObjectInfo {
  sizeBytes: number;
}

/** What every driver does. Keys are relative, slash-separated ("entries/12/gcode-….gcode.gz"). */
export interface StorageDriver {
  readonly kind: 'local' | 's3';
  /** Stores the stream's bytes under `key` (replacing any object there); big objects go up in parts. */
  put(key: string, body: Readable | Uint8Array, opts?: { contentType?: string }): Promise<void>;
  /** A stream of the object's bytes; rejects with StorageNotFoundError when there is none. */
  get(key: string): Promise<Readable>;
  /** Size of the object, or null when there is none. */
  stat(key: string): Promise<StoredObjectInfo | null>;
  /** Removes the object; no error when it is already gone. */
  delete(key: string): Promise<void>;
  /** Keys under a prefix (operators' checks and tests; not for request paths). */
  list(prefix: string): Promise<string[]>;
  /**
   * Takes over a finished temporary file (an upload formidable wrote): the local driver renames it
   * when it can, others stream it up and remove it. The temporary file is gone afterwards.
   */
  adopt(tmpPath: string, key: string): Promise<void>;
}

export class StorageNotFoundError extends Error {
  readonly code = 'not-found';
  constructor(public readonly key: string) {
    super(`No stored object under ${JSON.stringify(key)}.`);
    this.name = 'StorageNotFoundError';
  }
}

const KEY_RE = /^[a-z0-9][a-z0-9._/-]{0,250}$/;

/** Keys are ours, never user input, but check anyway: no "..", no absolute paths, no odd characters. */
export function checkKey(key: string): string {
  if (!KEY_RE.test(key) || key.includes('..') || key.includes('//')) throw new Error(`Invalid storage key ${JSON.stringify(key)}`);
  return key;
}

/** The environment variables the drivers read (handed to worker threads, which get no other environment). */
export const STORAGE_ENV_VARS = [
  'STORAGE_URL', 'S3_ENDPOINT', 'S3_FORCE_PATH_STYLE', 'AWS_REGION', 'AWS_DEFAULT_REGION',
  'AWS_ACCESS_KEY_ID', 'AWS_SECRET_ACCESS_KEY', 'AWS_SESSION_TOKEN', 'AWS_PROFILE',
] as const;

export type StorageConfig =
  | { kind: 'local'; root: string }
  | {
      kind: 's3'; bucket: string; prefix: string; endpoint?: string; region: string; forcePathStyle: boolean;
      /** From the given environment when both keys are set; otherwise the SDK's default credential chain. */
      credentials?: { accessKeyId: string; secretAccessKey: string; sessionToken?: string };
    };

const truthy = (v: string | undefined) => !!v && /^(1|true|yes|on)$/i.test(v.trim());

/** Reads the driver's settings from an environment; `defaultRoot` is the local folder when STORAGE_URL names none. */
export function storageConfig(env: Record<string, string | undefined>, defaultRoot: string): StorageConfig {
  const url = env.STORAGE_URL?.trim();
  if (!url) return { kind: 'local', root: path.resolve(defaultRoot) };
  if (url.startsWith('s3://')) {
    const rest = url.slice('s3://'.length);
    const slash = rest.indexOf('/');
    const bucket = slash < 0 ? rest : rest.slice(0, slash);
    const prefix = (slash < 0 ? '' : rest.slice(slash + 1)).replace(/^\/+|\/+$/g, '');
    if (!/^[a-z0-9][a-z0-9.-]{1,62}$/.test(bucket)) throw new Error(`STORAGE_URL ${JSON.stringify(url)} does not name a bucket (s3://bucket/optional/prefix).`);
    return {
      kind: 's3',
      bucket,
      prefix: prefix ? `${prefix}/` : '',
      endpoint: env.S3_ENDPOINT?.trim() || undefined,
      region: env.AWS_REGION?.trim() || env.AWS_DEFAULT_REGION?.trim() || 'us-east-1',
      forcePathStyle: truthy(env.S3_FORCE_PATH_STYLE),
      ...(env.AWS_ACCESS_KEY_ID && env.AWS_SECRET_ACCESS_KEY
        ? { credentials: { accessKeyId: env.AWS_ACCESS_KEY_ID, secretAccessKey: env.AWS_SECRET_ACCESS_KEY, ...(env.AWS_SESSION_TOKEN ? { sessionToken: env.AWS_SESSION_TOKEN } : {}) } }
        : {}),
    };
  }
  if (url.startsWith('file://')) return { kind: 'local', root: path.resolve(new URL(url).pathname) };
  if (/^[a-z][a-z0-9+.-]*:\/\//i.test(url)) throw new Error(`STORAGE_URL ${JSON.stringify(url)}: only s3://bucket/prefix or a local folder is supported.`);
  return { kind: 'local', root: path.resolve(url) };
}

export function createDriver(config: StorageConfig): StorageDriver {
  return config.kind === 'local' ? new LocalDriver(config.root) : new S3Driver(config);
}

const toStream = (body: Readable | Uint8Array) => (body instanceof Readable ? body : Readable.from([Buffer.from(body.buffer, body.byteOffset, body.byteLength)]));

export class LocalDriver implements StorageDriver {
  readonly kind = 'local' as const;
  constructor(private readonly root: string) {}

  private file(key: string) {
    return path.join(this.root, checkKey(key));
  }

  async put(key: string, body: Readable | Uint8Array) {
    const dest = this.file(key);
    await fsp.mkdir(path.dirname(dest), { recursive: true });
    // Written beside the key, then renamed: a reader never sees half an object.
    const part = `${dest}.part-${crypto.randomBytes(4).toString('hex')}`;
    try {
      await pipeline(toStream(body), fs.createWriteStream(part, { flags: 'wx' }));
      await fsp.rename(part, dest);
    } catch (err) {
      await fsp.rm(part, { force: true });
      throw err;
    }
  }

  async get(key: string): Promise<Readable> {
    const file = this.file(key);
    // Open first, so a missing file is a rejection here and not an error event on a stream already handed out.
    const fh = await fsp.open(file, 'r').catch((err: NodeJS.ErrnoException) => {
      if (err.code === 'ENOENT' || err.code === 'ENOTDIR') throw new StorageNotFoundError(key);
      throw err;
    });
    return fh.createReadStream({ highWaterMark: 1024 * 1024 });
  }

  async stat(key: string) {
    const st = await fsp.stat(this.file(key)).catch(() => null);
    return st?.isFile() ? { sizeBytes: st.size } : null;
  }

  async delete(key: string) {
    await fsp.rm(this.file(key), { force: true });
  }

  async list(prefix: string) {
    const dir = path.join(this.root, prefix);
    const out: string[] = [];
    const walk = async (d: string): Promise<void> => {
      const items = await fsp.readdir(d, { withFileTypes: true }).catch(() => []);
      for (const it of items) {
        const p = path.join(d, it.name);
        if (it.isDirectory()) await walk(p);
        else if (!it.name.includes('.part-')) out.push(path.relative(this.root, p).split(path.sep).join('/'));
      }
    };
    await walk(prefix.endsWith('/') || !prefix ? dir : path.dirname(dir));
    return out.filter((k) => k.startsWith(prefix)).sort();
  }

  async adopt(tmpPath: string, key: string) {
    const dest = this.file(key);
    await fsp.mkdir(path.dirname(dest), { recursive: true });
    try {
      await fsp.rename(tmpPath, dest);
    } catch (err) {
      if ((err as NodeJS.ErrnoException).code !== 'EXDEV') throw err;
      await this.put(key, fs.createReadStream(tmpPath));
      await fsp.unlink(tmpPath);
    }
  }
}

/** Parts of 8 MiB (S3's minimum part is 5 MiB), two in flight: an upload holds at most ~16 MiB in memory. */
export const S3_PART_BYTES = 8 * 1024 * 1024;

type S3Module = typeof import('@aws-sdk/client-s3');

export class S3Driver implements StorageDriver {
  readonly kind = 's3' as const;
  private sdk?: Promise<{ s3: S3Module; client: import('@aws-sdk/client-s3').S3Client; Upload: typeof import('@aws-sdk/lib-storage').Upload }>;
  constructor(private readonly config: Extract<StorageConfig, { kind: 's3' }>) {}

  /** The SDK is loaded on first use, so a server on local disk never loads it. */
  private load() {
    return (this.sdk ??= (async () => {
      const [s3, lib] = await Promise.all([import('@aws-sdk/client-s3'), import('@aws-sdk/lib-storage')]);
      const client = new s3.S3Client({
        region: this.config.region,
        endpoint: this.config.endpoint,
        forcePathStyle: this.config.forcePathStyle,
        credentials: this.config.credentials,
        // Checksums only where the service asks for them: S3-compatible services differ in support.
        requestChecksumCalculation: 'WHEN_REQUIRED',
        responseChecksumValidation: 'WHEN_REQUIRED',
      });
      return { s3, client, Upload: lib.Upload };
    })());
  }

  private objectKey(key: string) {
    return this.config.prefix + checkKey(key);
  }

  async put(key: string, body: Readable | Uint8Array, opts: { contentType?: string } = {}) {
    const { Upload, client } = await this.load();
    const upload = new Upload({
      client,
      params: { Bucket: this.config.bucket, Key: this.objectKey(key), Body: body instanceof Readable ? body : Buffer.from(body), ContentType: opts.contentType ?? 'application/octet-stream' },
      partSize: S3_PART_BYTES,
      queueSize: 2,
      // A failed multipart upload is aborted, so no half-uploaded parts are left to pay for.
      leavePartsOnError: false,
    });
    await upload.done();
  }

  async get(key: string): Promise<Readable> {
    const { s3, client } = await this.load();
    try {
      const out = await client.send(new s3.GetObjectCommand({ Bucket: this.config.bucket, Key: this.objectKey(key) }));
      if (!out.Body) throw new StorageNotFoundError(key);
      return out.Body as Readable;
    } catch (err) {
      if (isNotFound(err)) throw new StorageNotFoundError(key);
      throw err;
    }
  }

  async stat(key: string) {
    const { s3, client } = await this.load();
    try {
      const out = await client.send(new s3.HeadObjectCommand({ Bucket: this.config.bucket, Key: this.objectKey(key) }));
      return { sizeBytes: Number(out.ContentLength ?? 0) };
    } catch (err) {
      if (isNotFound(err)) return null;
      throw err;
    }
  }

  async delete(key: string) {
    const { s3, client } = await this.load();
    await client.send(new s3.DeleteObjectCommand({ Bucket: this.config.bucket, Key: this.objectKey(key) }));
  }

  async list(prefix: string) {
    const { s3, client } = await this.load();
    const out: string[] = [];
    let token: string | undefined;
    do {
      const page = await client.send(new s3.ListObjectsV2Command({ Bucket: this.config.bucket, Prefix: this.config.prefix + prefix, ContinuationToken: token }));
      for (const o of page.Contents ?? []) if (o.Key) out.push(o.Key.slice(this.config.prefix.length));
      token = page.IsTruncated ? page.NextContinuationToken : undefined;
    } while (token);
    return out.sort();
  }

  async adopt(tmpPath: string, key: string) {
    await this.put(key, fs.createReadStream(tmpPath));
    await fsp.unlink(tmpPath);
  }
}

function isNotFound(err: unknown): boolean {
  const e = err as { name?: string; Code?: string; $metadata?: { httpStatusCode?: number } };
  // A missing bucket is a setting to fix, not a missing file: let it through as the error it is.
  if (e?.name === 'NoSuchBucket' || e?.Code === 'NoSuchBucket') return false;
  return e?.name === 'NoSuchKey' || e?.name === 'NotFound' || e?.Code === 'NoSuchKey' || e?.$metadata?.httpStatusCode === 404;
}
