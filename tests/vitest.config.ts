// Test projects: unit (pure, fast), physics (statistical tracer checks, slower), api (real Postgres + built server),
// e2e (Chromium against the built server with its embedded worker).
import { defineConfig } from 'vitest/config'
import { fileURLToPath } from 'node:url'

const root = fileURLToPath(new URL('..', import.meta.url))

export default defineConfig({
  // app/ code imports the shared folder through Nuxt's #shared alias
  resolve: { alias: { '#shared': fileURLToPath(new URL('../shared', import.meta.url)) } },
  test: {
    root,
    projects: [
      { extends: true, test: { name: 'unit', include: ['tests/unit/**/*.test.ts'], environment: 'node' } },
      { extends: true, test: { name: 'physics', include: ['tests/physics/**/*.test.ts'], environment: 'node', testTimeout: 300_000 } },
      {
        extends: true,
        test: {
          name: 'api',
          include: ['tests/api/**/*.test.ts'],
          environment: 'node',
          // Starts the built server against the throwaway database that `npm test` prepared.
          globalSetup: ['tests/api/global-setup.ts'],
          testTimeout: 120_000,
          hookTimeout: 300_000,
          fileParallelism: false,
        },
      },
      {
        extends: true,
        test: {
          name: 'e2e',
          include: ['tests/e2e/**/*.test.ts'],
          environment: 'node',
          // Loads the demo data and starts the built server with its embedded worker; Chromium from Debian.
          globalSetup: ['tests/e2e/global-setup.ts'],
          testTimeout: 180_000,
          hookTimeout: 120_000,
          fileParallelism: false,
        },
      },
    ],
  },
})
