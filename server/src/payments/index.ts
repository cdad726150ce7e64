// The payments component's front door: other components, the app and main.ts use only what is
// exported here.
import type { DataSource } from 'typeorm';
import type { AppComponent, AppServices } from '../app-services';
import type { FileStore } from '../storage/file-store';
import type { Config } from '../config';
import { Payments1764892800000 } from '../database/migrations/1764892800000-payments';
import type { NotifyLoanEvent } from '../loans';
import type { Logger } from '../logger';
import { loanNotifierFromConfig } from '../notifications';
import { creditAgreementRoutes, loanPaymentRoutes, paymentWebhookRoutes } from './api/routes';
import type { PaymentsDeps } from './domain/deps';
import { LocalDocumentStore } from './domain/documents';
import { startDepositExpiryJob } from './domain/expiry';
import { createPaymentsClient, type PaymentsClient } from './domain/provider';

export { runDepositExpiry, startDepositExpiryJob, type ExpiryJob } from './domain/expiry';
export { settleDeposit } from './domain/settlement';
// Reports (evaluation evidence) show the costs seen in Evalon through this read.
export { loanCostsSeen, type LoanCostsSeen } from './domain/costs';
export { createPaymentsClient, type PaymentsClient } from './domain/provider';
export { LocalDocumentStore } from './domain/documents';
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
  documentStore?: FileStore;
  notifyLoanEvent?: NotifyLoanEvent;
  notifyLoanEventDeferred?: NotifyLoanEvent;
}): PaymentsDeps {
  const now = input.now ?? (() => new Date());
  return {
    dataSource: input.dataSource,
    logger: input.logger,
    provider: input.provider ?? createPaymentsClient(input.config.payments),
    config: input.config.payments,
    publicUrl: input.config.http.publicUrl,
    notifyLoanEvent: input.notifyLoanEvent ?? loanNotifierFromConfig(input.config, { now }),
    ...(input.notifyLoanEventDeferred
      ? { notifyLoanEventDeferred: input.notifyLoanEventDeferred }
      : {}),
    documentStore: input.documentStore ?? new LocalDocumentStore(input.config.storage.documentDir),
    now,
  };
}

// One deps object per app, shared by the webhook router and the others.
const depsOfApp = new WeakMap<AppServices, PaymentsDeps>();
/** The payments deps of an app (one per app): shipments settle deposits through them. */
export function paymentsDepsOf(
  ctx: Parameters<NonNullable<AppComponent['routers']>>[0],
): PaymentsDeps {
  let deps = depsOfApp.get(ctx.services);
  if (!deps) {
    deps = createPaymentsDeps({
      config: ctx.config,
      dataSource: ctx.dataSource,
      logger: ctx.logger,
      now: ctx.now,
      provider: ctx.services.paymentsClient,
      documentStore: ctx.services.documentStore,
      notifyLoanEvent: ctx.services.notifyLoanEvent,
      notifyLoanEventDeferred: ctx.services.notifyLoanEventDeferred,
    });
    depsOfApp.set(ctx.services, deps);
  }
  return deps;
}

/** Deposits (card or credit agreement), the provider's webhook, documents and the expiry job. */
export const paymentsComponent: AppComponent = {
  name: 'payments',
  migrations: [Payments1764892800000],
  // The provider's webhook needs its raw body (the signature covers the exact bytes) and no
  // session or CSRF token.
  rawRouters: (ctx) => [paymentWebhookRoutes(paymentsDepsOf(ctx), ctx.catalogue)],
  routers: (ctx) => [
    loanPaymentRoutes(paymentsDepsOf(ctx), ctx.catalogue),
    creditAgreementRoutes(paymentsDepsOf(ctx), ctx.catalogue),
  ],
  jobs: (ctx) => {
    // Approved loans whose deposit deadline passed expire; any number of processes may run it.
    if (!ctx.config.payments.expiryJob) return [];
    const deps = createPaymentsDeps({
      config: ctx.config,
      dataSource: ctx.dataSource,
      logger: ctx.logger,
      provider: ctx.paymentsClient,
    });
    let job: ReturnType<typeof startDepositExpiryJob> | null = null;
    return [
      {
        name: 'deposit expiry job',
        details: { intervalMs: ctx.config.payments.expiryIntervalMs },
        start: () => {
          job = startDepositExpiryJob(deps, ctx.config.payments.expiryIntervalMs);
        },
        stop: async () => {
          await job?.stop();
        },
      },
    ];
  },
};
export { isPdf, newDocumentKey } from './domain/documents';
