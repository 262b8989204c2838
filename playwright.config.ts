/**
 * Browser end-to-end tests: the real server (server/main.ts) against the migrated test database, driven
 * through Debian's chromium.
 *
 * `npm test` sets DATABASE_URL (the test cluster), TETRAWELL_E2E_PORT and TETRAWELL_E2E_SMTP_PORT (free
 * loopback ports) and TETRAWELL_PLAYWRIGHT_JSON (where the json report goes). To run one spec by hand after a
 * full `npm test`: `node server/ops/test.mjs --only e2e tests/e2e/<file>.spec.ts`.
 */
import { defineConfig } from '@playwright/test';

const port = Number(process.env.TETRAWELL_E2E_PORT || 8091);
const smtpPort = Number(process.env.TETRAWELL_E2E_SMTP_PORT || 2591);
const baseURL = `http://127.0.0.1:${port}`;

if (!process.env.DATABASE_URL) {
  throw new Error('playwright: DATABASE_URL is not set. Run the browser tests through `npm test` (or `node server/ops/test.mjs --only e2e`), which prepares the test database.');
}

export default defineConfig({
  testDir: 'tests/e2e',
  outputDir: 'tests/artifacts/playwright',
  forbidOnly: !!process.env.CI,
  retries: 0,
  // One worker: the specs share one server and one database, and CI has two cores.
  workers: 1,
  timeout: 60_000,
  expect: { timeout: 10_000 },
  reporter: [['list'], ['json', { outputFile: process.env.TETRAWELL_PLAYWRIGHT_JSON || 'test-results/playwright.json' }]],
  use: {
    baseURL,
    browserName: 'chromium',
    headless: true,
    screenshot: 'only-on-failure',
    trace: 'retain-on-failure',
    launchOptions: {
      executablePath: '/usr/bin/chromium',
      args: [
        '--headless',
        '--no-sandbox',
        // WebGL for the design canvas without a GPU: ANGLE on SwiftShader (software rendering)
        '--use-angle=swiftshader',
        '--enable-unsafe-swiftshader',
        '--ignore-gpu-blocklist',
        '--disable-background-networking',
        '--disable-component-update',
        '--disable-sync',
        '--no-first-run',
      ],
    },
  },
  webServer: {
    command: 'node --import tsx server/main.ts',
    url: `${baseURL}/api/health`,
    reuseExistingServer: false,
    timeout: 120_000,
    stdout: 'pipe',
    stderr: 'pipe',
    gracefulShutdown: { signal: 'SIGTERM', timeout: 10_000 },
    env: {
      NODE_ENV: 'test',
      DATABASE_URL: process.env.DATABASE_URL,
      HOST: '127.0.0.1',
      PORT: String(port),
      PUBLIC_URL: baseURL,
      TETRAWELL_FAKE_SMTP_PORT: String(smtpPort),
      SESSION_SECRET: process.env.SESSION_SECRET || 'e2e-only-session-secret-not-for-production',
    },
  },
});
