// Installs (when missing) and runs a private MariaDB on loopback for Evalon: its own datadir
// under .data/, its own port, never the system server on 3306.
import { spawnSync } from 'node:child_process';
import fs from 'node:fs';
import path from 'node:path';
import { dataDir, ensureService, have, log, root, run, stopService } from './proc.mjs';

export const dbConfig = {
  host: '127.0.0.1',
  port: Number(process.env.EVALON_DB_PORT ?? 3307),
  user: process.env.EVALON_DB_USER ?? 'evalon',
  password: process.env.EVALON_DB_PASSWORD ?? 'evalon-local',
  database: process.env.EVALON_DB_NAME ?? 'evalon',
  testDatabase: process.env.EVALON_TEST_DB_NAME ?? 'evalon_test',
};

const dir = path.join(dataDir, 'mariadb');
const socket = path.join(dir, 'mariadb.sock');

function binary(name) {
  for (const p of [`/usr/sbin/${name}`, `/usr/bin/${name}`]) if (fs.existsSync(p)) return p;
  return name;
}

/** Installs Debian's mariadb-server when mariadbd is missing (sessions and CI run as root). */
export function ensureMariadbInstalled() {
  if (fs.existsSync('/usr/sbin/mariadbd') || have('mariadbd')) return;
  log('MariaDB is not installed: installing Debian package mariadb-server (about 20 s)');
  const env = { ...process.env, DEBIAN_FRONTEND: 'noninteractive' };
  run('apt-get', ['update', '-qq'], { env });
  run('apt-get', ['install', '-y', '-qq', 'mariadb-server'], { env });
  // The package starts the system server on 3306; Evalon never uses it, so leave it alone.
}

/** Creates the private datadir once. */
function ensureDatadir() {
  if (fs.existsSync(path.join(dir, 'mysql'))) return;
  fs.mkdirSync(dir, { recursive: true });
  log(`creating a private MariaDB datadir in ${path.relative(root, dir)}`);
  run(binary('mariadb-install-db'), [
    `--datadir=${dir}`,
    '--user=root',
    '--auth-root-authentication-method=normal',
    '--skip-test-db',
  ], { stdio: 'ignore' });
}

/** Runs SQL as root through the private socket. */
export function rootSql(sql) {
  const res = spawnSync(binary('mariadb'), ['--socket', socket, '-uroot', '-e', sql], {
    encoding: 'utf8',
  });
  if (res.status !== 0) throw new Error(`MariaDB refused: ${res.stderr}`);
  return res.stdout;
}

/** Installs, initialises and starts MariaDB; creates the app and test databases and user. */
export async function startMariadb() {
  ensureMariadbInstalled();
  ensureDatadir();
  const { reused } = await ensureService({
    name: 'mariadb',
    port: dbConfig.port,
    command: binary('mariadbd'),
    args: [
      '--no-defaults',
      `--datadir=${dir}`,
      `--socket=${socket}`,
      `--port=${dbConfig.port}`,
      '--bind-address=127.0.0.1',
      '--user=root',
      '--skip-name-resolve',
      '--character-set-server=utf8mb4',
      '--collation-server=utf8mb4_unicode_ci',
      '--innodb-buffer-pool-size=256M',
      '--max-connections=400',
      // Local data is disposable: trade durability for speed on a 2-core machine.
      '--innodb-flush-log-at-trx-commit=2',
      '--sync-binlog=0',
      `--pid-file=${path.join(dir, 'mariadbd.pid')}`,
    ],
    timeoutMs: 60_000,
  });
  // The socket can lag the TCP port by a moment.
  for (let i = 0; i < 50 && !fs.existsSync(socket); i++) await new Promise((r) => setTimeout(r, 100));
  const { user, password, database, testDatabase } = dbConfig;
  rootSql(
    [
      `CREATE DATABASE IF NOT EXISTS \`${database}\` CHARACTER SET utf8mb4 COLLATE utf8mb4_unicode_ci`,
      `CREATE DATABASE IF NOT EXISTS \`${testDatabase}\` CHARACTER SET utf8mb4 COLLATE utf8mb4_unicode_ci`,
      `CREATE USER IF NOT EXISTS '${user}'@'127.0.0.1' IDENTIFIED BY '${password}'`,
      `CREATE USER IF NOT EXISTS '${user}'@'localhost' IDENTIFIED BY '${password}'`,
      // Test runs create one database per Jest worker (evalon_test_w1, ...).
      `GRANT ALL PRIVILEGES ON \`${database}\`.* TO '${user}'@'127.0.0.1', '${user}'@'localhost'`,
      `GRANT ALL PRIVILEGES ON \`${testDatabase}%\`.* TO '${user}'@'127.0.0.1', '${user}'@'localhost'`,
    ].join(';'),
  );
  log(`MariaDB ${reused ? 'already running' : 'started'} on 127.0.0.1:${dbConfig.port}`);
}

export async function stopMariadb() {
  await stopService('mariadb');
}
