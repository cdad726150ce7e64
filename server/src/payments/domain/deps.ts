import type { DataSource } from 'typeorm';
import type { PaymentsConfig } from '../../config';
import type { FileStore } from '../../storage/file-store';
import type { NotifyLoanEvent } from '../../loans';
import type { Logger } from '../../logger';
import type { PaymentsClient } from './provider';

/** What the payments use cases need. */
export interface PaymentsDeps {
  dataSource: DataSource;
  logger: Logger;
  /** The provider's SDK client (one per process). */
  provider: PaymentsClient;
  config: PaymentsConfig;
  /** Public base URL of the web app (the hosted page sends the buyer back there). */
  publicUrl: string;
  /**
   * Writes the loan e-mails and in-app notifications inside the caller's transaction (the
   * notifications component's entry point, which knows `confirmed` and `expired`).
   */
  notifyLoanEvent: NotifyLoanEvent;
  /**
   * Used instead of `notifyLoanEvent` when a payment confirms a loan (webhook, return from the
   * hosted page, expiry job): it records the notice in the transaction and the outbox worker
   * renders the e-mails and invite afterwards, so the loan's row lock is held briefly. Absent:
   * `notifyLoanEvent` renders in the transaction.
   */
  notifyLoanEventDeferred?: NotifyLoanEvent;
  /** Where loan documents live: the uploads storage interface, with PDF keys. */
  documentStore: FileStore;
  now: () => Date;
}
