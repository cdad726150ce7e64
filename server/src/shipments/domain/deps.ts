import type { DataSource } from 'typeorm';
import type { Logger } from '../../logger';
import type { NotifyShipmentEvent } from '../../notifications';
import type { PaymentsDeps } from '../../payments';
import type { FileStore } from '../../storage/file-store';
import type { CarrierClient } from './carrier';

/** What the shipment use cases need. */
export interface ShipmentsDeps {
  dataSource: DataSource;
  logger: Logger;
  now: () => Date;
  carrier: CarrierClient;
  /** Alerts and the deposit statement, written in the caller's transaction. */
  notify: NotifyShipmentEvent;
  /** The payments component, for settling deposits. */
  payments: PaymentsDeps;
  /** The uploads file store (the one model photos use), for receipt and inspection photos. */
  photoStore: FileStore;
}
