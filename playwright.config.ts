import { defineConfig, devices } from '@playwright/test'
import { freePortSync } from './scripts/lib/ports'

// Browser tests run against Debian's Chromium (Playwright downloads no browser here) and a server
// of their own, never one already running: on a free port (E2E_PORT to choose one) with a freshly
// seeded database named for this run (E2E_DATABASE to choose one), dropped again at the end.
// The choice is kept in the environment, which Playwright's workers inherit, so they all agree.
process.env.E2E_PORT ??= String(freePortSync())
process.env.E2E_DATABASE ??= `nestwise_e2e_${process.pid}`
const port = process.env.E2E_PORT

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
  globalTeardown: './scripts/e2e-teardown.ts',
  webServer: {
    command: 'node --import tsx scripts/serve-e2e.ts',
    url: `http://127.0.0.1:${port}/api/health`,
    // Never another instance that happens to answer on this port.
    reuseExistingServer: false,
    timeout: 120_000,
    stderr: 'pipe',
  },
})
