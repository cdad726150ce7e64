import type { Express } from 'express';
import type { DataSource } from 'typeorm';
import { createApp } from '../../src/app';
import { loadConfig, type Config } from '../../src/config';
import { createDataSource } from '../../src/database/data-source';
import { createLogger } from '../../src/logger';
import type { Mailer } from '../../src/notifications/mailer';
import { RecordingMailer } from './recording-mailer';

/** An app on this worker's database, with the pieces a test needs to look behind it. */
export interface TestApp {
  app: Express;
  config: Config;
  dataSource: DataSource;
  /** The recording mailer, unless the test passed its own. */
  mail: RecordingMailer;
  close(): Promise<void>;
}

/**
 * Builds the real app (real database, real session store) with environment overrides.
 * E-mail goes to a {@link RecordingMailer} unless `mailer` is given.
 */
export async function startTestApp(
  env: Record<string, string> = {},
  options: { mailer?: Mailer } = {},
): Promise<TestApp> {
  const config = loadConfig({ ...process.env, ...env });
  const dataSource = createDataSource(config.db);
  await dataSource.initialize();
  const mail = new RecordingMailer();
  const app = createApp({
    config,
    dataSource,
    mailer: options.mailer ?? mail,
    logger: createLogger(config.logLevel),
  });
  return {
    app,
    config,
    dataSource,
    mail,
    close: async () => {
      if (dataSource.isInitialized) await dataSource.destroy();
    },
  };
}
