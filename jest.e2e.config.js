// Browser tests: playwright-core driving Debian's Chromium against the built app, started on a
// fresh database with the demo data (spec/e2e/support/global-setup.ts). One file at a time.
module.exports = {
  displayName: 'e2e',
  rootDir: __dirname,
  testEnvironment: 'node',
  testMatch: ['<rootDir>/spec/e2e/**/*.e2e.ts'],
  transform: {
    '^.+\\.ts$': ['ts-jest', { tsconfig: '<rootDir>/tsconfig.spec-server.json', diagnostics: false }],
  },
  moduleNameMapper: { '^@shared/(.*)$': '<rootDir>/shared/$1' },
  // E2E_COUNT_ONLY (SKIP_E2E=1 npm test): only count the tests, so neither server nor browser.
  ...(process.env['E2E_COUNT_ONLY'] ? {} : {
    globalSetup: '<rootDir>/spec/e2e/support/global-setup.ts',
    globalTeardown: '<rootDir>/spec/e2e/support/global-teardown.ts',
  }),
  maxWorkers: 1,
  testTimeout: 60_000,
};
