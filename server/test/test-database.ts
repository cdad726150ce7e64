/** Prefix of test databases; the MariaDB user may create databases named `evalon_test*`. */
export const testDatabasePrefix = process.env.EVALON_TEST_DB_NAME ?? 'evalon_test';

/** The database of one Jest worker, e.g. `evalon_test_w1`. */
export function testDatabaseName(workerId: string | undefined): string {
  return `${testDatabasePrefix}_w${workerId ?? '1'}`;
}
