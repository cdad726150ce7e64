import type { Express } from 'express';
import type { DataSource } from 'typeorm';
import { createApp } from '../../src/app';
import { loadConfig, type Config } from '../../src/config';
import { createDataSource } from '../../src/database/data-source';
import { createLogger } from '../../src/logger';
import type { Mailer } from '../../src/notifications/domain/mailer';
import {
  createOutboxWorker,
  type OutboxWorker,
} from '../../src/notifications/domain/outbox-worker';
import { loanNotifierFromConfig } from '../../src/notifications';
import { RecordingMailer } from './recording-mailer';

/** An app on this worker's database, with the pieces a test needs to look behind it. */
export interface TestApp {
  app: Express;
  config: Config;
  dataSource: DataSource;
  /** The recording mailer, unless the test passed its own. */
  mail: RecordingMailer;
  /** The outbox worker sending to the mailer, unless the test turned it off. */
  worker: OutboxWorker | null;
  close(): Promise<void>;
}

/**
 * Builds the real app (real database, real session store) with environment overrides, plus an
 * outbox worker that hands e-mail to a {@link RecordingMailer} (or to `mailer` when given).
 * The worker polls every 50 ms and is woken at once after a transaction that enqueued commits;
 * `outboxWorker: false` leaves e-mail in the outbox for the test to drain itself.
 */
export async function startTestApp(
  env: Record<string, string> = {},
  options: { mailer?: Mailer; outboxWorker?: boolean; now?: () => Date } = {},
): Promise<TestApp> {
  const config = loadConfig({ ...process.env, ...env });
  const dataSource = createDataSource(config.db);
  await dataSource.initialize();
  const mail = new RecordingMailer();
  const logger = createLogger(config.logLevel);
  const mailer = options.mailer ?? mail;
  // `now`: the app's clock for use cases (e.g. a visit's days having come); sessions keep real time.
  const app = createApp({
    config,
    dataSource,
    mailer,
    logger,
    ...(options.now ? { now: options.now } : {}),
  });
  const worker =
    options.outboxWorker === false
      ? null
      : createOutboxWorker(
          { ...config, outbox: { ...config.outbox, pollIntervalMs: 50 } },
          // Renders the notices payment confirmations deferred, as the server's worker does.
          { dataSource, mailer, logger, renderLoan: loanNotifierFromConfig(config) },
        );
  worker?.start();
  return {
    app,
    config,
    dataSource,
    mail,
    worker,
    close: async () => {
      await worker?.stop();
      if (dataSource.isInitialized) await dataSource.destroy();
    },
  };
}
