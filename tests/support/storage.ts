/**
 * Stored files in tests, on whichever storage the test server uses: local disk under the server's
 * data folder, or the S3 fake when the suite runs with HOTLAP_TEST_STORAGE=s3 (global-setup starts
 * it and passes its settings in HOTLAP_TEST_S3). Tests put fixtures and list objects through this,
 * never through paths, so the same test passes on both drivers.
 */
import path from 'node:path';
import { createDriver, storageConfig, type StorageDriver } from '@/lib/storage/drivers';

/** s3rver's fixed credentials (its defaults): a test fake, not a secret. */
export const FAKE_S3_KEY = 'S3RVER';

/** The variables lib/storage reads, for objects under `prefix` in the fake's bucket. */
export function fakeS3Env(endpoint: string, bucket: string, prefix: string): Record<string, string> {
  return {
    STORAGE_URL: `s3://${bucket}/${prefix}`,
    S3_ENDPOINT: endpoint,
    S3_FORCE_PATH_STYLE: '1',
    AWS_REGION: 'us-east-1',
    AWS_ACCESS_KEY_ID: FAKE_S3_KEY,
    AWS_SECRET_ACCESS_KEY: FAKE_S3_KEY,
  };
}

/** The storage variables for a server whose data folder is `dataDir` ({} on local disk). Each data folder gets its own prefix in the bucket. */
export function testStorageEnv(dataDir: string): Record<string, string> {
  const s3 = process.env.HOTLAP_TEST_S3;
  if (!s3) return {};
  const { endpoint, bucket } = JSON.parse(s3) as { endpoint: string; bucket: string };
  return fakeS3Env(endpoint, bucket, path.basename(dataDir));
}

/** The storage driver of the server with data folder `dataDir` (the integration tests: path.dirname(dbFile)). */
export function testStorage(dataDir: string): StorageDriver {
  return createDriver(storageConfig(testStorageEnv(dataDir), path.join(dataDir, 'uploads')));
}

/** Stores `bytes` under `key` on the storage of the server with data folder `dataDir` (fixtures a test inserts itself). */
export function putTestFile(dataDir: string, key: string, bytes: Uint8Array): Promise<void> {
  return testStorage(dataDir).put(key, bytes);
}

/** Keys stored under `prefix` on that server's storage, sorted. */
export function listTestFiles(dataDir: string, prefix: string): Promise<string[]> {
  return testStorage(dataDir).list(prefix);
}
