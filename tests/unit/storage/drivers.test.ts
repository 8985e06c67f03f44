/**
 * The storage drivers, the same checks on both: local disk in a temporary folder, and S3 through
 * the AWS SDK against s3rver (a local S3 fake) on a local port. Put a stream and a buffer, get a
 * stream, stat, list, delete, a clear "not found", and a >5 MB file sent to S3 in parts (read back
 * from the fake's own event for a completed multipart upload).
 */
import { describe, it, expect, beforeAll, afterAll, vi } from 'vitest';
import crypto from 'node:crypto';
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { Readable } from 'node:stream';
import { createDriver, storageConfig, StorageNotFoundError, S3_PART_BYTES, type StorageDriver } from '@/lib/storage/drivers';
import { startFakeS3, type FakeS3 } from '../../support/s3';

const PORT = Number(process.env.HOTLAP_TEST_S3_PORT || 4570) + 2;
const dir = fs.mkdtempSync(path.join(os.tmpdir(), 'hotlap-storage-'));
let s3: FakeS3;

beforeAll(async () => {
  s3 = await startFakeS3(PORT);
}, 60_000);

afterAll(async () => {
  await s3?.stop();
  fs.rmSync(dir, { recursive: true, force: true });
});

async function readAll(r: Readable): Promise<Buffer> {
  const chunks: Buffer[] = [];
  for await (const c of r) chunks.push(c as Buffer);
  return Buffer.concat(chunks);
}

const sha = (b: Buffer) => crypto.createHash('sha256').update(b).digest('hex');

const drivers: Record<string, () => StorageDriver> = {
  local: () => createDriver(storageConfig({}, path.join(dir, 'uploads'))),
  s3: () => createDriver(storageConfig(s3.env('unit'), '/nowhere')),
};

describe('storage settings', () => {
  it('reads STORAGE_URL: unset is local under the default folder, s3:// names bucket and prefix', () => {
    expect(storageConfig({}, '/data/uploads')).toEqual({ kind: 'local', root: '/data/uploads' });
    expect(storageConfig({ STORAGE_URL: 's3://club-files/hotlap/prod/', S3_ENDPOINT: 'http://127.0.0.1:9000', S3_FORCE_PATH_STYLE: 'true', AWS_REGION: 'eu-west-1', AWS_ACCESS_KEY_ID: 'k', AWS_SECRET_ACCESS_KEY: 's' }, '/x')).toEqual({
      kind: 's3', bucket: 'club-files', prefix: 'hotlap/prod/', endpoint: 'http://127.0.0.1:9000', region: 'eu-west-1', forcePathStyle: true, credentials: { accessKeyId: 'k', secretAccessKey: 's' },
    });
    expect(storageConfig({ STORAGE_URL: 's3://club-files' }, '/x')).toMatchObject({ kind: 's3', prefix: '', region: 'us-east-1', forcePathStyle: false });
    expect(() => storageConfig({ STORAGE_URL: 's3://' }, '/x')).toThrow(/does not name a bucket/);
    expect(() => storageConfig({ STORAGE_URL: 'gs://bucket' }, '/x')).toThrow(/only s3:\/\/bucket\/prefix or a local folder/);
  });
});

describe.each(Object.keys(drivers))('%s driver', (name) => {
  let d: StorageDriver;
  beforeAll(() => {
    d = drivers[name]();
  });

  it('puts a stream and a buffer, gets them back byte for byte, stats and lists them', async () => {
    const a = crypto.randomBytes(300_000);
    await d.put('entries/1/gcode-a.gcode', Readable.from([a.subarray(0, 100_000), a.subarray(100_000)]));
    await d.put('entries/1/photo-b.jpg', Buffer.from('jpeg bytes'), { contentType: 'image/jpeg' });
    expect(sha(await readAll(await d.get('entries/1/gcode-a.gcode')))).toBe(sha(a));
    expect((await readAll(await d.get('entries/1/photo-b.jpg'))).toString()).toBe('jpeg bytes');
    expect(await d.stat('entries/1/gcode-a.gcode')).toEqual({ sizeBytes: 300_000 });
    expect(await d.list('entries/1/')).toEqual(['entries/1/gcode-a.gcode', 'entries/1/photo-b.jpg']);
    // A put replaces what was there.
    await d.put('entries/1/photo-b.jpg', Buffer.from('second'));
    expect((await readAll(await d.get('entries/1/photo-b.jpg'))).toString()).toBe('second');
  });

  it('a missing object is a StorageNotFoundError on get and null on stat; delete of a missing one is no error', async () => {
    const err = await d.get('entries/404/none.gcode').then(() => null, (e: unknown) => e);
    expect(err).toBeInstanceOf(StorageNotFoundError);
    expect((err as Error).message).toBe('No stored object under "entries/404/none.gcode".');
    expect(await d.stat('entries/404/none.gcode')).toBeNull();
    await d.put('entries/2/gone.bin', Buffer.from('x'));
    await d.delete('entries/2/gone.bin');
    await d.delete('entries/2/gone.bin');
    expect(await d.stat('entries/2/gone.bin')).toBeNull();
    expect(await d.list('entries/2/')).toEqual([]);
  });

  it('adopts a finished temporary upload and removes the temporary file', async () => {
    const tmp = path.join(dir, `upload-${name}.tmp`);
    fs.writeFileSync(tmp, 'G1 X1 Y1\n');
    await d.adopt(tmp, 'entries/3/gcode-c.gcode');
    expect(fs.existsSync(tmp)).toBe(false);
    expect((await readAll(await d.get('entries/3/gcode-c.gcode'))).toString()).toBe('G1 X1 Y1\n');
  });

  it('refuses keys that could leave its folder or prefix', async () => {
    await expect(d.put('../escape', Buffer.from('x'))).rejects.toThrow(/Invalid storage key/);
    await expect(d.get('/etc/passwd')).rejects.toThrow(/Invalid storage key/);
    await expect(d.stat('entries//x')).rejects.toThrow(/Invalid storage key/);
  });

  it('stores a file over 5 MB (S3: in parts) and streams it back intact', async () => {
    const big = crypto.randomBytes(S3_PART_BYTES + 4 * 1024 * 1024);
    // Given as many small chunks, as a file stream would.
    const chunks = Array.from({ length: Math.ceil(big.length / 65536) }, (_, i) => big.subarray(i * 65536, (i + 1) * 65536));
    await d.put('entries/4/gcode-big.gcode', Readable.from(chunks));
    expect(await d.stat('entries/4/gcode-big.gcode')).toEqual({ sizeBytes: big.length });
    expect(sha(await readAll(await d.get('entries/4/gcode-big.gcode')))).toBe(sha(big));
    if (name === 's3') {
      // Seen by the fake itself: the big file ended a multipart upload (S3's "ObjectCreated:Post"
      // event for CompleteMultipartUpload); the small ones were single PUTs.
      await vi.waitFor(() => expect(s3.events).toContain('ObjectCreated:Post unit/entries/4/gcode-big.gcode'));
      await vi.waitFor(() => expect(s3.events).toContain('ObjectCreated:Put unit/entries/1/photo-b.jpg'));
    }
  });
});
