// One lint configuration for the whole repository (run by `npm test`): server, shared, tests and
// the Vue console (eslint-plugin-vue; formatting left to Prettier).
import js from '@eslint/js';
import pluginVue from 'eslint-plugin-vue';
import tseslint from 'typescript-eslint';

export default tseslint.config(
  {
    ignores: [
      'node_modules/',
      'dist/',
      'coverage/',
      'data/',
      'console/dist/',
      // the generated documents and client types (their drift tests keep them current)
      'openapi/*.json',
      'openapi/client/schema.d.ts',
      'drizzle/meta/',
      'drizzle-pg/meta/',
    ],
  },
  js.configs.recommended,
  ...tseslint.configs.recommended,
  ...pluginVue.configs['flat/recommended'],
  {
    files: ['console/**/*.vue'],
    languageOptions: {
      parserOptions: { parser: tseslint.parser, extraFileExtensions: ['.vue'], sourceType: 'module' },
    },
    // vue-tsc checks names (as tsc does for .ts files, where typescript-eslint turns this off too)
    rules: { 'no-undef': 'off' },
  },
  {
    // The repositories are async on both databases: a call whose promise nobody awaits would let a
    // response leave before its write, or lose the write's error. Type-aware, so server and tests.
    files: ['server/**/*.ts', 'tests/**/*.ts', 'scripts/**/*.ts', 'openapi/client/**/*.ts'],
    languageOptions: { parserOptions: { projectService: true, tsconfigRootDir: import.meta.dirname } },
    rules: {
      '@typescript-eslint/no-floating-promises': ['error', { ignoreVoid: true }],
      '@typescript-eslint/await-thenable': 'error',
    },
  },
  {
    rules: {
      '@typescript-eslint/no-unused-vars': ['error', { argsIgnorePattern: '^_', varsIgnorePattern: '^_' }],
      // layout rules that Prettier owns
      'vue/max-attributes-per-line': 'off',
      'vue/singleline-html-element-content-newline': 'off',
      'vue/multiline-html-element-content-newline': 'off',
      'vue/html-indent': 'off',
      'vue/html-closing-bracket-newline': 'off',
      'vue/html-self-closing': 'off',
    },
  },
);
