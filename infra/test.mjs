// `npm test`: everything from a fresh clone. Installs what is missing, starts MariaDB and the
// stand-ins, runs static checks, every Jest project, builds the app, runs the browser tests
// against a real server on a separate database, stops what it started, and ends with one line
// `N passed, N failed` summing all suites.
//
// Options: --only=jest|e2e|static (repeatable) to run a part; extra args after `--` go to Jest.
import { spawn, spawnSync } from 'node:child_process';
import fs from 'node:fs';
import path from 'node:path';
import {
  buildServer,
  ensureChromium,
  ensureNodeModules,
  ensurePdfRenderer,
  ensureWebBuild,
} from './lib/deps.mjs';
import { dbConfig, rootSql, startMariadb, stopMariadb } from './lib/mariadb.mjs';
import { dataDir, log, portOpen, root, runningPid, waitForPort } from './lib/proc.mjs';
import { ports, startServices, stopServices } from './lib/services.mjs';

const argv = process.argv.slice(2);
const dashdash = argv.indexOf('--');
const jestExtra = dashdash >= 0 ? argv.slice(dashdash + 1) : [];
const only = argv.filter((a) => a.startsWith('--only=')).map((a) => a.slice(7));
const wants = (part) => only.length === 0 || only.includes(part);

const reports = path.join(dataDir, 'reports');
const totals = { passed: 0, failed: 0, skipped: 0 };
const lines = [];
const started = { mariadb: false, services: [] };

function record(name, passed, failed, skipped = 0) {
  totals.passed += passed;
  totals.failed += failed;
  totals.skipped += skipped;
  lines.push(
    `${name.padEnd(12)} ${passed} passed, ${failed} failed${skipped ? `, ${skipped} skipped` : ''}`,
  );
}

function step(cmd, args, opts = {}) {
  const t = Date.now();
  const res = spawnSync(cmd, args, { cwd: root, stdio: 'inherit', ...opts });
  return { ok: res.status === 0, seconds: (Date.now() - t) / 1000 };
}

const bin = (p) => path.join(root, 'node_modules', p);

async function main() {
  const t0 = Date.now();
  ensureNodeModules();
  fs.mkdirSync(reports, { recursive: true });
  started.mariadb = !runningPid('mariadb');
  await startMariadb();
  started.services = await startServices();

  if (wants('static')) {
    log('static checks: eslint, tsc');
    const lint = step(process.execPath, [bin('eslint/bin/eslint.js'), '.', '--max-warnings=0']);
    record('lint', lint.ok ? 1 : 0, lint.ok ? 0 : 1);
    // The web app is type-checked by its build; these cover the server, packages and e2e tests.
    for (const project of [
      'server/tsconfig.json',
      'packages/tsconfig.json',
      'tests/e2e/tsconfig.json',
    ]) {
      const tsc = step(process.execPath, [bin('typescript/bin/tsc'), '-p', project]);
      record(`tsc ${project.split('/')[0]}`, tsc.ok ? 1 : 0, tsc.ok ? 0 : 1);
    }
  }

  if (wants('jest')) {
    log('unit, API and component tests (Jest)');
    const out = path.join(reports, 'jest.json');
    fs.rmSync(out, { force: true });
    step(process.execPath, [
      bin('jest/bin/jest.js'),
      '--ci',
      '--maxWorkers=2',
      '--json',
      `--outputFile=${out}`,
      ...jestExtra,
    ]);
    if (fs.existsSync(out)) {
      const r = JSON.parse(fs.readFileSync(out, 'utf8'));
      // A suite that failed to run (syntax error, failing hook) has no failing tests; count it.
      const brokenSuites = r.testResults.filter(
        (s) => s.status === 'failed' && s.assertionResults.every((a) => a.status !== 'failed'),
      ).length;
      record(
        'jest',
        r.numPassedTests,
        r.numFailedTests + brokenSuites,
        r.numPendingTests + r.numTodoTests,
      );
    } else {
      record('jest', 0, 1);
    }
  }

  if (wants('e2e')) {
    ensureChromium();
    ensurePdfRenderer();
    log('building the app for the browser tests');
    let built = true;
    try {
      ensureWebBuild();
      buildServer();
    } catch (err) {
      log(String(err.message));
      built = false;
    }
    record('build', built ? 1 : 0, built ? 0 : 1);
    if (built) await runE2e();
  }

  log(`finished in ${((Date.now() - t0) / 1000).toFixed(0)} s`);
  for (const l of lines) log(l);
}

