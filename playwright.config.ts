import { defineConfig, devices } from '@playwright/test'

// Browser tests run against Debian's Chromium (Playwright downloads no browser here) and a server
// on its own port with a freshly seeded database (scripts/serve-e2e.ts serves the built client).
// E2E_PORT and E2E_DATABASE let two checkouts on one machine run their browser tests side by side.
const port = process.env.E2E_PORT ?? '3100'

export default defineConfig({
  testDir: 'tests/e2e',
  outputDir: 'test-results/artifacts',
  fullyParallel: false,
  workers: 1,
  forbidOnly: !!process.env.CI,
  // Generous: sign-in hashes with scrypt, and this machine may be busy with other test runs.
  timeout: 60_000,
  expect: { timeout: 10_000 },
  // npm test reads the counts from the JSON report it asks for through PLAYWRIGHT_JSON_OUTPUT_NAME.
  reporter: [
    ['list'],
    ['html', { open: 'never', outputFolder: 'test-results/html-report' }],
    ...(process.env.PLAYWRIGHT_JSON_OUTPUT_NAME ? [['json'] as ['json']] : []),
  ],
  use: {
    baseURL: `http://127.0.0.1:${port}`,
    trace: 'retain-on-failure',
    screenshot: 'only-on-failure',
    launchOptions: {
      executablePath: '/usr/bin/chromium',
      args: [
        '--headless',
        '--no-sandbox',
        '--disable-gpu',
        '--disable-quic',
        '--no-first-run',
        '--disable-background-networking',
        '--disable-component-update',
        '--disable-sync',
      ],
    },
  },
  projects: [{ name: 'chromium', use: { ...devices['Desktop Chrome'] } }],
  webServer: {
    command: 'node --import tsx scripts/serve-e2e.ts',
    url: `http://127.0.0.1:${port}/api/health`,
    reuseExistingServer: !process.env.CI,
    timeout: 120_000,
    stderr: 'pipe',
  },
})
