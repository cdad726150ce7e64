// Starts the Evalon server: reads the configuration, connects to MariaDB and listens.
// Migrations are not run here; the start script (and `npm run db:migrate`) runs them first.
import { createApp } from './app';
import { ConfigError, loadConfig, type Config } from './config';
import { createDataSource } from './database/data-source';
import { sweepExpiredSessions } from './http/session';
import { createLogger } from './logger';
import { serverComponents } from './components';
import { SmtpMailer } from './notifications';
import { createPaymentsClient } from './payments';

const sessionSweepIntervalMs = 15 * 60_000;

function fail(message: string): never {
  process.stderr.write(`${message}\n`);
  process.exit(1);
}

async function main(): Promise<void> {
  let config: Config;
  try {
    config = loadConfig();
  } catch (error) {
    if (error instanceof ConfigError) fail(error.message);
    throw error;
  }
  const logger = createLogger(config.logLevel);
  const dataSource = createDataSource(config.db);
  try {
    await dataSource.initialize();
  } catch (error) {
    fail(
      `Evalon cannot reach MariaDB at ${config.db.host}:${config.db.port} (database "${config.db.database}", ` +
        `user "${config.db.user}"): ${(error as Error).message}\n` +
        'Start it with `npm start` (which also migrates), or check the EVALON_DB_* variables.',
    );
  }
  if (await dataSource.showMigrations()) {
    logger.warn('the database has migrations that have not run: run `npm run db:migrate`');
  }

  const mailer = new SmtpMailer(config.smtp, { timeoutMs: config.outbox.smtpTimeoutMs });
  // One SDK client per process, shared by the routes and the deposit expiry job.
  const paymentsClient = createPaymentsClient(config.payments);
  const app = createApp({ config, dataSource, mailer, logger, paymentsClient });
  // The components' background work (the outbox worker, the deposit expiry job, ...); any
  // number of processes may run each.
  const jobs = serverComponents.flatMap(
    (c) => c.jobs?.({ config, dataSource, logger, mailer, paymentsClient }) ?? [],
  );
  for (const job of jobs) {
    job.start();
    logger.info(job.details, `${job.name} started`);
  }
  const server = app.listen(config.http.port, config.http.host);
  server.on('listening', () => {
    const address = server.address();
    const port = typeof address === 'object' && address ? address.port : config.http.port;
    const url = `http://${config.http.host}:${port}`;
    logger.info({ url, publicUrl: config.http.publicUrl }, `Evalon server listening on ${url}`);
  });
  server.on('error', (error: NodeJS.ErrnoException) => {
    if (error.code === 'EADDRINUSE') {
      fail(
        `Port ${config.http.port} on ${config.http.host} is already in use. ` +
          'Stop the other program or choose another port with EVALON_PORT.',
      );
    }
    fail(`Evalon could not listen: ${error.message}`);
  });

  const sweeper = setInterval(() => {
    sweepExpiredSessions(dataSource).catch((err: unknown) =>
      logger.warn({ err }, 'session sweep failed'),
    );
  }, sessionSweepIntervalMs);
  sweeper.unref();

  let stopping = false;
  /** Stops taking requests, lets the jobs finish, closes the pool; exits with `exitCode`. */
  const stop = (signal: string, exitCode = 0) => {
    if (stopping) return;
    stopping = true;
    process.exitCode = exitCode;
    logger.info({ signal }, 'Evalon server stopping');
    clearInterval(sweeper);
    // Each job finishes the work in hand (the outbox worker hands the rest of its batch back, so
    // nothing stays `sending` until its lease runs out).
    const workerStopped = Promise.all(jobs.map((j) => j.stop())).catch((err: unknown) =>
      logger.warn({ err }, 'background work did not stop cleanly'),
    );
    server.close(() => {
      void workerStopped.then(() => {
        mailer.close();
        dataSource
          .destroy()
          .catch(() => undefined)
          .finally(() => process.exit(exitCode));
      });
    });
    server.closeIdleConnections();
    // Busy keep-alive connections can hold close() open; do not wait for ever.
    setTimeout(() => process.exit(exitCode), 5_000).unref();
  };
  process.on('SIGINT', () => stop('SIGINT'));
  process.on('SIGTERM', () => stop('SIGTERM'));
  // A promise nobody awaited failed, or an exception escaped every handler: the process may be
  // in a state no code planned for, so log what happened and stop the same clean way, with a
  // failing exit code so a supervisor restarts it (rather than serve on half broken).
  process.on('unhandledRejection', (reason: unknown) => {
    logger.fatal({ err: reason }, 'unhandled promise rejection; stopping');
    stop('unhandledRejection', 1);
  });
  process.on('uncaughtException', (error: Error) => {
    logger.fatal({ err: error }, 'uncaught exception; stopping');
    stop('uncaughtException', 1);
  });
}

main().catch((error: unknown) => {
  process.stderr.write(
    `Evalon server failed to start: ${(error as Error).stack ?? String(error)}\n`,
  );
  process.exit(1);
});
