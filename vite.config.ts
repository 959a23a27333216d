import { fileURLToPath, URL } from 'node:url'
import { defineConfig } from 'vitest/config'
import vue from '@vitejs/plugin-vue'

const alias = {
  '@': fileURLToPath(new URL('./src', import.meta.url)),
  '@shared': fileURLToPath(new URL('./shared', import.meta.url)),
}

export default defineConfig({
  plugins: [vue()],
  resolve: { alias },
  server: {
    port: Number(process.env.VITE_PORT ?? 5173),
    proxy: { '/api': `http://127.0.0.1:${process.env.PORT ?? 3000}` },
  },
  // The password strength word lists (about 1.7 MB) are one chunk of their own, loaded only by
  // the two pages where staff choose a password; every other chunk stays well under this.
  build: { outDir: 'dist', emptyOutDir: true, chunkSizeWarningLimit: 1800 },
  test: {
    projects: [
      {
        extends: true,
        test: {
          name: 'node',
          environment: 'node',
          include: ['tests/server/**/*.test.ts'],
          execArgv: ['--import', 'tsx'],
        },
      },
      {
        extends: true,
        test: {
          name: 'dom',
          environment: 'happy-dom',
          include: ['tests/client/**/*.test.ts'],
        },
      },
      {
        extends: true,
        test: {
          name: 'e2e',
          environment: 'node',
          include: ['tests/e2e/**/*.test.ts'],
          execArgv: ['--import', 'tsx'],
          testTimeout: 60_000,
          hookTimeout: 120_000,
          fileParallelism: false,
        },
      },
    ],
  },
})
