// `npm start`: sets up everything on a fresh machine and serves Evalon on one origin.
// Dependencies → MariaDB → local stand-ins → builds → migrations → demo data → server.
// Ctrl-C stops the server and every service this run started (services reused from an
// earlier run are left running for their owner).
import { spawn } from 'node:child_process';
import path from 'node:path';
import { buildServer, ensureNodeModules, ensurePdfRenderer, ensureWebBuild } from './lib/deps.mjs';
import { dbConfig, startMariadb, stopMariadb } from './lib/mariadb.mjs';
import { log, portOpen, root, run } from './lib/proc.mjs';
import { ports, startServices, stopServices } from './lib/services.mjs';

const port = Number(process.env.EVALON_PORT ?? 8080);
const started = { mariadb: false, services: [] };

async function shutdown(code) {
  await stopServices(started.services);
  if (started.mariadb) await stopMariadb();
  process.exit(code);
}

async function main() {
  const t0 = Date.now();
  ensureNodeModules();
  // The report's PDF checks (browser tests, support) render pages with pdftoppm.
  ensurePdfRenderer();
  if (await portOpen(port)) {
    throw new Error(
      `Port ${port} on 127.0.0.1 is taken (is Evalon already running?). ` +
        `Stop it, or set EVALON_PORT to another port.`,
    );
  }
  const { runningPid } = await import('./lib/proc.mjs');
  started.mariadb = !runningPid('mariadb');
  await startMariadb();
  started.services = await startServices();
  ensureWebBuild();
  buildServer();
  const env = {
    ...process.env,
    EVALON_PORT: String(port),
    EVALON_DB_PORT: String(dbConfig.port),
    EVALON_DB_NAME: dbConfig.database,
    EVALON_SMTP_PORT: String(ports.smtp),
  };
  run(process.execPath, [path.join(root, 'server/dist/migrate.js')], { env });
  run(process.execPath, [path.join(root, 'server/dist/demo.js')], { env });
  log(`ready to serve after ${((Date.now() - t0) / 1000).toFixed(1)} s`);
  const server = spawn(
    process.execPath,
    ['--enable-source-maps', path.join(root, 'server/dist/main.js')],
    {
      cwd: root,
      env,
      stdio: 'inherit',
    },
  );
  log(`Evalon: http://127.0.0.1:${port}  (inbox: http://127.0.0.1:${ports.inbox})`);
  log('demo accounts use the password evalon-demo; press Ctrl-C to stop');
  const stop = () => server.kill('SIGTERM');
  process.on('SIGINT', stop);
  process.on('SIGTERM', stop);
  server.on('exit', (code) => shutdown(code ?? 0));
}

main().catch(async (err) => {
  process.stderr.write(`\n[evalon] could not start: ${err.message}\n`);
  await shutdown(1);
});
