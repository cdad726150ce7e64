// Starts the Evalon server: reads the configuration, connects to MariaDB and listens.
// Migrations are not run here; the start script (and `npm run db:migrate`) runs them first.
import { createApp } from './app';
import { ConfigError, loadConfig, type Config } from './config';
import { createDataSource } from './database/data-source';
import { sweepExpiredSessions } from './http/session';
import { createLogger } from './logger';
import { SmtpMailer } from './notifications/mailer';
import { createOutboxWorker } from './notifications/outbox-worker';
import { createPaymentsClient, createPaymentsDeps, startDepositExpiryJob } from './payments';
import { createShipmentsDeps, startShipmentAlertsJob } from './shipments';

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
  // Approved loans whose deposit deadline passed expire; any number of processes may run it.
  const expiryJob = config.payments.expiryJob
    ? startDepositExpiryJob(
        createPaymentsDeps({ config, dataSource, logger, provider: paymentsClient }),
        config.payments.expiryIntervalMs,
      )
    : null;
  if (expiryJob) {
    logger.info({ intervalMs: config.payments.expiryIntervalMs }, 'deposit expiry job started');
  }
  // Shipment alerts (at risk, overdue, return reminders); FOR UPDATE SKIP LOCKED, so any
  // number of processes may run it. Off with EVALON_SHIPMENT_ALERTS_INTERVAL_MS=0.
  const alertsIntervalMs = Number(process.env.EVALON_SHIPMENT_ALERTS_INTERVAL_MS ?? 60_000);
  const alertsJob =
    alertsIntervalMs > 0
      ? startShipmentAlertsJob(
          createShipmentsDeps({
            config,
            dataSource,
            logger,
            payments: createPaymentsDeps({ config, dataSource, logger, provider: paymentsClient }),
          }),
          alertsIntervalMs,
        )
      : null;
  // The outbox worker sends what transactions enqueued; any number of processes may run one.
  const outboxWorker = config.outbox.worker
    ? createOutboxWorker(config, { dataSource, mailer, logger })
    : null;
  outboxWorker?.start();
  if (outboxWorker) {
    logger.info(
      { worker: outboxWorker.id, smtp: `${config.smtp.host}:${config.smtp.port}` },
      'outbox worker started',
    );
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
  const stop = (signal: string) => {
    if (stopping) return;
    stopping = true;
    logger.info({ signal }, 'Evalon server stopping');
    clearInterval(sweeper);
    // The worker finishes the message it is sending and hands the rest of its batch back, so
    // nothing stays `sending` until its lease runs out.
    const workerStopped = Promise.all([
      outboxWorker?.stop() ?? Promise.resolve(),
      expiryJob?.stop() ?? Promise.resolve(),
      alertsJob?.stop() ?? Promise.resolve(),
    ]).catch((err: unknown) => logger.warn({ err }, 'background work did not stop cleanly'));
    server.close(() => {
      void workerStopped.then(() => {
        mailer.close();
        dataSource
          .destroy()
          .catch(() => undefined)
          .finally(() => process.exit(0));
      });
    });
    server.closeIdleConnections();
    // Busy keep-alive connections can hold close() open; do not wait for ever.
    setTimeout(() => process.exit(0), 5_000).unref();
  };
  process.on('SIGINT', () => stop('SIGINT'));
  process.on('SIGTERM', () => stop('SIGTERM'));
}

main().catch((error: unknown) => {
  process.stderr.write(
    `Evalon server failed to start: ${(error as Error).stack ?? String(error)}\n`,
  );
  process.exit(1);
});
