import js from '@eslint/js'
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
    files: ['**/*.vue'],
    languageOptions: { parserOptions: { parser: tseslint.parser } },
  },
  {
    languageOptions: {
      ecmaVersion: 'latest',
      sourceType: 'module',
      globals: { ...globals.browser, ...globals.node },
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
    files: ['docker-free-dev/**', 'server/cli/**', 'server/db/migrate.ts', 'server/db/seed.ts', 'tests/bench/**', 'tests/setup/**'],
    rules: { 'no-console': 'off' },
  },
  // Layout is Prettier's (npm run format; npm run lint checks it): ESLint's own layout rules are off.
  prettier,
)
