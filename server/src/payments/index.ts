import type { DataSource } from 'typeorm';
import type { Config } from '../config';
import type { PhotoStore } from '../catalog/domain/photo-store';
import type { Logger } from '../logger';
import { loanNotifierFromConfig, type NotifyLoanEvent } from '../notifications/loan-notifications';
import type { PaymentsDeps } from './domain/deps';
import { documentStoreFromEnv } from './domain/documents';
import { createPaymentsClient, type PaymentsClient } from './domain/provider';

export { creditAgreementRoutes, loanPaymentRoutes, paymentWebhookRoutes } from './api/routes';
export { runDepositExpiry, startDepositExpiryJob, type ExpiryJob } from './domain/expiry';
export { settleDeposit } from './domain/settlement';
export { createPaymentsClient, type PaymentsClient } from './domain/provider';
export type { PaymentsDeps } from './domain/deps';

/**
 * The payments component's dependencies for a server configuration. Pass `provider` to share one
 * SDK client between the app and the expiry job of a process.
 */
export function createPaymentsDeps(input: {
  config: Config;
  dataSource: DataSource;
  logger: Logger;
  now?: () => Date;
  provider?: PaymentsClient;
  documentStore?: PhotoStore;
  notifyLoanEvent?: NotifyLoanEvent;
}): PaymentsDeps {
  const now = input.now ?? (() => new Date());
  return {
    dataSource: input.dataSource,
    logger: input.logger,
    provider: input.provider ?? createPaymentsClient(input.config.payments),
    config: input.config.payments,
    publicUrl: input.config.http.publicUrl,
    notifyLoanEvent: input.notifyLoanEvent ?? loanNotifierFromConfig(input.config, { now }),
    documentStore: input.documentStore ?? documentStoreFromEnv(),
    now,
  };
}
export { isPdf, LocalDocumentStore, newDocumentKey } from './domain/documents';
