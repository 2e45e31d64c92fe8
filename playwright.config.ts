import { defineConfig } from '@playwright/test';

/**
 * End-to-end tests against a running Edgecase. `npm test` starts the stack on
 * the test ports and sets E2E_BASE_URL and PLAYWRIGHT_JSON_OUTPUT_FILE (it
 * reads the counts from that file). The browser is Debian's chromium package:
 * Playwright never downloads one here.
 */
export default defineConfig({
  testDir: 'e2e',
  outputDir: 'test-results',
  forbidOnly: Boolean(process.env.CI),
  fullyParallel: false,
  workers: 1,
  // On CI a failed test gets one more attempt; npm test lists every test that needed it as flaky.
  retries: process.env.CI ? 1 : 0,
  reporter: [['list'], ['json', { outputFile: process.env.PLAYWRIGHT_JSON_OUTPUT_FILE ?? 'artifacts/e2e/results.json' }]],
  use: {
    baseURL: process.env.E2E_BASE_URL ?? 'http://127.0.0.1:3100',
    screenshot: 'only-on-failure',
    trace: 'retain-on-failure',
  },
  projects: [
    {
      name: 'chromium',
      use: {
        browserName: 'chromium',
        launchOptions: {
          executablePath: '/usr/bin/chromium',
          args: [
            '--headless',
            '--no-sandbox',
            '--disable-gpu',
            '--disable-background-networking',
            '--disable-component-update',
            '--disable-sync',
            '--no-first-run',
            '--disable-quic',
          ],
        },
      },
    },
  ],
});
