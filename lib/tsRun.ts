/**
 * How this project starts a TypeScript entry point in its own Node.js process (the inspection
 * child, the inspection CLI and benchmark children): `node --require <tsx's CommonJS hook>`.
 *
 * Not the `tsx` command: it also registers tsx's ES-module loader, whose off-thread hooks slowed
 * the inspection of the 100 MB bench stack by ~12 % (best of 3, the same bundled engine: 1.35 s
 * plain or with the CommonJS hook, 1.51 s with `--import tsx`), and it runs the entry in a second
 * child process. The project is CommonJS, so the CommonJS hook is all it needs.
 */
import path from 'node:path';

export function tsRunArgs(root: string = process.cwd()): string[] {
  return ['--require', path.join(root, 'node_modules', 'tsx', 'dist', 'cjs', 'index.cjs')];
}
