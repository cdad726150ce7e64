// Jest global setup for the server project: one database per Jest worker (evalon_test_w1, ...),
// each migrated to the latest schema. Workers only learn their JEST_WORKER_ID inside the
// worker, so every possible worker gets its database here, up front.
import mysql from 'mysql2/promise';
import { loadConfig } from '../src/config';
import { createDataSource, migrations } from '../src/database/data-source';
import { testDatabaseName } from './test-database';

/** Migration names in this checkout, to spot a database built from different migrations. */
function knownMigrationNames(): Set<string> {
  return new Set(migrations.map((M) => new M().name ?? M.name));
}

async function prepare(database: string): Promise<void> {
  const config = loadConfig({ ...process.env, EVALON_DB_NAME: database });
  const admin = await mysql.createConnection({
    host: config.db.host,
    port: config.db.port,
    user: config.db.user,
    password: config.db.password,
  });
  try {
    const [rows] = await admin.query<mysql.RowDataPacket[]>(
      'SELECT COUNT(*) AS n FROM information_schema.tables WHERE table_schema = ? AND table_name = ?',
      [database, 'migrations'],
    );
    let drop = process.env.EVALON_TEST_FRESH_DB === '1';
    if (!drop && Number(rows[0]?.n) > 0) {
      // A database migrated by another version of the migrations is rebuilt from scratch.
      const [applied] = await admin.query<mysql.RowDataPacket[]>(
        `SELECT name FROM \`${database}\`.migrations`,
      );
      const known = knownMigrationNames();
      drop = applied.some((r) => !known.has(String(r.name)));
    }
    if (drop) await admin.query(`DROP DATABASE IF EXISTS \`${database}\``);
    await admin.query(
      `CREATE DATABASE IF NOT EXISTS \`${database}\` CHARACTER SET utf8mb4 COLLATE utf8mb4_unicode_ci`,
    );
  } finally {
    await admin.end();
  }
  const dataSource = createDataSource(config.db);
  await dataSource.initialize();
  try {
    await dataSource.runMigrations({ transaction: 'each' });
  } finally {
    await dataSource.destroy();
  }
}

export default async function globalSetup(globalConfig: { maxWorkers?: number }): Promise<void> {
  const workers = Math.max(1, Number(globalConfig.maxWorkers ?? 1));
  for (let worker = 1; worker <= workers; worker++) {
    await prepare(testDatabaseName(String(worker)));
  }
}
