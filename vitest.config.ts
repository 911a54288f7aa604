import { defineConfig } from 'vitest/config'
import { defineVitestProject } from '@nuxt/test-utils/config'

// Three projects: pure modules (unit), components and composables inside a Nuxt environment
// (nuxt), and the built app with a real browser (e2e). `npm test` runs all three.
export default defineConfig({
  test: {
    projects: [
      {
        test: {
          name: 'unit',
          include: ['tests/unit/**/*.test.ts'],
          environment: 'node',
          testTimeout: 30_000,
        },
      },
      await defineVitestProject({
        test: {
          name: 'nuxt',
          include: ['tests/nuxt/**/*.test.ts'],
          environment: 'nuxt',
          testTimeout: 30_000,
          // Starting the Nuxt test app can take well over 10 s on a loaded 2-core machine.
          hookTimeout: 120_000,
        },
      }),
      {
        test: {
          name: 'e2e',
          include: ['tests/e2e/**/*.test.ts'],
          environment: 'node',
          testTimeout: 120_000,
          hookTimeout: 180_000,
          // One built server per file; files run one after another to keep the 2-core machine responsive.
          fileParallelism: false,
        },
      },
    ],
  },
})
