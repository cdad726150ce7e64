/**
 * The shipments component: outbound and return legs of a loan, their checklists and scans,
 * carrier booking and tracking, alerts, receipt, decontamination, return inspection and the
 * deposit settlement. Other components and the app import from here only.
 */
import type { DataSource, EntityManager } from 'typeorm';
import type { Config } from '../config';
import type { Logger } from '../logger';
import { shipmentNotifierFromConfig, type NotifyShipmentEvent } from '../notifications';
import type { NotifyLoanEvent } from '../notifications';
import type { PaymentsDeps } from '../payments';
import { carrierOptionsFromEnv, createStandInCarrier, type CarrierClient } from './domain/carrier';
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
export { runShipmentAlerts, startShipmentAlertsJob, type ShipmentAlertsJob } from './domain/alerts';
export { ensureOutboundShipments } from './domain/creation';
export { stageDemoShipments, type DemoShipmentStage } from './domain/demo';
export { saveShipmentSettings } from './domain/scanning';
export { handleTrackingEvent } from './domain/tracking';
export type { CarrierClient, TrackingEvent } from './domain/carrier';
export type { ShipmentsDeps } from './domain/deps';

/** The component's dependencies for a server configuration. */
export function createShipmentsDeps(input: {
  config: Pick<Config, 'http'>;
  dataSource: DataSource;
  logger: Logger;
  payments: PaymentsDeps;
  now?: () => Date;
  carrier?: CarrierClient;
  notify?: NotifyShipmentEvent;
}): ShipmentsDeps {
  const now = input.now ?? (() => new Date());
  return {
    dataSource: input.dataSource,
    logger: input.logger,
    now,
    carrier: input.carrier ?? createStandInCarrier(carrierOptionsFromEnv()),
    notify: input.notify ?? shipmentNotifierFromConfig(input.config, { now }),
    payments: input.payments,
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
