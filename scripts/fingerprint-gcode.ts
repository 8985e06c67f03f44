/**
 * Fingerprints every stored G-code that has no fingerprint yet (uploads from before duplicate
 * detection looked past raw hashes). Inspections also do this, 20 files at a time; run this once
 * after upgrading a deployment with many entries. Safe to run again.
 */
import { migrate } from '@/lib/migrate';
import { backfillFingerprints } from '@/lib/entries/duplicates';
import { getSequelize } from '@/lib/db';

(async () => {
  await migrate();
  let total = 0;
  for (;;) {
    const n = await backfillFingerprints(200);
    total += n;
    if (n === 0) break;
  }
  console.log(`Fingerprinted ${total} stored G-code file${total === 1 ? '' : 's'}.`);
  await getSequelize().close();
})().catch((err) => {
  console.error('Fingerprinting failed:', err instanceof Error ? err.stack : err);
  process.exit(1);
});
