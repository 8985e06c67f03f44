/**
 * Builds the native inspection engine (binding.gyp → build/Release/hotlap_inspection.node) with
 * the node-gyp that ships with npm, against this Node's own headers. Runs on `npm install` /
 * `npm ci` (the "install" script) and by `npm run build:native`.
 *
 * A failed build is not fatal: the TypeScript engine then runs every inspection, with the same
 * report, only slower (lib/inspection/nativeEngine.ts). HOTLAP_REQUIRE_NATIVE=1 makes it fatal, so
 * CI cannot pass on the fallback without noticing.
 */
import { spawnSync } from 'node:child_process';
import { existsSync } from 'node:fs';
import { dirname, join } from 'node:path';

function nodeGyp() {
  // npm points its lifecycle scripts at its own copy; outside npm, look beside npm itself.
  const candidates = [
    process.env.npm_config_node_gyp,
    join(dirname(process.execPath), '..', 'lib', 'node_modules', 'npm', 'node_modules', 'node-gyp', 'bin', 'node-gyp.js'),
  ];
  return candidates.find((c) => c && existsSync(c)) ?? null;
}

const gyp = nodeGyp();
const required = process.env.HOTLAP_REQUIRE_NATIVE === '1';
let ok = false;
if (gyp) {
  const r = spawnSync(process.execPath, [gyp, 'rebuild', '--jobs=max', '--loglevel=warn'], { stdio: 'inherit' });
  ok = r.status === 0;
}
if (!ok) {
  const why = gyp ? 'node-gyp failed (see above; it needs python3, make and a C++ compiler)' : 'node-gyp was not found';
  console.warn(`hotlap: the native inspection engine was not built: ${why}. Inspections will use the TypeScript engine (same reports, slower).`);
  if (required) process.exit(1);
}
