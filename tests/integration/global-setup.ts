import type { TestProject } from 'vitest/node';
import { startServer, type TestServer } from '../support/server';

let server: TestServer | undefined;

export default async function setup(project: TestProject) {
  server = await startServer(Number(process.env.HOTLAP_TEST_PORT || 3100));
  project.provide('baseUrl', server.url);
  project.provide('dbFile', server.dbFile);
  return async () => server?.stop();
}

declare module 'vitest' {
  export interface ProvidedContext {
    baseUrl: string;
    dbFile: string;
  }
}
