import { startServer } from '../support/server';

export default async function globalSetup() {
  const server = await startServer(Number(process.env.HOTLAP_E2E_PORT || 3200));
  process.env.HOTLAP_E2E_DB = server.dbFile;
  return async () => server.stop();
}
