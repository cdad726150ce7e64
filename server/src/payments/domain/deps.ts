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
  /** Where loan documents live: the uploads storage interface, with PDF keys. */
  documentStore: FileStore;
  now: () => Date;
}
