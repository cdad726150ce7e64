import { randomUUID } from 'node:crypto';
import cookieParser from 'cookie-parser';
import express, { type Express } from 'express';
import { pinoHttp } from 'pino-http';
import type { DataSource } from 'typeorm';
import { auditRoutes } from './audit/api/routes';
import type { Config } from './config';
import { csrfProtection } from './http/csrf';
import { apiNotFound, errorHandler } from './http/errors';
import type { CatalogueEntry } from './http/routes';
import { securityHeaders } from './http/security';
import { createSessionMiddleware, loadSignedInUser } from './http/session';
import { mountWebApp } from './http/web-app';
import { authRoutes } from './identity/api/auth-routes';
import { memberRoutes } from './identity/api/member-routes';
import type { IdentityDeps } from './identity/domain/deps';
import type { Logger } from './logger';
import { adminOutboxRoutes, notificationRoutes } from './notifications/api/routes';
import { loanNotifierFromConfig } from './notifications/loan-notifications';
import type { Mailer } from './notifications/mailer';
import { organisationRoutes, siteRoutes } from './organisations/api/routes';
import { systemRoutes } from './system/api/routes';
import { availabilityRoutes } from './availability/api/routes';
import type { AvailabilityDeps } from './availability/domain/availability';
import { PlannerCache } from './availability/domain/planner-cache';
import { SiteCache } from './availability/domain/site-cache';
import { lenderRoutes, modelRoutes, unitRoutes } from './catalog/api/routes';
import type { CatalogDeps } from './catalog/domain/deps';
import { photoStoreFromEnv, type PhotoStore } from './catalog/domain/photo-store';
import { LenderSettingsCache } from './catalog/domain/shipping-settings';
import { loanRoutes } from './loans/api/routes';
import type { NotifyLoanEvent } from './loans/domain/notifications';
import { mapsOptionsFromEnv, mapsRoutes, type MapsOptions } from './maps/api/routes';
import {
  createPaymentsDeps,
  creditAgreementRoutes,
  loanPaymentRoutes,
  paymentWebhookRoutes,
  type PaymentsClient,
} from './payments';
import {
  carrierWebhookRoutes,
  createShipmentsDeps,
  gs1Routes,
  shipmentSettingsRoutes,
  loanInspectionRoutes,
  shipmentRoutes,
  withShipmentCreation,
  type CarrierClient,
} from './shipments';

/** What the app is built from; `main.ts` makes the real ones, tests their own. */
export interface AppDeps {
  config: Config;
  /** An initialised data source (the session store shares its pool). */
  dataSource: DataSource;
  /**
   * Not used by the app itself: e-mail leaves through the outbox, and the transport belongs to
   * the outbox worker that `main.ts` (or a test) starts beside the app. Kept optional so callers
   * that still pass one compile.
   */
  mailer?: Mailer;
  logger: Logger;
  /** The clock; defaults to the system clock. */
  now?: () => Date;
  /** Called inside every loan-changing transaction (default: the outbox's loan notifier). */
  notifyLoanEvent?: NotifyLoanEvent;
  /** Where model photos live (default: `EVALON_UPLOAD_DIR`, a local folder). */
  photoStore?: PhotoStore;
  /** Maps script settings (default: `EVALON_MAPS_API_KEY` and the offline stand-in). */
  maps?: MapsOptions;
  /** The payment provider's SDK client (default: one made from `config.payments`). */
  paymentsClient?: PaymentsClient;
  /** Where loan documents live (default: `EVALON_DOCUMENT_DIR`, a local folder). */
  documentStore?: PhotoStore;
  /** The carrier adapter (default: the local carrier stand-in from `EVALON_CARRIER_*`). */
  carrier?: CarrierClient;
}

const requestIdPattern = /^[A-Za-z0-9._-]{1,64}$/;

/**
 * Builds the Express application without listening, so tests drive it with supertest and
 * `main.ts` decides where it listens.
 */
