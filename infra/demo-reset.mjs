// `npm run demo:reset`: empties the app database and loads the demo data again.
import path from 'node:path';
import { buildServer, ensureNodeModules } from './lib/deps.mjs';
import { startMariadb } from './lib/mariadb.mjs';
import { root, run } from './lib/proc.mjs';

ensureNodeModules();
await startMariadb();
buildServer();
run(process.execPath, [path.join(root, 'server/dist/migrate.js')]);
run(process.execPath, [path.join(root, 'server/dist/demo.js'), '--reset']);
