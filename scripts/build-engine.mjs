/**
 * Compiles the inspection engine's entry points with esbuild into .hotlap/engine/ (gitignored), so
 * nothing runs TypeScript through tsx at run time.
 *
 *   npm run build:engine            (run first by npm run build, demo, scripts/test-all.sh and the bench)
 *
 * ENTRIES is the one list of bundles: add an entry here (name, source, platform) rather than a
 * second build script. Each bundle is self-contained (zod and the engine inlined), minified
 * identifiers off so stack traces and profiles stay readable.
 */
import { build } from 'esbuild';
import { mkdirSync } from 'node:fs';
import { dirname, join } from 'node:path';
import { fileURLToPath } from 'node:url';

const ROOT = join(dirname(fileURLToPath(import.meta.url)), '..');
export const OUT_DIR = join(ROOT, '.hotlap', 'engine');

/**
 * The engine's bundles (`outDir` when not OUT_DIR).
 *  - inspect-cli: `npm run inspect -- FILE` (lib/inspection/cli.ts), Node, CommonJS.
 *  - inspect-worker: the inspection pool's worker thread (lib/jobs/pool.ts), Node, CommonJS.
 *  - worker: `npm run worker` (scripts/worker.ts), the inspection worker process, Node, CommonJS.
 *    `external`: its packages (the ORM, database drivers, pg-boss) load from node_modules at run time.
 *  - gcode-check: the rulebook check's Web Worker (components/GcodeCheck.tsx), served as
 *    /engine/gcode-check.js from public/engine/ (gitignored: built, not committed).
 */
export const ENTRIES = [
  { name: 'inspect-cli', source: 'lib/inspection/cli.ts', platform: 'node', format: 'cjs', ext: 'cjs' },
  { name: 'inspect-worker', source: 'lib/jobs/inspect-worker.ts', platform: 'node', format: 'cjs', ext: 'cjs' },
  { name: 'worker', source: 'scripts/worker.ts', platform: 'node', format: 'cjs', ext: 'cjs', external: true },
  { name: 'gcode-check', source: 'lib/check/checkWorker.ts', platform: 'browser', format: 'iife', ext: 'js', outDir: join(ROOT, 'public', 'engine') },
];

async function main() {
  mkdirSync(OUT_DIR, { recursive: true });
  const quiet = process.argv.includes('--quiet');
  const only = process.argv.find((a) => a.startsWith('--only='))?.slice('--only='.length);
  for (const e of ENTRIES) {
    if (only && only !== e.name) continue;
    mkdirSync(e.outDir ?? OUT_DIR, { recursive: true });
    const outfile = join(e.outDir ?? OUT_DIR, `${e.name}.${e.ext}`);
    await build({
      entryPoints: [join(ROOT, e.source)],
      outfile,
      bundle: true,
      platform: e.platform,
      format: e.format,
      // Node 20 is the floor (package.json engines); browsers of the last two years for workers.
      target: e.platform === 'node' ? 'node20' : ['chrome120', 'firefox120', 'safari17'],
      sourcemap: 'linked',
      minifySyntax: true,
      legalComments: 'none',
      ...(e.external ? { packages: 'external' } : {}),
      logLevel: 'warning',
      // tsconfig.json paths (@/…) are read by esbuild itself.
    });
    if (!quiet) console.log(`build:engine ${e.name} → ${outfile.slice(ROOT.length + 1)}`);
  }
}

main().catch((err) => {
  console.error(err instanceof Error ? err.message : err);
  process.exitCode = 1;
});
