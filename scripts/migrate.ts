import { migrate } from '@/lib/migrate';
import { databaseLabel, getSequelize } from '@/lib/db';

migrate()
  .then(async (names) => {
    console.log(names.length ? `Applied ${names.join(', ')} to ${databaseLabel()}` : `Database is up to date (${databaseLabel()})`);
    await getSequelize().close();
  })
  .catch((err) => {
    console.error('Migration failed:', err instanceof Error ? err.message : err);
    process.exit(1);
  });
