// One Jest run, several projects: pure packages, the server (against the real MariaDB), the web
// client (jest-preset-angular) and the cross-cutting suites in tests/.
const path = require('node:path');

const tsTransform = {
  '^.+\\.(ts|js|mjs)$': ['ts-jest', { tsconfig: path.join(__dirname, 'tsconfig.jest.json') }],
};
const moduleNameMapper = { '^@evalon/([a-z0-9-]+)$': '<rootDir>/packages/$1/src/index.ts' };
// ESM-only dependencies that Jest's CommonJS runtime must have transpiled.
const esmOnly = [
  '@borewit',
  'file-type',
  'ical-generator',
  'strtok3',
  'token-types',
  'peek-readable',
  'uint8array-extras',
  '@tokenizer',
];
const transformIgnorePatterns = [`node_modules/(?!(${esmOnly.join('|')})/)`];

module.exports = {
  projects: [
    {
      displayName: 'packages',
      rootDir: __dirname,
      testEnvironment: 'node',
      testMatch: ['<rootDir>/packages/*/src/**/*.spec.ts'],
      transform: tsTransform,
      moduleNameMapper,
      transformIgnorePatterns,
    },
    {
      displayName: 'server',
      rootDir: __dirname,
      testEnvironment: 'node',
      testMatch: ['<rootDir>/server/src/**/*.spec.ts', '<rootDir>/server/test/**/*.test.ts'],
      transform: tsTransform,
      moduleNameMapper,
      transformIgnorePatterns,
      globalSetup: '<rootDir>/server/test/global-setup.ts',
      setupFiles: ['<rootDir>/server/test/env.ts'],
      // API tests talk to a real MariaDB (and sometimes real SMTP) on a 2-core machine that may
      // be busy with other suites: Jest's 5 s default is too tight for them.
      testTimeout: 30_000,
    },
    {
      // Cross-cutting suites (outages, crashes, duplicate deliveries) against real processes.
      displayName: 'reliability',
      rootDir: __dirname,
      testEnvironment: 'node',
      testMatch: ['<rootDir>/tests/reliability/**/*.test.ts'],
      transform: tsTransform,
      moduleNameMapper,
      transformIgnorePatterns,
      globalSetup: '<rootDir>/server/test/global-setup.ts',
      setupFiles: ['<rootDir>/server/test/env.ts'],
      testTimeout: 120_000,
    },
    {
      // Repository-wide guards (retired demo names, ...): plain file reads, no services.
      displayName: 'guards',
      rootDir: __dirname,
      testEnvironment: 'node',
      testMatch: ['<rootDir>/tests/guards/**/*.test.ts'],
      // The retired-names list is a CommonJS module shared with the screenshot script.
      moduleFileExtensions: ['ts', 'js', 'cjs', 'json'],
      transform: tsTransform,
    },
    {
      displayName: 'infra',
      rootDir: __dirname,
      testEnvironment: 'node',
      testMatch: ['<rootDir>/infra/**/*.spec.ts'],
      transform: tsTransform,
      moduleNameMapper,
      transformIgnorePatterns,
    },
    {
      displayName: 'web',
      rootDir: path.join(__dirname, 'apps/web'),
      preset: 'jest-preset-angular',
      setupFilesAfterEnv: ['<rootDir>/src/test-setup.ts'],
      testMatch: ['<rootDir>/src/**/*.spec.ts'],
      transform: {
        '^.+\\.(ts|js|mjs|html|svg)$': [
          'jest-preset-angular',
          { tsconfig: '<rootDir>/tsconfig.spec.json', stringifyContentPathRegex: '\\.(html|svg)$' },
        ],
      },
      moduleNameMapper: { '^@evalon/([a-z0-9-]+)$': '<rootDir>/../../packages/$1/src/index.ts' },
    },
  ],
};
