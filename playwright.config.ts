import { defineConfig } from '@playwright/test';

/**
 * Browser tests drive Debian's Chromium (apt-get install chromium) against the built app, started
 * by tests/e2e/global-setup.ts on a fresh database. Playwright's own browser download is not used.
 */
const port = Number(process.env.HOTLAP_E2E_PORT || 3200);

export default defineConfig({
  testDir: 'tests',
  // Journeys per role, and the browser half of the attack tests (cross-site forms, CSP, redirects).
  testMatch: ['e2e/**/*.spec.ts', 'security/**/*.spec.ts'],
  globalSetup: './tests/e2e/global-setup.ts',
  fullyParallel: false,
  workers: 1,
  retries: 0,
  timeout: 60_000,
  expect: { timeout: 10_000 },
  reporter: [['list']],
  use: {
    baseURL: `http://127.0.0.1:${port}`,
    trace: 'retain-on-failure',
    screenshot: 'only-on-failure',
    launchOptions: {
      executablePath: process.env.CHROMIUM_PATH || '/usr/bin/chromium',
      args: ['--no-sandbox', '--disable-gpu', '--disable-background-networking', '--disable-component-update', '--disable-sync', '--no-first-run', '--disable-quic'],
    },
  },
});
