import { migrate } from '@/lib/migrate';
import { seedDemo } from '@/lib/seed';
import { getSequelize, databaseUrl } from '@/lib/db';

(async () => {
  await migrate();
  await seedDemo({ log: (s) => console.log(s) });
  console.log(`Database: ${databaseUrl()}`);
  await getSequelize().close();
})().catch((err) => {
  console.error('Seeding failed:', err instanceof Error ? err.stack : err);
  process.exit(1);
});
