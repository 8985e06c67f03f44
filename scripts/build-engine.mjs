// Compiles what runs the inspection engine outside Next.js's own bundles (npm run build:engine;
// npm run build, npm run demo and scripts/test-all.sh run it before next build):
//   build/engine/inspect-worker.js   the pool's worker thread (lib/jobs/pool.ts), Node, CommonJS
// Outputs are gitignored; nothing needs tsx at run time.
import { build } from 'esbuild';
import path from 'node:path';
import { fileURLToPath } from 'node:url';

const root = path.resolve(path.dirname(fileURLToPath(import.meta.url)), '..');
const at = (p) => path.join(root, p);

const common = { bundle: true, sourcemap: true, logLevel: 'warning', absWorkingDir: root, legalComments: 'none' };

await Promise.all([
  build({
    ...common,
    entryPoints: [at('lib/jobs/inspect-worker.ts')],
    outfile: at('build/engine/inspect-worker.js'),
    platform: 'node',
    format: 'cjs',
    target: 'node20',
  }),
]);
console.log('build:engine: build/engine/inspect-worker.js');
