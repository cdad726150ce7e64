import { loadConfig } from '../src/config';
import { appTables, createDataSource } from '../src/database/data-source';

// The entities (what the code reads and writes through TypeORM) against the schema the
// migrations built on this worker's database, checked with TypeORM's own schema builder: the
// queries it would run to make the database match the entities must be none. A column or index
// added to an entity without a migration (or the other way round) fails here.
describe('schema', () => {
  const dataSource = createDataSource(loadConfig().db);
  beforeAll(() => dataSource.initialize());
  afterAll(() => dataSource.destroy());

  it('has no difference between the entities and the migrated database', async () => {
    const pending = await dataSource.driver.createSchemaBuilder().log();
    expect(pending.upQueries.map((q) => q.query)).toEqual([]);
  });

  it('lists every table the migrations made, and only those, as the app tables', async () => {
    // TypeORM's own tables are not the app's: `migrations` (the migrations run) and
    // `typeorm_metadata` (the expressions of generated columns, which its schema builder reads).
    const rows: { name: string }[] = await dataSource.query(
      `SELECT table_name AS name FROM information_schema.tables
        WHERE table_schema = DATABASE() AND table_type = 'BASE TABLE'
          AND table_name NOT IN ('migrations', 'typeorm_metadata')`,
    );
    expect(rows.map((r) => r.name).sort()).toEqual([...appTables].sort());
  });

  it('maps every entity to one of the app tables', () => {
    const tables = new Set<string>(appTables);
    for (const meta of dataSource.entityMetadatas) expect(tables).toContain(meta.tableName);
  });
});
