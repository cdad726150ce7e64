// Runs in every server test file before it loads: points the configuration at this worker's
// database and keeps the log quiet.
import { testDatabaseName } from './test-database';

process.env.NODE_ENV = 'test';
process.env.EVALON_DB_NAME = testDatabaseName(process.env.JEST_WORKER_ID);
process.env.EVALON_LOG_LEVEL ??= 'silent';
// Every test request comes from 127.0.0.1; rate-limit.test.ts sets its own small limits.
process.env.EVALON_LOGIN_MAX_FAILURES_PER_IP ??= '1000';
// Jest 30 reads `testTimeout` from the root configuration only (jest-circus takes
// globalConfig.testTimeout), so the server project's `testTimeout: 30_000` in jest.config.ts
// never applied and API tests ran with the 5 s default. Set it here for every server test file.
jest.setTimeout(30_000);
