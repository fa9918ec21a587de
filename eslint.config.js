// ESLint for the whole code base (flat config). Formatting is Prettier's job: eslint-config-prettier,
// last, turns off every stylistic rule that would fight it. The rules are the recommended sets of
// ESLint, typescript-eslint and eslint-plugin-vue; the few changes below say why.
import js from '@eslint/js'
import tseslint from 'typescript-eslint'
import pluginVue from 'eslint-plugin-vue'
import prettier from 'eslint-config-prettier'

export default tseslint.config(
  { ignores: ['**/node_modules/', '**/dist/', '**/dist-server/', '.test-data*/', '.data*/', '.bench-*/', '.cluster-*/', 'tmp/'] },
  js.configs.recommended,
  tseslint.configs.recommended,
  pluginVue.configs['flat/recommended'],
  {
    files: ['**/*.vue'],
    // vue-eslint-parser reads the template; the <script lang="ts"> blocks go to typescript-eslint's parser.
    languageOptions: { parserOptions: { parser: tseslint.parser } },
  },
  {
    rules: {
      // TypeScript (vue-tsc and tsc run in `npm test`) already rejects undefined names, and knows the
      // browser and Node globals from each tsconfig; ESLint's no-undef does not, and misfires on types.
      'no-undef': 'off',
      // An unused value is a finding; a name starting with "_" is a deliberate placeholder (a required
      // positional parameter, such as Express's error handler's `next`, or a rest-sibling left out).
      '@typescript-eslint/no-unused-vars': [
        'error',
        { argsIgnorePattern: '^_', varsIgnorePattern: '^_', caughtErrors: 'none', ignoreRestSiblings: true },
      ],
      // Prettier wraps lines at 140 where it can; this catches the rest (long strings, template literals,
      // comments), which are broken by hand. Only URLs may run longer: they cannot be broken.
      'max-len': ['error', { code: 140, ignoreUrls: true }],
    },
  },
  {
    files: ['**/*.vue'],
    rules: {
      // Props whose names end in a unit (conventions: hbGL, paO2MmHg) keep their camelCase in templates:
      // hyphenated, the unit falls apart into letters (`threshold-g-l`, `pa-o2-mm-hg`).
      'vue/attribute-hyphenation': [
        'error',
        'always',
        { ignore: ['predictedSurgeryHbGL', 'predictedPostOpHbGL', 'thresholdGL', 'triggerHbGL', 'saO2', 'paO2MmHg'] },
      ],
    },
  },
  {
    // The server logs through pino (server/observability/logger.ts); the scripts and tests print to a terminal.
    files: ['server/**/*.ts', 'shared/**/*.ts', 'src/**/*.{ts,vue}'],
    rules: { 'no-console': 'error' },
  },
  prettier,
  {
    // eslint-config-prettier switches max-len off (Prettier owns the layout); it stays on here for what
    // Prettier cannot wrap.
    rules: { 'max-len': ['error', { code: 140, ignoreUrls: true }] },
  },
)
