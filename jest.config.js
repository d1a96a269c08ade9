/**
 * One jest run, four projects:
 *  - domain: pure code of shared/ and checklists/ (node)
 *  - api:    the Express app in-process against a real PostgreSQL (node)
 *  - app:    React Native components through jest-expo
 *  - e2e:    playwright-core driving Debian's chromium against the real web build
 * scripts/test.mjs provisions PostgreSQL and the web build before calling jest.
 *
 * ts-jest reports diagnostics. tsconfig.server.json sets isolatedModules, so ts-jest compiles
 * each file alone and reports what one file shows (syntax, isolated-module errors); whole-program
 * type errors in tests/unit, tests/api, tests/e2e and tests/app are the typecheck gate's
 * (`npm run typecheck` covers those folders), which keeps jest's start-up quick.
 */
const tsJest = ['ts-jest', { tsconfig: '<rootDir>/tsconfig.server.json', diagnostics: true }];
const nodeProject = (name, extra = {}) => ({
  displayName: name,
  testEnvironment: 'node',
  transform: { '^.+\\.tsx?$': tsJest },
  moduleNameMapper: { '^@/(.*)$': '<rootDir>/$1' },
  testMatch: [`<rootDir>/tests/${name === 'domain' ? 'unit' : name}/**/*.test.ts`],
  ...extra,
});

module.exports = {
  projects: [
    nodeProject('domain'),
    nodeProject('api', { setupFilesAfterEnv: ['<rootDir>/tests/api/setup-timeout.ts'] }),
    {
      displayName: 'app',
      preset: 'jest-expo',
      testMatch: ['<rootDir>/tests/app/**/*.test.tsx'],
      moduleNameMapper: { '^@/(.*)$': '<rootDir>/$1' },
      setupFiles: ['<rootDir>/tests/app/setup.ts'],
    },
    nodeProject('e2e', { setupFilesAfterEnv: ['<rootDir>/tests/e2e/setup-timeout.ts'] }),
  ],
};
