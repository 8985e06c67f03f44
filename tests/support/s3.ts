/**
 * A local S3 fake for tests: s3rver on a local port with a temporary folder, in a child process
 * (tests/support/s3-process.mjs) so that a test blocked on execFileSync does not stall it, its bucket created
 * with the AWS SDK as any S3-compatible service would be set up. `env(prefix)` gives the variables
 * lib/storage reads (STORAGE_URL and the SDK's usual ones) for one server's objects under `prefix`.
 */
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { spawn } from 'node:child_process';
import readline from 'node:readline';
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
  const events: string[] = [];
  const child = spawn(process.execPath, [path.join(__dirname, 's3-process.mjs'), String(port), dir], { stdio: ['ignore', 'pipe', 'pipe'] });
  let errors = '';
  child.stderr!.on('data', (d) => (errors += d));
  await new Promise<void>((resolve, reject) => {
    const lines = readline.createInterface({ input: child.stdout! });
    lines.on('line', (line) => {
      if (line === 'ready') return resolve();
      try {
        const e = JSON.parse(line) as { event: string; key: string };
        events.push(`${e.event} ${e.key}`);
      } catch {
        /* not an event line */
      }
    });
    child.on('exit', (code) => reject(new Error(`s3rver exited (${code}) before it listened on ${port}:\n${errors}`)));
  });
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
      if (child.exitCode === null) {
        child.kill('SIGTERM');
        await new Promise((r) => child.once('exit', r));
      }
      fs.rmSync(dir, { recursive: true, force: true });
    },
  };
}
