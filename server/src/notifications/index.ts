/**
 * The notifications component's front door for components that emit events to it (they never
 * render messages themselves).
 */
export {
  createShipmentNotifier,
  shipmentNotifierFromConfig,
  type NotifyShipmentEvent,
  type ShipmentNotice,
} from './shipment-notifications';
export { loanNotifierFromConfig, type NotifyLoanEvent } from './loan-notifications';
