// One jest run for everything except the browser tests (see jest.e2e.config.js).
// Projects: the award engine (no database), the server (real PostgreSQL from the bootstrap),
// and the Angular components (jsdom, zoneless).
const { createCjsPreset } = require('jest-preset-angular/presets');

const serverTransform = {
  '^.+\\.ts$': ['ts-jest', {
    tsconfig: '<rootDir>/tsconfig.spec-server.json',
    diagnostics: false,
  }],
};
const sharedAlias = { '^@shared/(.*)$': '<rootDir>/shared/$1' };

module.exports = {
  // Real PostgreSQL, mail and solver workers on a shared 2-core machine: generous limits, no timing
  // asserted. Jest reads testTimeout here only (a project's own is ignored); a file that needs more
  // sets jest.setTimeout.
  testTimeout: 60_000,
  // Two workers even on two cores: most of a server test's time is spent waiting on PostgreSQL,
  // so a second file runs in that time (jest's default here would be one, cores − 1).
  maxWorkers: 2,
  projects: [
    {
      displayName: 'award',
      rootDir: __dirname,
      testEnvironment: 'node',
      testMatch: ['<rootDir>/spec/award/**/*.spec.ts'],
      transform: serverTransform,
      moduleNameMapper: sharedAlias,
    },
    {
      displayName: 'server',
      rootDir: __dirname,
      testEnvironment: 'node',
      testMatch: ['<rootDir>/spec/server/**/*.spec.ts'],
      transform: serverTransform,
      moduleNameMapper: sharedAlias,
      setupFiles: ['<rootDir>/spec/support/env.ts'],
    },
    {
      displayName: 'components',
      rootDir: __dirname,
      ...createCjsPreset({
        testEnvironment: 'jest-preset-angular/environments/jest-jsdom-env',
        tsconfig: '<rootDir>/tsconfig.spec.json',
      }),
      setupFilesAfterEnv: ['<rootDir>/src/test-setup.ts'],
      testMatch: ['<rootDir>/src/**/*.spec.ts'],
      moduleNameMapper: sharedAlias,
    },
  ],
};
