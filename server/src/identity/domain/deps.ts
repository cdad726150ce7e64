import type { DataSource } from 'typeorm';
import type { Logger } from 'pino';
import type { Mailer } from '../../notifications/mailer';

/** What the identity use cases need from the outside world. */
export interface IdentityDeps {
  dataSource: DataSource;
  mailer: Mailer;
  logger: Logger;
  /** Base of links in e-mails, e.g. `http://127.0.0.1:8080`. */
  publicUrl: string;
  /** The clock (tests may pass their own). */
  now: () => Date;
}

/** Facts about the HTTP request that the audit trail keeps. */
export interface RequestContext {
  requestId: string | null;
}

/**
 * Sends an e-mail after the transaction committed, logging rather than failing when the mail
 * server is away (a transactional outbox will later retry instead).
 */
export async function sendAfterCommit(
  deps: Pick<IdentityDeps, 'mailer' | 'logger'>,
  message: Parameters<Mailer['send']>[0],
  what: string,
): Promise<boolean> {
  try {
    await deps.mailer.send(message);
    return true;
  } catch (err) {
    deps.logger.error({ err, what }, 'e-mail could not be sent');
    return false;
  }
}
