import { defineConfig, mergeConfig } from 'vitest/config'
import viteConfig from './vite.config.ts'
import { INTEGRATION_DB_PREFIX } from './tests/support/integration-database.ts'

// Each run of the integration tests has a database of its own (named after the run's process), so
// two runs on one machine never share one; the global setup creates it and drops it at the end.
process.env.NESTWISE_TEST_DB ??= `${INTEGRATION_DB_PREFIX}${process.pid}`

// Two projects: fast unit tests (no database) and integration tests against the real PostgreSQL.
export default mergeConfig(
  viteConfig,
  defineConfig({
    test: {
      projects: [
        {
          extends: true,
          test: {
            name: 'unit',
            include: [
              'shared/**/*.test.ts',
              'server/**/*.test.ts',
              'src/**/*.test.ts',
              'scripts/**/*.test.ts',
              'tests/reference/**/*.test.ts',
            ],
            environment: 'node',
            server: { deps: { inline: ['vuetify'] } },
            testTimeout: 60_000,
          },
        },
        {
          extends: true,
          test: {
            name: 'integration',
            include: ['tests/integration/**/*.test.ts'],
            environment: 'node',
            fileParallelism: false,
            testTimeout: 60_000,
            hookTimeout: 60_000,
            globalSetup: ['tests/support/integration-global-setup.ts'],
            env: { PGDATABASE: process.env.NESTWISE_TEST_DB, NODE_ENV: 'test', LOGIN_RATE_LIMIT: '10' },
          },
        },
      ],
    },
  }),
)
