import type { TestProject } from 'vitest/node';
import { startServer, type TestServer } from '../support/server';
import { startCluster, type Cluster } from '../support/postgres';

let server: TestServer | undefined;
let cluster: Cluster | undefined;

export default async function setup(project: TestProject) {
  const port = Number(process.env.HOTLAP_TEST_PORT || 3100);
  if (process.env.HOTLAP_TEST_DB === 'postgres') {
    // One cluster for the run; every test server gets its own database on it (tests/support/server.ts).
    cluster = startCluster(Number(process.env.HOTLAP_TEST_PG_PORT || port + 2400));
    process.env.HOTLAP_TEST_PG_URL = cluster.url;
  }
  try {
    server = await startServer(port);
  } catch (e) {
    cluster?.stop();
    throw e;
  }
  project.provide('baseUrl', server.url);
  project.provide('dbFile', server.dbFile);
  return async () => {
    await server?.stop();
    cluster?.stop();
  };
}

declare module 'vitest' {
  export interface ProvidedContext {
    baseUrl: string;
    dbFile: string;
  }
}
