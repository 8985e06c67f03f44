import { migrate } from '@/lib/migrate';
import { seedDemo } from '@/lib/seed';
import { seedEvidence } from '@/lib/seedEvidence';
import { getSequelize, databaseLabel } from '@/lib/db';

(async () => {
  await migrate();
  await seedDemo({ log: (s) => console.log(s) });
  // Test servers skip the evidence (G-code, photos, inspections) to start quickly; the demo has it.
  if (process.env.HOTLAP_DEMO_EVIDENCE !== '0') await seedEvidence({ log: (s) => console.log(s) });
  console.log(`Database: ${databaseLabel()}`);
  await getSequelize().close();
})().catch((err) => {
  console.error('Seeding failed:', err instanceof Error ? err.stack : err);
  process.exit(1);
});
