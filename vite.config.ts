/// <reference types="vitest/config" />
import { fileURLToPath, URL } from 'node:url'
import { defineConfig } from 'vite'
import vue from '@vitejs/plugin-vue'

export default defineConfig({
  plugins: [vue()],
  resolve: {
    alias: {
      '@': fileURLToPath(new URL('./src', import.meta.url)),
      '@shared': fileURLToPath(new URL('./shared', import.meta.url)),
    },
  },
  server: { proxy: { '/api': 'http://127.0.0.1:8080' } },
  // The manifest lets the bench script add up what the sign-in page really loads.
  build: { outDir: 'dist', sourcemap: false, manifest: true, chunkSizeWarningLimit: 600 },
  test: {
    // Three projects so `npm test` can run them in order and count them together.
    projects: [
      // Pure functions, but the property tests run thousands of cases: on a shared, busy machine
      // Vitest's default 5 s is a timing dependency, not a check.
      // Component tests sit beside their components (src/**/*.test.ts) and choose a DOM (jsdom) per file.
      {
        extends: true,
        test: { name: 'unit', include: ['tests/unit/**/*.test.ts', 'src/**/*.test.ts'], environment: 'node', testTimeout: 30000 },
      },
      {
        extends: true,
        test: {
          name: 'api',
          include: ['tests/api/**/*.test.ts'],
          environment: 'node',
          fileParallelism: false,
          testTimeout: 30000,
          hookTimeout: 60000,
        },
      },
      {
        extends: true,
        test: {
          name: 'e2e',
          include: ['tests/e2e/**/*.test.ts'],
          environment: 'node',
          fileParallelism: false,
          // A browser test is one whole story with its own data (several pages, sign-ins), and the
          // machine may be shared: generous limits, so only a real fault fails it.
          testTimeout: 180000,
          hookTimeout: 120000,
          // Vitest's default 1 s is shorter than one worklist round trip on a busy machine.
          expect: { poll: { timeout: 10000, interval: 100 } },
        },
      },
    ],
  },
})
