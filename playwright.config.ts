import { defineConfig } from '@playwright/test';
import { CHROMIUM_FLAGS } from './e2e/chromium';

const port = Number(process.env.E2E_PORT ?? 4318);
const dataDir = process.env.E2E_DATA_DIR ?? '.test-output/e2e-data';

/** Playwright runs Cairn's browser tests against the built app in Debian's Chromium. */
export default defineConfig({
  testDir: 'e2e',
  outputDir: '.test-output/e2e-artifacts',
  timeout: 60_000,
  expect: { timeout: 10_000 },
  fullyParallel: false,
  workers: 1,
  retries: 0,
  reporter: [['list'], ['json', { outputFile: '.test-output/playwright.json' }]],
  use: {
    baseURL: `http://127.0.0.1:${port}`,
    testIdAttribute: 'data-test',
    launchOptions: {
      executablePath: '/usr/bin/chromium',
      args: CHROMIUM_FLAGS,
    },
    screenshot: 'only-on-failure',
    trace: 'off',
  },
  webServer: {
    // A fresh data folder each run: the first start creates, migrates and seeds the database.
    command: `rm -rf ${dataDir} && npx tsx server/index.ts`,
    url: `http://127.0.0.1:${port}/api/health`,
    reuseExistingServer: false,
    timeout: 60_000,
    env: {
      PORT: String(port),
      HOST: '127.0.0.1',
      DATA_DIR: dataDir,
      NODE_ENV: 'test',
      LOG_LEVEL: 'warn',
      PUBLIC_URL: `http://127.0.0.1:${port}`,
    },
  },
});
