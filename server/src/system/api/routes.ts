import type { DataSource } from 'typeorm';
import { healthResponse } from '@evalon/contracts';
import { ApiRouter, type CatalogueEntry } from '../../http/routes';
import { buildOpenApiDocument } from '../../http/openapi';

/** Whether the database answers a trivial query within `timeoutMs`. */
export async function databaseReachable(
  dataSource: DataSource,
  timeoutMs = 2_000,
): Promise<boolean> {
  if (!dataSource.isInitialized) return false;
  let timer: NodeJS.Timeout | undefined;
  try {
    return await Promise.race([
      dataSource.query('SELECT 1').then(() => true),
      new Promise<boolean>((resolve) => {
        timer = setTimeout(() => resolve(false), timeoutMs);
      }),
    ]);
  } catch {
    return false;
  } finally {
    clearTimeout(timer);
  }
}

/** `/api/health` and `/api/openapi.json`. */
export function systemRoutes(
  dataSource: DataSource,
  publicUrl: string,
  catalogue: CatalogueEntry[],
): ApiRouter {
  const api = new ApiRouter('/api', 'System', catalogue);
  let document: unknown;

  api.route(
    {
      method: 'get',
      path: '/health',
      summary: 'Whether the server and its database are up',
      access: { public: true },
      responses: {
        200: { description: 'All good.', schema: healthResponse },
        503: { description: 'The database does not answer.', schema: healthResponse },
      },
    },
    async ({ res }) => {
      const up = await databaseReachable(dataSource);
      res.setHeader('Cache-Control', 'no-store');
      res
        .status(up ? 200 : 503)
        .json(up ? { status: 'ok', database: 'up' } : { status: 'degraded', database: 'down' });
    },
  );

  api.route(
    {
      method: 'get',
      path: '/openapi.json',
      summary: 'This document',
      access: { public: true },
      responses: { 200: { description: 'OpenAPI 3.0 document.' } },
    },
    ({ res }) => {
      // Built on first request, when every router has added its routes to the catalogue.
      document ??= buildOpenApiDocument(catalogue, publicUrl);
      res.json(document);
    },
  );
  return api;
}