export function createApp(deps: AppDeps): Express {
  const { config, dataSource, logger } = deps;
  const app = express();
  app.disable('x-powered-by');
  app.set('trust proxy', config.http.trustProxy);

  app.use(
    pinoHttp({
      logger,
      // Keep a caller's request id when it looks sane (a proxy may set one), else make one.
      genReqId(req, res) {
        const incoming = req.headers['x-request-id'];
        const id =
          typeof incoming === 'string' && requestIdPattern.test(incoming) ? incoming : randomUUID();
        res.setHeader('X-Request-Id', id);
        return id;
      },
      // One compact line per request: no header dumps (cookies are redacted anyway).
      serializers: {
        req: (req: { id: unknown; method: string; url: string; remoteAddress?: string }) => ({
          id: req.id,
          method: req.method,
          url: req.url,
          remoteAddress: req.remoteAddress,
        }),
        res: (res: { statusCode: number }) => ({ statusCode: res.statusCode }),
      },
      customLogLevel(_req, res, err) {
        if (err || res.statusCode >= 500) return 'error';
        if (res.statusCode >= 400) return 'warn';
        return 'info';
      },
    }),
  );
  app.use(securityHeaders(config));

  const identityDeps: IdentityDeps = {
    dataSource,
    logger,
    publicUrl: config.http.publicUrl,
    now: deps.now ?? (() => new Date()),
  };

  const catalogue: CatalogueEntry[] = [];
  // A confirmed loan gets its outbound shipments in the confirming transaction.
  const confirmations = withShipmentCreation(
    loanNotifierFromConfig(config, { now: identityDeps.now }),
    identityDeps.now,
  );
  const paymentsDeps = createPaymentsDeps({
    config,
    dataSource,
    logger,
    now: identityDeps.now,
    provider: deps.paymentsClient,
    documentStore: deps.documentStore,
    notifyLoanEvent: confirmations,
  });
  const shipmentsDeps = createShipmentsDeps({
    config,
    dataSource,
    logger,
    now: identityDeps.now,
    payments: paymentsDeps,
    carrier: deps.carrier,
  });
  // The payment provider's webhook needs its raw body (the signature covers the exact bytes) and
  // no session or CSRF token: mounted before the JSON parser and the session.
  const webhooks = paymentWebhookRoutes(paymentsDeps, catalogue);
  app.use(webhooks.basePath, webhooks.router);
  const carrierHooks = carrierWebhookRoutes(shipmentsDeps, catalogue);
  app.use(carrierHooks.basePath, carrierHooks.router);

  // Everything under /api: JSON bodies, cookies, the session, the signed-in person, CSRF.
  app.use('/api', express.json({ limit: '100kb' }));
  app.use('/api', cookieParser());
  app.use('/api', createSessionMiddleware(config, dataSource));
  app.use('/api', loadSignedInUser(config, dataSource));
  app.use('/api', csrfProtection({ secureCookies: config.http.secureCookies }));

  const settingsCache = new LenderSettingsCache();
  const catalogDeps: CatalogDeps = {
    dataSource,
    logger,
    photoStore: deps.photoStore ?? photoStoreFromEnv(),
    settingsCache,
    now: identityDeps.now,
  };
  const availabilityDeps: AvailabilityDeps = {
    dataSource,
    logger,
    settingsCache,
    plans: new PlannerCache(),
    sites: new SiteCache(),
    now: identityDeps.now,
  };
  const loanDeps = {
    ...availabilityDeps,
    // Loan e-mails and in-app notifications, written in the loan's own transaction.
    // Loan e-mails and in-app notifications, written in the loan's own transaction.
    notifyLoanEvent:
      deps.notifyLoanEvent ?? loanNotifierFromConfig(config, { now: identityDeps.now }),
  };
  const routers = [
    systemRoutes(dataSource, config.http.publicUrl, catalogue),
    authRoutes(config, identityDeps, catalogue),
    organisationRoutes(dataSource, catalogue),
    memberRoutes(identityDeps, catalogue),
    siteRoutes(dataSource, catalogue),
    auditRoutes(dataSource, catalogue),
    adminOutboxRoutes(dataSource, identityDeps.now, catalogue),
    notificationRoutes(dataSource, identityDeps.now, catalogue),
    lenderRoutes(catalogDeps, catalogue),
    ...modelRoutes(catalogDeps, catalogue),
    unitRoutes(catalogDeps, catalogue),
    availabilityRoutes(availabilityDeps, catalogue),
    loanRoutes(loanDeps, catalogue),
    ...mapsRoutes(deps.maps ?? mapsOptionsFromEnv(), catalogue),
    loanPaymentRoutes(paymentsDeps, catalogue),
    creditAgreementRoutes(paymentsDeps, catalogue),
    shipmentRoutes(shipmentsDeps, catalogue),
    loanInspectionRoutes(shipmentsDeps, catalogue),
    gs1Routes(shipmentsDeps, catalogue),
    shipmentSettingsRoutes(shipmentsDeps, catalogue),
  ];
  for (const r of routers) app.use(r.basePath, r.router);
  app.use('/api', apiNotFound);

  mountWebApp(app, config.webDist, logger);
  app.use(errorHandler);
  return app;
}
