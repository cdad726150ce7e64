// `npm run db:migration:create -- <name>`: a new, empty migration in server/src/database/migrations,
// written by TypeORM's own CLI (timestamped class name), then formatted with Prettier. Register the
// class in the owning component's front door (`migrations` in server/src/<component>/index.ts);
// server/test/schema.test.ts then checks that the entities and the migrated schema agree.
import fs from 'node:fs';
import path from 'node:path';
import { root, run } from './lib/proc.mjs';

const name = process.argv[2];
if (!name || !/^[a-z][a-z0-9-]*$/.test(name)) {
  console.error('usage: npm run db:migration:create -- <name in kebab-case, e.g. shipments>');
  process.exit(2);
}
const dir = path.join(root, 'server/src/database/migrations');
const before = new Set(fs.readdirSync(dir));
run(path.join(root, 'node_modules/.bin/typeorm'), ['migration:create', path.join(dir, name)]);
const created = fs.readdirSync(dir).filter((f) => !before.has(f));
for (const file of created) {
  run(path.join(root, 'node_modules/.bin/prettier'), ['--write', path.join(dir, file)]);
  console.log(`Next: add the class in ${file} to the owning component's migrations (its index.ts).`);
}
