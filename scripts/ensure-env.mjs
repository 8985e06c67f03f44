// Writes .env.local with a random NEXTAUTH_SECRET on first run, so the demo needs no accounts or
// manual configuration. An existing .env.local is left alone.
import fs from 'node:fs';
import crypto from 'node:crypto';

const file = '.env.local';
if (!fs.existsSync(file)) {
  fs.writeFileSync(
    file,
    [
      '# Made by scripts/ensure-env.mjs; see README "Configuration".',
      `NEXTAUTH_SECRET=${crypto.randomBytes(32).toString('base64url')}`,
      'NEXTAUTH_URL=http://localhost:3000',
      '',
    ].join('\n'),
  );
  console.log('Wrote .env.local with a fresh NEXTAUTH_SECRET.');
}
