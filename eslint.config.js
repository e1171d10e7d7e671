import js from '@eslint/js'
import { createTypeScriptImportResolver } from 'eslint-import-resolver-typescript'
import { importX } from 'eslint-plugin-import-x'
import pluginVue from 'eslint-plugin-vue'
import globals from 'globals'
import tseslint from 'typescript-eslint'
import prettier from 'eslint-config-prettier/flat'

export default tseslint.config(
  { ignores: ['dist/**', 'node_modules/**', '.data/**', 'drizzle/**', 'coverage/**', 'test-results/**', 'tests/e2e/screenshots/**'] },
  js.configs.recommended,
  ...tseslint.configs.recommended,
  ...pluginVue.configs['flat/recommended'],
  {
    languageOptions: {
      ecmaVersion: 'latest',
      sourceType: 'module',
      globals: { ...globals.browser, ...globals.node },
      // For the <script lang="ts"> of a .vue file: vue-eslint-parser hands it on. Set for every file
      // because import-x reads the .vue files a .ts file imports with that .ts file's options.
      parserOptions: { parser: tseslint.parser },
    },
    rules: {
      '@typescript-eslint/no-unused-vars': ['error', { argsIgnorePattern: '^_', varsIgnorePattern: '^_' }],
      '@typescript-eslint/consistent-type-imports': 'error',
      'vue/max-attributes-per-line': 'off',
      'vue/singleline-html-element-content-newline': 'off',
      'vue/html-self-closing': 'off',
      'no-console': ['error', { allow: ['warn', 'error'] }],
    },
  },
  {
    // No import cycles: a module that reaches itself through its imports starts half-initialised.
    // Type-only imports are erased at run time, so the rule does not follow them.
    plugins: { 'import-x': importX },
    settings: {
      'import-x/resolver-next': [createTypeScriptImportResolver({ project: 'tsconfig.json' })],
      'import-x/parsers': { '@typescript-eslint/parser': ['.ts'], 'vue-eslint-parser': ['.vue'] },
      'import-x/extensions': ['.ts', '.js', '.vue'],
    },
    rules: { 'import-x/no-cycle': ['error', { ignoreExternal: true }] },
  },
  {
    // Layers: SQL lives only in *.repo.ts (and *.sql.ts fragments). Services and routes import nothing of
    // Drizzle or the table definitions, not even types: repos export the row types they need.
    files: ['server/**/*.service.ts', 'server/**/*.routes.ts'],
    rules: {
      'no-restricted-imports': [
        'error',
        {
          patterns: [
            { group: ['drizzle-orm', 'drizzle-orm/*'], message: 'Queries belong in a *.repo.ts file; call the repo from here.' },
            {
              group: ['**/db/schema', '**/db/schema/*'],
              message: 'Table definitions belong to repos; import the row types the repo exports.',
            },
          ],
        },
      ],
    },
  },
  {
    // Pages and components get server state from their Pinia store, which alone calls src/api.
    files: ['src/pages/**', 'src/components/**', 'src/layouts/**'],
    rules: {
      'no-restricted-imports': [
        'error',
        {
          patterns: [
            {
              group: ['@/api', '@/api/*', '**/api/*', '!@shared/**'],
              message: 'Pages and components talk to the server through a store (src/stores), never src/api directly.',
            },
          ],
        },
      ],
    },
  },
  {
    files: ['docker-free-dev/**', 'server/cli/**', 'server/db/migrate.ts', 'server/db/seed.ts', 'tests/bench/**', 'tests/setup/**'],
    rules: { 'no-console': 'off' },
  },
  // Layout is Prettier's (npm run format; npm run lint checks it): ESLint's own layout rules are off.
  prettier,
)
