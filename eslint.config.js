// Lint: TypeScript rules everywhere; in the app, no raw colours or inline style literals, so
// constants/theme.ts stays the one source of the look.
const js = require('@eslint/js');
const tseslint = require('typescript-eslint');
const reactNative = require('eslint-plugin-react-native');

module.exports = tseslint.config(
  { ignores: ['node_modules/**', 'dist/**', '.data/**', '.tmp/**', '.expo/**', 'coverage/**', '**/*.coefficients.ts'] },
  js.configs.recommended,
  ...tseslint.configs.recommended,
  {
    languageOptions: { globals: { console: 'readonly', process: 'readonly', require: 'readonly', module: 'writable', __dirname: 'readonly', setTimeout: 'readonly', clearTimeout: 'readonly', setInterval: 'readonly', clearInterval: 'readonly', URL: 'readonly', fetch: 'readonly', Buffer: 'readonly', window: 'readonly', document: 'readonly', navigator: 'readonly', self: 'readonly', performance: 'readonly', structuredClone: 'readonly', TextEncoder: 'readonly', TextDecoder: 'readonly' } },
    rules: {
      '@typescript-eslint/no-require-imports': 'off',
      '@typescript-eslint/no-unused-vars': ['error', { argsIgnorePattern: '^_', varsIgnorePattern: '^_' }],
      '@typescript-eslint/no-explicit-any': 'warn',
    },
  },
  {
    files: ['app/**/*.tsx', 'components/**/*.tsx', 'screens/**/*.tsx'],
    plugins: { 'react-native': reactNative },
    rules: {
      'react-native/no-inline-styles': 'error',
      'react-native/no-color-literals': 'error',
    },
  },
);
