import type { DataSource } from 'typeorm';
import type { LenderSettingsCache } from './catalog';
import type { PlannerCache, SiteCache } from './availability';
import type { Config } from './config';
import type { NotifyLoanEvent } from './loans';
import type { Logger } from './logger';
import type { MapsOptions } from './maps';
import type { Mailer } from './notifications';
import type { PaymentsClient } from './payments';
import type { NotifyVisitEvent } from './visits';
import type { CarrierClient } from './shipments';
import type { ComponentContext, ServerComponent } from './component';
import type { FileStore } from './storage/file-store';

/**
 * The services `createApp` makes once per app and hands to every component, so that components
 * that meet over one cache or store share the same instance (catalog and availability share the
 * lender settings cache; availability and loans the planner and site caches).
 */
export interface AppServices {
  settingsCache: LenderSettingsCache;
  plans: PlannerCache;
  sites: SiteCache;
  /** Where model photos live. */
  photoStore: FileStore;
  /** Where loan documents live. */
  documentStore: FileStore;
  /** The loan notification port's implementation (the outbox's loan notifier). */
  notifyLoanEvent: NotifyLoanEvent;
  /**
   * The same port for a loan confirmed by a payment: the state change (and its shipments) in
   * the caller's transaction, the e-mails, invites and in-app notifications rendered afterwards
   * by the outbox worker (`notice_jobs`), so the webhook's transaction stays short.
   */
  notifyLoanEventDeferred: NotifyLoanEvent;
  /** The visit notification port's implementation (the outbox's visit notifier). */
  notifyVisitEvent: NotifyVisitEvent;
  /** Where proctors' credential PDFs live. */
  credentialStore: FileStore;
  maps: MapsOptions;
  /** The payment provider's SDK client, one per process. */
  paymentsClient: PaymentsClient;
  /** The carrier adapter (the local stand-in unless a real carrier is configured). */
  carrier: CarrierClient;
}

/** What `main.ts` gives every component to make its background jobs. */
export interface JobContext {
  config: Config;
  dataSource: DataSource;
  logger: Logger;
  mailer: Mailer;
  paymentsClient: PaymentsClient;
}

/** The context a component's routers are built in, in this app. */
export type AppContext = ComponentContext<AppServices>;

/** A component of this server, as its front door registers it. */
export type AppComponent = ServerComponent<AppServices, JobContext>;
