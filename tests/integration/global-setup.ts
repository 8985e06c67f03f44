import type { TestProject } from 'vitest/node';
import { startServer, type TestServer } from '../support/server';
import { startCluster, type Cluster } from '../support/postgres';
import { startFakeS3, type FakeS3 } from '../support/s3';

let server: TestServer | undefined;
let cluster: Cluster | undefined;
let s3: FakeS3 | undefined;

export default async function setup(project: TestProject) {
  const port = Number(process.env.HOTLAP_TEST_PORT || 3100);
  // HOTLAP_TEST_STORAGE=s3: files go to a local S3 fake (s3rver); every server the tests start
  // gets its STORAGE_URL through testEnv (tests/support/storage.ts reads HOTLAP_TEST_S3).
  if (process.env.HOTLAP_TEST_STORAGE === 's3') {
    s3 = await startFakeS3(Number(process.env.HOTLAP_TEST_S3_PORT || 4570));
    process.env.HOTLAP_TEST_S3 = JSON.stringify({ endpoint: s3.endpoint, bucket: s3.bucket });
  }
  if (process.env.HOTLAP_TEST_DB === 'postgres') {
    // One cluster for the run; every test server gets its own database on it (tests/support/server.ts).
    cluster = startCluster(Number(process.env.HOTLAP_TEST_PG_PORT || port + 2400));
    process.env.HOTLAP_TEST_PG_URL = cluster.url;
  }
  try {
    server = await startServer(port);
  } catch (e) {
    cluster?.stop();
    await s3?.stop();
    throw e;
  }
  project.provide('baseUrl', server.url);
  project.provide('dbFile', server.dbFile);
  return async () => {
    await server?.stop();
    cluster?.stop();
    await s3?.stop();
  };
}

declare module 'vitest' {
  export interface ProvidedContext {
    baseUrl: string;
    dbFile: string;
  }
}
