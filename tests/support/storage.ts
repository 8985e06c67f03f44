/**
 * Stored files in tests, on whichever storage the test server uses: local disk under the server's
 * data folder, or the S3 fake when the suite runs with HOTLAP_TEST_STORAGE=s3 (global-setup starts
 * it and passes its settings in HOTLAP_TEST_S3). Tests put fixtures and list objects through this,
 * never through paths, so the same test passes on both drivers.
 */
import path from 'node:path';
import { createDriver, storageConfig, type StorageDriver } from '@/lib/storage/drivers';
import { fakeS3Env } from './s3';

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
