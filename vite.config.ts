/// <reference types="vitest/config" />
import { fileURLToPath, URL } from 'node:url'
import { defineConfig } from 'vite'
import vue from '@vitejs/plugin-vue'
import { precompress } from './scripts/lib/vite-precompress.ts'

// https://vite.dev/config/
export default defineConfig({
  // precompress: .br and .gz beside each built file, served as they are by server/app.ts.
  plugins: [vue(), precompress()],
  resolve: {
    alias: [
      { find: '@', replacement: fileURLToPath(new URL('./src', import.meta.url)) },
      { find: '@shared', replacement: fileURLToPath(new URL('./shared', import.meta.url)) },
      // markdown-it-texmath's CommonJS fallback would otherwise pull in a second KaTeX copy.
      // Exact match only, so `katex/dist/katex.min.css` still resolves.
      { find: /^katex$/, replacement: 'katex/dist/katex.mjs' },
    ],
  },
  server: { host: '127.0.0.1', proxy: { '/api': 'http://127.0.0.1:3000' } },
  preview: { host: '127.0.0.1' },
  build: { outDir: 'dist/client', sourcemap: false, chunkSizeWarningLimit: 900 },
  // https://vitest.dev/config/
  test: {
    globals: false,
    environment: 'node',
    include: ['tests/**/*.test.ts'],
    // API and browser tests share one database and one server; run files one at a time.
    fileParallelism: false,
    testTimeout: 30_000,
    hookTimeout: 60_000,
  },
})
