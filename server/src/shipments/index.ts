/**
 * The shipments component: outbound and return legs of a loan, their checklists and scans,
 * carrier booking and tracking, alerts, receipt, decontamination, return inspection and the
 * deposit settlement. Other components and the app import from here only.
 */
import type { DataSource, EntityManager } from 'typeorm';
import type { AppComponent } from '../app-services';
import { createPaymentsDeps, paymentsDepsOf } from '../payments';
import {
  carrierWebhookRoutes,
  gs1Routes,
  loanInspectionRoutes,
  shipmentRoutes,
  shipmentSettingsRoutes,
} from './api/routes';
import { shipmentEntities } from './data-access/entities';
import { Shipments1765152000000 } from './data-access/migrations/1765152000000-shipments';
import { ShipmentsBoardIndex1765300060000 } from './data-access/migrations/1765300060000-shipments-board-index';
import { ShipmentPhotos1765330000000 } from './data-access/migrations/1765330000000-shipment-photos';
import { startShipmentAlertsJob, type ShipmentAlertsJob } from './domain/alerts';
import type { Config } from '../config';
import type { Logger } from '../logger';
import { shipmentNotifierFromConfig, type NotifyShipmentEvent } from '../notifications';
import type { NotifyLoanEvent } from '../loans';
import type { PaymentsDeps } from '../payments';
import { LocalPhotoStore } from '../catalog';
import type { FileStore } from '../storage/file-store';
import {
  carrierOptionsFromConfig,
  createStandInCarrier,
  type CarrierClient,
} from './domain/carrier';
import { ensureOutboundShipments } from './domain/creation';
import type { ShipmentsDeps } from './domain/deps';

export {
  carrierWebhookRoutes,
  gs1Routes,
  loanInspectionRoutes,
  shipmentRoutes,
  shipmentSettingsRoutes,
} from './api/routes';
export { shipmentEntities, shipmentTables } from './data-access/entities';
export { Shipments1765152000000 } from './data-access/migrations/1765152000000-shipments';
export { ShipmentPhotos1765330000000 } from './data-access/migrations/1765330000000-shipment-photos';
export { runShipmentAlerts, startShipmentAlertsJob, type ShipmentAlertsJob } from './domain/alerts';
export { ensureOutboundShipments } from './domain/creation';
export { stageDemoShipments, type DemoShipmentStage } from './domain/demo';
export { saveShipmentSettings } from './domain/scanning';
export { handleTrackingEvent } from './domain/tracking';
export type { CarrierClient, TrackingEvent } from './domain/carrier';
export type { ShipmentsDeps } from './domain/deps';

/** The component's dependencies for a server configuration. */
export function createShipmentsDeps(input: {
  config: Pick<Config, 'http' | 'shipments' | 'storage'>;
  dataSource: DataSource;
  logger: Logger;
  payments: PaymentsDeps;
  now?: () => Date;
  carrier?: CarrierClient;
  notify?: NotifyShipmentEvent;
  photoStore?: FileStore;
}): ShipmentsDeps {
  const now = input.now ?? (() => new Date());
  return {
    dataSource: input.dataSource,
    logger: input.logger,
    now,
    carrier: input.carrier ?? defaultCarrier(input.config),
    notify: input.notify ?? shipmentNotifierFromConfig(input.config, { now }),
    payments: input.payments,
    photoStore: input.photoStore ?? new LocalPhotoStore(input.config.storage.photoDir),
  };
}

/**
 * Wraps a loan notifier so that a confirmation also creates the loan's outbound legs, in the
 * same transaction as the confirmation (the legs exist exactly when the loan is confirmed).
 */
export function withShipmentCreation(
  notify: NotifyLoanEvent,
  now: () => Date = () => new Date(),
): NotifyLoanEvent {
  return async (m: EntityManager, notice) => {
    await notify(m, notice);
    if (notice.event === 'confirmed') await ensureOutboundShipments(m, notice.loanId, now());
  };
}

/** The carrier stand-in from `EVALON_CARRIER_*` (a real carrier plugs in behind CarrierClient). */
export function defaultCarrier(config: Pick<Config, 'shipments'>): CarrierClient {
  return createStandInCarrier(carrierOptionsFromConfig(config));
}

/** One deps object per app, shared by the carrier webhook and the other routers. */
const depsOfApp = new WeakMap<object, ShipmentsDeps>();
function depsOf(ctx: Parameters<NonNullable<AppComponent['routers']>>[0]): ShipmentsDeps {
  let deps = depsOfApp.get(ctx.services);
  if (!deps) {
    deps = createShipmentsDeps({
      config: ctx.config,
      dataSource: ctx.dataSource,
      logger: ctx.logger,
      now: ctx.now,
      payments: paymentsDepsOf(ctx),
      carrier: ctx.services.carrier,
      photoStore: ctx.services.photoStore,
    });
    depsOfApp.set(ctx.services, deps);
  }
  return deps;
}

/**
 * Shipments and returns: `/api/shipments`, inspection and settlement of a loan, GS1 parsing,
 * shipment settings, the signed carrier webhook, and the alerts job.
 */
export const shipmentsComponent: AppComponent = {
  name: 'shipments',
  entities: shipmentEntities,
  migrations: [
    Shipments1765152000000,
    ShipmentsBoardIndex1765300060000,
    ShipmentPhotos1765330000000,
  ],
  // The carrier signs the exact bytes it sends, and sends no session or CSRF token.
  rawRouters: (ctx) => [carrierWebhookRoutes(depsOf(ctx), ctx.catalogue)],
  routers: (ctx) => [
    shipmentRoutes(depsOf(ctx), ctx.catalogue),
    loanInspectionRoutes(depsOf(ctx), ctx.catalogue),
    gs1Routes(depsOf(ctx), ctx.catalogue),
    shipmentSettingsRoutes(depsOf(ctx), ctx.catalogue),
  ],
  jobs: (ctx) => {
    // At-risk, overdue and return-reminder alerts; rows are claimed FOR UPDATE SKIP LOCKED, so
    // any number of processes may run it. 0 turns it off.
    const intervalMs = ctx.config.shipments.alertsIntervalMs;
    if (intervalMs === 0) return [];
    let job: ShipmentAlertsJob | null = null;
    return [
      {
        name: 'shipment alerts job',
        details: { intervalMs },
        start: () => {
          job = startShipmentAlertsJob(
            createShipmentsDeps({
              config: ctx.config,
              dataSource: ctx.dataSource,
              logger: ctx.logger,
              payments: createPaymentsDeps({
                config: ctx.config,
                dataSource: ctx.dataSource,
                logger: ctx.logger,
                provider: ctx.paymentsClient,
              }),
            }),
            intervalMs,
          );
        },
        stop: async () => {
          await job?.stop();
        },
      },
    ];
  },
};
