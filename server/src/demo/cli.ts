// Loads the demo data: `tsx server/src/demo/cli.ts` into an empty database only, or with
// `--reset` after emptying every application table (all existing data is lost).
import { ConfigError, loadConfig } from '../config';
import { createDataSource } from '../database/data-source';
import { isDatabaseEmpty, loadDemoData, truncateAppTables } from './load-demo-data';
import { demoPassword } from './demo-data';

async function main(): Promise<void> {
  const reset = process.argv.includes('--reset');
  const config = loadConfig();
  const dataSource = createDataSource(config.db);
  await dataSource.initialize();
  try {
    if (reset) {
      await truncateAppTables(dataSource);
      console.log(`[evalon] emptied the application tables of ${config.db.database}`);
    } else if (!(await isDatabaseEmpty(dataSource))) {
      console.log(
        `[evalon] ${config.db.database} already has data: demo data not loaded (use --reset to replace it)`,
      );
      return;
    }
    const summary = await loadDemoData(dataSource, new Date(), config.payments.depositWindowMs);
    console.log(
      `[evalon] demo data loaded into ${config.db.database}: ${summary.organisations} organisations, ` +
        `${summary.sites} sites, ${summary.people} people, ${summary.models} models, ${summary.units} units, ` +
        `${summary.loans} loans, ${summary.maintenanceHolds} maintenance holds, ` +
        `${summary.proctors ?? 0} proctor profiles, ${summary.visits ?? 0} proctoring visits ` +
        `(password for every demo account: ${demoPassword})`,
    );
  } finally {
    await dataSource.destroy();
  }
}

main().catch((error: unknown) => {
  console.error(error instanceof ConfigError ? error.message : error);
  process.exit(1);
});
