// Runs pending migrations against the configured database (`npm run db:migrate`, start script).
import { ConfigError, loadConfig } from '../config';
import { createDataSource } from './data-source';

async function main(): Promise<void> {
  const config = loadConfig();
  const dataSource = createDataSource(config.db);
  await dataSource.initialize();
  try {
    const applied = await dataSource.runMigrations({ transaction: 'each' });
    const where = `${config.db.database} on ${config.db.host}:${config.db.port}`;
    if (applied.length === 0) console.log(`[evalon] database ${where} is up to date`);
    for (const m of applied) console.log(`[evalon] applied migration ${m.name} to ${where}`);
  } finally {
    await dataSource.destroy();
  }
}

main().catch((error: unknown) => {
  console.error(error instanceof ConfigError ? error.message : error);
  process.exit(1);
});
