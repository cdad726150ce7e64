import { randomUUID } from 'node:crypto';
import cookieParser from 'cookie-parser';
import express, { type Express } from 'express';
import { pinoHttp } from 'pino-http';
import type { DataSource } from 'typeorm';
import type { AppContext, AppServices } from './app-services';
import { PlannerCache, SiteCache } from './availability';
import { LenderSettingsCache, LocalPhotoStore } from './catalog';
import { serverComponents } from './components';
import { sessionUserLoader } from './identity';
import type { Config } from './config';
import { csrfProtection } from './http/csrf';
import { apiNotFound, errorHandler } from './http/errors';
import type { CatalogueEntry } from './http/routes';
import { securityHeaders } from './http/security';
import { createSessionMiddleware, loadSignedInUser } from './http/session';
import { mountWebApp } from './http/web-app';
import type { NotifyLoanEvent } from './loans';
import type { Logger } from './logger';
import { mapsOptionsFromConfig, type MapsOptions } from './maps';
import {
  deferredLoanNotifier,
  loanNotifierFromConfig,
  visitNotifierFromConfig,
  type Mailer,
} from './notifications';
import { createPaymentsClient, LocalDocumentStore, type PaymentsClient } from './payments';
import type { FileStore } from './storage/file-store';
import type { NotifyVisitEvent } from './visits';
import { defaultCarrier, withShipmentCreation, type CarrierClient } from './shipments';

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
  /** Where model photos live (default: `config.storage.photoDir`, a local folder). */
  photoStore?: FileStore;
  /** Maps script settings (default: `config.maps` and the offline stand-in). */
  maps?: MapsOptions;
  /** The payment provider's SDK client (default: one made from `config.payments`). */
  paymentsClient?: PaymentsClient;
  /** Where loan documents live (default: `config.storage.documentDir`, a local folder). */
  documentStore?: FileStore;
  /** Called inside every visit-changing transaction (default: the outbox's visit notifier). */
  notifyVisitEvent?: NotifyVisitEvent;
  /** Where credential PDFs live (default: `config.storage.credentialDir`, a local folder). */
  credentialStore?: FileStore;
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

  const now = deps.now ?? (() => new Date());
  // Made once here so that components meeting over a cache or store share one instance.
  const services: AppServices = {
    settingsCache: new LenderSettingsCache(),
    plans: new PlannerCache(),
    sites: new SiteCache(),
    photoStore: deps.photoStore ?? new LocalPhotoStore(config.storage.photoDir),
    documentStore: deps.documentStore ?? new LocalDocumentStore(config.storage.documentDir),
    // A confirmation also creates the loan's outbound shipments, in the same transaction.
    notifyLoanEvent: withShipmentCreation(
      deps.notifyLoanEvent ?? loanNotifierFromConfig(config, { now }),
      now,
    ),
    // A notifier a test passed in is called as it is (it watches the calls); by default the
    // payment confirmations leave their rendering to the outbox worker.
    notifyLoanEventDeferred: withShipmentCreation(
      deps.notifyLoanEvent ?? deferredLoanNotifier(now),
      now,
    ),
    notifyVisitEvent: deps.notifyVisitEvent ?? visitNotifierFromConfig(config, { now }),
    credentialStore: deps.credentialStore ?? new LocalDocumentStore(config.storage.credentialDir),
    maps: deps.maps ?? mapsOptionsFromConfig(config),
    paymentsClient: deps.paymentsClient ?? createPaymentsClient(config.payments),
    carrier: deps.carrier ?? defaultCarrier(config),
  };
  const catalogue: CatalogueEntry[] = [];
  const ctx: AppContext = { config, dataSource, logger, now, catalogue, services };

  // Routers that need the raw body (signed webhooks) and no session or CSRF token come first.
  for (const component of serverComponents) {
    for (const r of component.rawRouters?.(ctx) ?? []) app.use(r.basePath, r.router);
  }

  // Everything under /api: JSON bodies, cookies, the session, the signed-in person, CSRF.
  app.use('/api', express.json({ limit: '100kb' }));
  app.use('/api', cookieParser());
  app.use('/api', createSessionMiddleware(config, dataSource));
  app.use('/api', loadSignedInUser(config, sessionUserLoader(dataSource)));
  app.use('/api', csrfProtection({ secureCookies: config.http.secureCookies }));

  for (const component of serverComponents) {
    for (const r of component.routers?.(ctx) ?? []) app.use(r.basePath, r.router);
  }
  app.use('/api', apiNotFound);

  mountWebApp(app, config.webDist, logger);
  app.use(errorHandler);
  return app;
}
