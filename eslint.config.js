// Lint: TypeScript rules everywhere; React's rules of hooks in the app; in the app, no raw colours
// or inline style literals, so constants/theme.ts stays the one source of the look; and the walls
// between layers (shared/ pure, app/ never reaching into server/). Import cycles and path-based
// walls are checked by dependency-cruiser (.dependency-cruiser.cjs), part of `npm run lint`.
const js = require('@eslint/js');
const tseslint = require('typescript-eslint');
const reactNative = require('eslint-plugin-react-native');
const reactHooks = require('eslint-plugin-react-hooks');
const { builtinModules } = require('node:module');

// Node built-ins under both spellings ('fs' and 'node:fs').
const nodeBuiltins = [...builtinModules, ...builtinModules.map((m) => `node:${m}`)];

module.exports = tseslint.config(
  { ignores: ['node_modules/**', 'dist/**', '.data/**', '.tmp/**', '.expo/**', 'coverage/**', '**/*.coefficients.ts'] },
  js.configs.recommended,
  ...tseslint.configs.recommended,
  {
    languageOptions: {
      globals: {
        console: 'readonly',
        process: 'readonly',
        require: 'readonly',
        module: 'writable',
        __dirname: 'readonly',
        setTimeout: 'readonly',
        clearTimeout: 'readonly',
        setInterval: 'readonly',
        clearInterval: 'readonly',
        URL: 'readonly',
        fetch: 'readonly',
        Buffer: 'readonly',
        window: 'readonly',
        document: 'readonly',
        navigator: 'readonly',
        self: 'readonly',
        performance: 'readonly',
        structuredClone: 'readonly',
        TextEncoder: 'readonly',
        TextDecoder: 'readonly',
      },
    },
    rules: {
      '@typescript-eslint/no-require-imports': 'off',
      '@typescript-eslint/no-unused-vars': ['error', { argsIgnorePattern: '^_', varsIgnorePattern: '^_' }],
      '@typescript-eslint/no-explicit-any': 'warn',
    },
  },
  {
    files: [
      'app/**/*.{ts,tsx}',
      'components/**/*.{ts,tsx}',
      'screens/**/*.{ts,tsx}',
      'hooks/**/*.{ts,tsx}',
      'offline/**/*.{ts,tsx}',
      'lib/**/*.{ts,tsx}',
      'tests/app/**/*.{ts,tsx}',
    ],
    plugins: { 'react-hooks': reactHooks },
    rules: {
      'react-hooks/rules-of-hooks': 'error',
      'react-hooks/exhaustive-deps': 'error',
    },
  },
  {
    // Pure domain code: the phone and the server run it alike, so no UI, HTTP, database or Node.
    files: ['shared/**/*.ts'],
    rules: {
      'no-restricted-imports': [
        'error',
        {
          paths: nodeBuiltins.map((name) => ({ name, message: 'shared/ is pure domain code: no Node built-ins.' })),
          patterns: [
            {
              group: [
                'react',
                'react-*',
                'react/*',
                'react-native',
                'react-native/*',
                'expo',
                'expo-*',
                'expo-*/*',
                '@expo/*',
                '@tanstack/*',
              ],
              message: 'shared/ is pure domain code: no React or Expo.',
            },
            {
              group: [
                'express',
                'express-*',
                'multer',
                'helmet',
                'pino',
                'pino-*',
                'nodemailer',
                'jsonwebtoken',
                'argon2',
                'sharp',
                '@aws-sdk/*',
              ],
              message: 'shared/ is pure domain code: no server libraries.',
            },
            {
              group: ['typeorm', 'typeorm/*', 'pg', 'pg-*', 'expo-sqlite'],
              message: 'shared/ is pure domain code: no database.',
            },
            {
              group: ['@/*', '!@/shared', '!@/shared/*'],
              message: 'shared/ imports only shared/ and its npm libraries.',
            },
          ],
        },
      ],
    },
  },
  {
    files: [
      'app/**/*.{ts,tsx}',
      'screens/**/*.{ts,tsx}',
      'components/**/*.{ts,tsx}',
      'hooks/**/*.{ts,tsx}',
      'offline/**/*.{ts,tsx}',
      'lib/**/*.{ts,tsx}',
    ],
    rules: {
      'no-restricted-imports': [
        'error',
        {
          patterns: [
            {
              group: ['@/server', '@/server/*', '**/server/*'],
              message: 'The app never imports server/ code; share it through shared/.',
            },
          ],
        },
      ],
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
