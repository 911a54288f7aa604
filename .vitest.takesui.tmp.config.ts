import { defineConfig } from 'vitest/config'
import { defineVitestProject } from '@nuxt/test-utils/config'
export default defineConfig({
  test: {
    projects: [
      await defineVitestProject({
        root: '/work/main',
        test: { name: 'nuxt', include: ['tests/nuxt/**/*.test.ts'], environment: 'nuxt', testTimeout: 30_000, hookTimeout: 90_000 },
      }),
    ],
  },
})
