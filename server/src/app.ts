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
import type { Mailer } from './notifications/mailer';
import { organisationRoutes, siteRoutes } from './organisations/api/routes';
import { systemRoutes } from './system/api/routes';

/** What the app is built from; `main.ts` makes the real ones, tests their own. */
export interface AppDeps {
  config: Config;
  /** An initialised data source (the session store shares its pool). */
  dataSource: DataSource;
  mailer: Mailer;
  logger: Logger;
  /** The clock; defaults to the system clock. */
  now?: () => Date;
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
    mailer: deps.mailer,
    logger,
    publicUrl: config.http.publicUrl,
    now: deps.now ?? (() => new Date()),
  };

  // Everything under /api: JSON bodies, cookies, the session, the signed-in person, CSRF.
  app.use('/api', express.json({ limit: '100kb' }));
  app.use('/api', cookieParser());
  app.use('/api', createSessionMiddleware(config, dataSource));
  app.use('/api', loadSignedInUser(config, dataSource));
  app.use('/api', csrfProtection({ secureCookies: config.http.secureCookies }));

  const catalogue: CatalogueEntry[] = [];
  const routers = [
    systemRoutes(dataSource, config.http.publicUrl, catalogue),
    authRoutes(config, identityDeps, catalogue),
    organisationRoutes(dataSource, catalogue),
    memberRoutes(identityDeps, catalogue),
    siteRoutes(dataSource, catalogue),
    auditRoutes(dataSource, catalogue),
  ];
  for (const r of routers) app.use(r.basePath, r.router);
  app.use('/api', apiNotFound);

  mountWebApp(app, config.webDist, logger);
  app.use(errorHandler);
  return app;
}
