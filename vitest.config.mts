import { defineConfig } from 'vitest/config';
import path from 'node:path';
import { fileURLToPath } from 'node:url';

const __dirname = path.dirname(fileURLToPath(import.meta.url));

export default defineConfig({
  resolve: { alias: { '@': path.resolve(__dirname) } },
  test: {
    projects: [
      {
        resolve: { alias: { '@': path.resolve(__dirname) } },
        test: { name: 'unit', include: ['tests/unit/**/*.test.ts'], environment: 'node', testTimeout: 60_000 },
      },
      {
        resolve: { alias: { '@': path.resolve(__dirname) } },
        test: {
          name: 'integration',
          // tests/security: one test per attack, and the route × role matrix, against the same server.
          include: ['tests/integration/**/*.test.ts', 'tests/security/**/*.test.ts'],
          environment: 'node',
          globalSetup: ['tests/integration/global-setup.ts'],
          testTimeout: 60_000,
          hookTimeout: 180_000,
          fileParallelism: false,
        },
      },
    ],
  },
});
