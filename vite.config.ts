import { fileURLToPath, URL } from 'node:url'
import vue from '@vitejs/plugin-vue'
import vuetify from 'vite-plugin-vuetify'
import { defineConfig } from 'vitest/config'

const apiPort = process.env.PORT ?? '3000'

export default defineConfig({
  plugins: [vue(), vuetify({ autoImport: true })],
  resolve: {
    alias: {
      '@': fileURLToPath(new URL('./src', import.meta.url)),
      '@shared': fileURLToPath(new URL('./shared', import.meta.url)),
    },
  },
  server: {
    host: '127.0.0.1',
    port: 5173,
    strictPort: true,
    proxy: { '/api': `http://127.0.0.1:${apiPort}` },
  },
  preview: { host: '127.0.0.1' },
  // Nothing inlined as data: URIs, so the Content-Security-Policy can stay 'self' for fonts and images.
  build: { outDir: 'dist', emptyOutDir: true, chunkSizeWarningLimit: 800, assetsInlineLimit: 0 },
  test: {
    include: ['tests/{shared,server,client,docker-free-dev}/**/*.test.ts'],
    environment: 'node',
    globalSetup: ['tests/setup/global.ts'],
    testTimeout: 20_000,
    hookTimeout: 60_000,
    pool: 'forks',
    server: { deps: { inline: ['vuetify'] } },
  },
})
