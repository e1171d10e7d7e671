import { fileURLToPath, URL } from 'node:url'
import vue from '@vitejs/plugin-vue'
import type { Plugin } from 'vite'
import vuetify from 'vite-plugin-vuetify'
import { defineConfig } from 'vitest/config'

const apiPort = process.env.PORT ?? '3000'

/**
 * @mdi/js is a single module holding every icon, and a module lands in one chunk only: because the
 * Vuetify plugin (in the entry) imports a few icons, every icon used by any page, staff ones too,
 * was bundled into what each customer's phone downloads first. Turning each named import into a
 * module of its own lets every icon go with the pages that use it. Build only: the dev server and
 * the tests load modules one by one anyway.
 */
function iconPerModule(): Plugin {
  const prefix = '\0mdi-icon:'
  const importList = /import\s*\{([^}]*)\}\s*from\s*['"]@mdi\/js['"]/g
  let icons: Record<string, string> = {}
  return {
    name: 'tickover:icon-per-module',
    apply: 'build',
    async buildStart() {
      icons = (await import('@mdi/js')) as unknown as Record<string, string>
    },
    transform(code, id) {
      if (id.includes('/node_modules/') || !code.includes('@mdi/js')) return null
      const rewritten = code.replace(importList, (whole, names: string) => {
        const imports = names
          .split(',')
          .map((spec) => spec.trim())
          .filter(Boolean)
          .map((spec) => {
            const [imported, local = imported] = spec.split(/\s+as\s+/)
            return `import ${local} from '${prefix}${imported}';`
          })
        // Same line count, so positions after the import stay where they were.
        return imports.join(' ') + '\n'.repeat(whole.split('\n').length - 1)
      })
      return rewritten === code ? null : { code: rewritten, map: null }
    },
    resolveId: (id) => (id.startsWith(prefix) ? id : null),
    load(id) {
      if (!id.startsWith(prefix)) return null
      const name = id.slice(prefix.length)
      const path = icons[name]
      if (typeof path !== 'string') this.error(`@mdi/js has no icon named ${name}`)
      return `export default ${JSON.stringify(path)}`
    },
  }
}

export default defineConfig({
  plugins: [
    // Every component uses <script setup>, so Vue's Options API support is dead weight in the bundle
    // every page loads first. No devtools hooks in production (plugin-vue's default, kept explicit).
    vue({ features: { optionsAPI: false, prodDevtools: false } }),
    vuetify({ autoImport: true }),
    iconPerModule(),
  ],
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
