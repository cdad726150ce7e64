import path from 'node:path';
import { pathToFileURL } from 'node:url';
import { mapsConfig } from '@evalon/contracts';
import type { Config } from '../../config';
import { ApiRouter, type CatalogueEntry } from '../../http/routes';

/** How the web app gets its maps script. */
export interface MapsOptions {
  /** A browser key for the hosted maps script; null serves the offline stand-in. */
  apiKey: string | null;
  /** The hosted loader URL used when a key is set. */
  hostedScriptUrl: string;
  /** Absolute path of the built stand-in script, found at run time. */
  standinPath: () => Promise<string>;
}

/** The hosted loader the maps component library expects when a real key is configured. */
export const defaultHostedScriptUrl = 'https://maps.googleapis.com/maps/api/js';

/**
 * Finds the stand-in through `infra/fakes/maps/index.mjs`, imported at run time from the
 * repository root (`EVALON_ROOT`, else the working directory). The path is computed, so the
 * bundler leaves the import alone: the module finds its sources next to itself and must not be
 * bundled into server/dist.
 */
export function repositoryStandin(where: { EVALON_ROOT?: string } = {}): () => Promise<string> {
  return async () => {
    const root = where.EVALON_ROOT?.trim() || process.cwd();
    const entry = pathToFileURL(path.resolve(root, 'infra/fakes/maps/index.mjs')).href;
    const mod = (await import(entry)) as { mapsStandinPath: () => Promise<string> };
    return mod.mapsStandinPath();
  };
}

/** Maps settings from the server configuration (`EVALON_MAPS_API_KEY`, `EVALON_MAPS_SCRIPT_URL`). */
export function mapsOptionsFromConfig(config: Pick<Config, 'maps' | 'rootDir'>): MapsOptions {
  return {
    apiKey: config.maps.apiKey,
    hostedScriptUrl: config.maps.hostedScriptUrl,
    standinPath: repositoryStandin({ EVALON_ROOT: config.rootDir }),
  };
}

/**
 * `GET /maps/api/js` (the offline stand-in, public, served from our origin so the content
 * security policy's `script-src 'self'` covers it) and `GET /api/config/maps`.
 */
export function mapsRoutes(options: MapsOptions, catalogue: CatalogueEntry[]): ApiRouter[] {
  const script = new ApiRouter('/maps', 'Maps', catalogue);
  if (options.apiKey === null) {
    script.route(
      {
        method: 'get',
        path: '/api/js',
        summary: 'The offline maps stand-in script (only when no maps key is configured)',
        description:
          'Speaks the subset of the maps script the web app uses and draws country outlines; ' +
          'no tiles, no network.',
        access: { public: true },
        responses: { 200: { description: 'JavaScript.' } },
      },
      async ({ res }) => {
        const file = await options.standinPath();
        res.setHeader('Cache-Control', 'no-cache');
        res.type('text/javascript').sendFile(file);
      },
    );
  }

  const config = new ApiRouter('/api/config', 'Maps', catalogue);
  config.route(
    {
      method: 'get',
      path: '/maps',
      summary: 'How the web app loads the maps script',
      access: { authenticated: true },
      responses: { 200: { description: 'Where the script is.', schema: mapsConfig } },
    },
    ({ res }) => {
      res.json(
        options.apiKey === null
          ? { apiKey: null, scriptUrl: '/maps/api/js', offline: true }
          : { apiKey: options.apiKey, scriptUrl: options.hostedScriptUrl, offline: false },
      );
    },
  );
  return [script, config];
}
