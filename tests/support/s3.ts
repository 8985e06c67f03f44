/**
 * A local S3 fake for tests: s3rver on a local port with a temporary folder, its bucket created
 * with the AWS SDK as any S3-compatible service would be set up. `env(prefix)` gives the variables
 * lib/storage reads (STORAGE_URL and the SDK's usual ones) for one server's objects under `prefix`.
 */
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import S3rver from 's3rver';
import { CreateBucketCommand, S3Client } from '@aws-sdk/client-s3';
import { FAKE_S3_KEY as ACCESS_KEY, fakeS3Env } from './storage';

export interface FakeS3 {
  endpoint: string;
  bucket: string;
  env(prefix: string): Record<string, string>;
  /** What the fake stored or removed, as "<S3 event name> <key>" ("ObjectCreated:Post …" ends a multipart upload). */
  events: string[];
  stop(): Promise<void>;
}

export async function startFakeS3(port: number, bucket = 'hotlap-test'): Promise<FakeS3> {
  const dir = fs.mkdtempSync(path.join(os.tmpdir(), 'hotlap-s3-'));
  const server = new S3rver({ port, address: '127.0.0.1', directory: dir, silent: true });
  const events: string[] = [];
  server.on('event', (e) => events.push(...e.Records.map((r) => `${r.eventName} ${decodeURIComponent(r.s3.object.key)}`)));
  await server.run();
  const endpoint = `http://127.0.0.1:${port}`;
  const client = new S3Client({ endpoint, region: 'us-east-1', forcePathStyle: true, credentials: { accessKeyId: ACCESS_KEY, secretAccessKey: ACCESS_KEY } });
  await client.send(new CreateBucketCommand({ Bucket: bucket }));
  client.destroy();
  return {
    endpoint,
    bucket,
    env: (prefix) => fakeS3Env(endpoint, bucket, prefix),
    events,
    async stop() {
      await server.close().catch(() => {});
      fs.rmSync(dir, { recursive: true, force: true });
    },
  };
}
