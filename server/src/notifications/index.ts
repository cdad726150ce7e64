// The notifications component's front door: other components, the app and main.ts use only
// what is exported here.
import type { AppComponent } from '../app-services';
import { OutboxNotifications1764806400000 } from '../database/migrations/1764806400000-outbox-notifications';
import { adminOutboxRoutes, notificationRoutes } from './api/routes';
import { NoticeJobEntity, NotificationEntity, OutboxMessageEntity } from './data-access/entities';
import { NoticeJobs1765400000000 } from '../database/migrations/1765400000000-notice-jobs';
import { OutboxCommitSubscriber } from './domain/outbox';
import { createOutboxWorker } from './domain/outbox-worker';
import { loanNotifierFromConfig } from './domain/loan-notifications';

export { loanNotifierFromConfig } from './domain/loan-notifications';
export {
  createShipmentNotifier,
  shipmentNotifierFromConfig,
  type NotifyShipmentEvent,
  type ShipmentNotice,
} from './domain/shipment-notifications';
export {
  createVisitNotifier,
  credentialNotifierFromConfig,
  visitNotifierFromConfig,
} from './domain/visit-notifications';
export { SmtpMailer, type Mailer } from './domain/mailer';
export { enqueueEmail } from './domain/outbox';
export { deferredLoanNotifier, renderDueNotices } from './domain/notice-jobs';
export { createOutboxWorker } from './domain/outbox-worker';

/** E-mail through the outbox, in-app notifications and the outbox admin page. */
export const notificationsComponent: AppComponent = {
  name: 'notifications',
  entities: [OutboxMessageEntity, NotificationEntity, NoticeJobEntity],
  migrations: [OutboxNotifications1764806400000, NoticeJobs1765400000000],
  subscribers: [OutboxCommitSubscriber],
  routers: (ctx) => [
    adminOutboxRoutes(ctx.dataSource, ctx.now, ctx.catalogue),
    notificationRoutes(ctx.dataSource, ctx.now, ctx.catalogue),
  ],
  jobs: (ctx) => {
    // The outbox worker sends what transactions enqueued; any number of processes may run one.
    if (!ctx.config.outbox.worker) return [];
    const worker = createOutboxWorker(ctx.config, {
      dataSource: ctx.dataSource,
      mailer: ctx.mailer,
      logger: ctx.logger,
      // Renders the notices that confirmations deferred (payments), then sends.
      renderLoan: loanNotifierFromConfig(ctx.config),
    });
    return [
      {
        name: 'outbox worker',
        details: {
          worker: worker.id,
          smtp: `${ctx.config.smtp.host}:${ctx.config.smtp.port}`,
        },
        start: () => worker.start(),
        // It finishes the message it is sending and hands the rest of its batch back, so
        // nothing stays `sending` until its lease runs out.
        stop: () => worker.stop(),
      },
    ];
  },
};
