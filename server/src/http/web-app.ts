import fs from 'node:fs';
import path from 'node:path';
import express, { type Express } from 'express';
import type { Logger } from 'pino';
import { access } from './access';

/** Hashed build output (e.g. `main-ABCD1234.js`) never changes, so browsers may keep it. */
const hashedFile = /[-.][A-Z0-9]{8,}\.(js|css|woff2?|ttf|svg|png|jpg|webp)$/;

/**
 * Serves the built Angular app from `webDist` on the API's origin, with every other non-API
 * GET answered by index.html so deep links work. When the app has not been built the server
 * still runs (API only) and these requests get a short note instead.
 */
export function mountWebApp(app: Express, webDist: string, logger: Logger): void {
  const indexFile = path.join(webDist, 'index.html');
  if (!fs.existsSync(indexFile)) {
    logger.info({ webDist }, 'web app not built: serving the API only (run `npm run build:web`)');
  }
  app.use(
    express.static(webDist, {
      index: false,
      fallthrough: true,
      setHeaders(res, filePath) {
        res.setHeader(
          'Cache-Control',
          hashedFile.test(path.basename(filePath))
            ? 'public, max-age=31536000, immutable'
            : 'no-cache',
        );
      },
    }),
  );
  // Any GET outside /api that no file answered: the single-page app decides what to show.
  app.get(/^\/(?!api(?:\/|$)).*/, access({ public: true }), (req, res) => {
    if (!fs.existsSync(indexFile)) {
      res
        .status(404)
        .type('text/plain')
        .send(
          'The Evalon web app has not been built yet. Run `npm run build:web`; the API is under /api.',
        );
      return;
    }
    res.setHeader('Cache-Control', 'no-cache');
    res.sendFile(indexFile);
  });
}
