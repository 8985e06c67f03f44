import { migrate } from '@/lib/migrate';
import { databaseUrl, getSequelize } from '@/lib/db';

migrate()
  .then(async (names) => {
    console.log(names.length ? `Applied ${names.join(', ')} to ${databaseUrl()}` : `Database is up to date (${databaseUrl()})`);
    await getSequelize().close();
  })
  .catch((err) => {
    console.error('Migration failed:', err instanceof Error ? err.message : err);
    process.exit(1);
  });