async function registerWebhookEndpoint(url) {
  const base = `http://127.0.0.1:${ports.payments}/__fake/webhook-endpoints`;
  const existing = await (await fetch(base)).json();
  if (existing.data?.some((e) => e.url === url)) return;
  const res = await fetch(base, {
    method: 'POST',
    headers: { 'content-type': 'application/json' },
    body: JSON.stringify({
      url,
      secret: process.env.EVALON_PAYMENTS_WEBHOOK_SECRET ?? 'whsec_evalon_local',
    }),
  });
  if (!res.ok)
    throw new Error(`payments stand-in refused the webhook endpoint: ${await res.text()}`);
}

async function runE2e() {
  const port = Number(process.env.EVALON_E2E_PORT ?? 8180);
  if (await portOpen(port)) throw new Error(`Port ${port} is taken; set EVALON_E2E_PORT.`);
  const database = `${dbConfig.testDatabase}_e2e`;
  rootSql(
    `DROP DATABASE IF EXISTS \`${database}\`; CREATE DATABASE \`${database}\` CHARACTER SET utf8mb4 COLLATE utf8mb4_unicode_ci`,
  );
  const env = {
    ...process.env,
    EVALON_PORT: String(port),
    EVALON_DB_NAME: database,
    EVALON_PUBLIC_URL: `http://127.0.0.1:${port}`,
    EVALON_LOG_LEVEL: 'warn',
    EVALON_E2E_PORT: String(port),
    EVALON_INBOX_URL: `http://127.0.0.1:${ports.inbox}`,
  };
  const node = process.execPath;
  if (!step(node, [path.join(root, 'server/dist/migrate.js')], { env }).ok)
    return record('e2e', 0, 1);
  if (!step(node, [path.join(root, 'server/dist/demo.js')], { env }).ok) return record('e2e', 0, 1);
  const logFile = fs.openSync(path.join(dataDir, 'logs', 'e2e-server.log'), 'w');
  const server = spawn(node, ['--enable-source-maps', path.join(root, 'server/dist/main.js')], {
    cwd: root,
    env,
    stdio: ['ignore', logFile, logFile],
  });
  try {
    await waitForPort(port, 'the Evalon server for browser tests');
    // The payments stand-in may have been started for `npm start` (webhooks to :8080); make it
    // deliver to this server too. Duplicate deliveries are harmless: each event id counts once.
    await registerWebhookEndpoint(`http://127.0.0.1:${port}/api/webhooks/payments`);
    const out = path.join(reports, 'playwright.json');
    fs.rmSync(out, { force: true });
    log('browser tests (Playwright, Debian Chromium)');
    // EVALON_E2E_ARGS narrows a local run (e.g. "tests/e2e/visits.e2e.ts" or "--grep receipt").
    const extra = (process.env.EVALON_E2E_ARGS ?? '').split(' ').filter(Boolean);
    step(
      node,
      [bin('@playwright/test/cli.js'), 'test', '-c', 'tests/e2e/playwright.config.ts', ...extra],
      {
        env: { ...env, PLAYWRIGHT_JSON_OUTPUT_NAME: out },
      },
    );
    if (fs.existsSync(out)) {
      const s = JSON.parse(fs.readFileSync(out, 'utf8')).stats;
      record('e2e', s.expected + (s.flaky ?? 0), s.unexpected, s.skipped);
    } else {
      record('e2e', 0, 1);
    }
  } finally {
    server.kill('SIGTERM');
  }
}

let code = 0;
try {
  await main();
} catch (err) {
  process.stderr.write(`\n[evalon] test run stopped: ${err.stack ?? err}\n`);
  totals.failed += 1;
} finally {
  await stopServices(started.services);
  if (started.mariadb) await stopMariadb();
}
if (totals.failed > 0) code = 1;
process.stdout.write(
  `${totals.passed} passed, ${totals.failed} failed${totals.skipped ? `, ${totals.skipped} skipped` : ''}\n`,
);
process.exit(code);
