// The payments fake as a library: `createPaymentsFake(options)` builds the Express app and its
// state without listening, so tests can run it in-process on a random port; server.mjs is the
// command-line wrapper.
import http from 'node:http';
import express from 'express';
import { createApiRouter } from './api-v1.mjs';
import { createControlRouter } from './control-api.mjs';
import { createFaults } from './faults.mjs';
import { createHostedPageRouter } from './hosted-page.mjs';
import { createIdempotency } from './idempotency.mjs';
import { sweep } from './resources.mjs';
import { createClock, createPersistence, emptyState, resetState } from './store.mjs';
import { DEFAULT_WEBHOOK_SETTINGS, createWebhooks } from './webhooks.mjs';

/** How often (real time) expiries are applied when no request comes in. */
const SWEEP_INTERVAL_MS = 5_000;

/**
 * Creates the payments fake.
 * @param {{
 *   publicUrl?: string,
 *   webhookEndpoints?: {url: string, secret: string, enabledEvents?: string[]}[],
 *   webhookSettings?: {retryBaseMs?: number, retryMaxMs?: number, maxAttempts?: number,
 *     timeoutMs?: number},
 *   stateFile?: string | null,
 *   log?: (message: string) => void,
 * }} [options] `publicUrl`: base of hosted-page links (default http://127.0.0.1:<port>);
 *   `stateFile`: JSON file that keeps state across restarts (default none: memory only).
 * @returns {{app: import('express').Express, server: import('node:http').Server, state: object,
 *   listen: (port?: number) => Promise<{port: number, url: string}>, close: () => Promise<void>,
 *   url: () => string}}
 */
export function createPaymentsFake(options = {}) {
  const log = options.log ?? (() => {});
  const state = emptyState();
  const persistence = createPersistence(options.stateFile ?? null, state, log);
  const loaded = persistence.load();
  const clock = createClock(state);
  let port = null;

  const ctx = {
    state,
    clock,
    log,
    persistence,
    changed: () => persistence.changed(),
    publicUrl: () => (options.publicUrl ?? `http://127.0.0.1:${port}`).replace(/\/$/, ''),
    faults: createFaults(),
    idempotency: createIdempotency({ state, clock }),
  };
  const webhookSettings = { ...DEFAULT_WEBHOOK_SETTINGS, ...options.webhookSettings };
  ctx.webhooks = createWebhooks({
    state,
    clock,
    settings: webhookSettings,
    changed: ctx.changed,
    log,
  });
  ctx.emit = ctx.webhooks.emit;
  ctx.sweep = () => sweep(ctx);

  const addConfiguredEndpoints = () => {
    for (const endpoint of options.webhookEndpoints ?? []) ctx.webhooks.addEndpoint(endpoint);
  };
  addConfiguredEndpoints();
  if (loaded) {
    log(`state restored from ${persistence.file}`);
    ctx.webhooks.resume();
  }

  ctx.reset = () => {
    ctx.webhooks.stop();
    resetState(state);
    ctx.faults.reset();
    ctx.webhooks.clearEndpoints();
    addConfiguredEndpoints();
    ctx.webhooks.configure(webhookSettings);
    persistence.changed();
  };

  const app = express();
  app.disable('x-powered-by');
  // Bracket notation in query strings (expand[0]=payment_intent) needs the qs-based parser.
  app.set('query parser', 'extended');
  app.use('/v1', createApiRouter(ctx));
  app.use('/pay', createHostedPageRouter(ctx));
  app.use('/__fake', createControlRouter(ctx));
  app.get('/', (req, res) => {
    res.json({
      service: 'evalon-payments-fake',
      about: 'Local stand-in for the payment provider REST API (see docs/payments-fake.md).',
      api: '/v1',
      control: '/__fake',
    });
  });

  const server = http.createServer(app);
  let timer = null;

  return {
    app,
    server,
    state,
    ctx,
    url: () => `http://127.0.0.1:${port}`,

    /** Listens on 127.0.0.1 (port 0 picks a free one). */
    listen(requestedPort = 0) {
      return new Promise((resolve, reject) => {
        server.once('error', reject);
        server.listen(requestedPort, '127.0.0.1', () => {
          server.off('error', reject);
          port = server.address().port;
          timer = setInterval(() => {
            if (ctx.sweep()) ctx.changed();
          }, SWEEP_INTERVAL_MS);
          timer.unref();
          resolve({ port, url: `http://127.0.0.1:${port}` });
        });
      });
    },

    /** Stops deliveries, writes the state file (if any) and closes the server. */
    close() {
      ctx.webhooks.stop();
      if (timer) clearInterval(timer);
      persistence.flush();
      return new Promise((resolve) => {
        if (!server.listening) return resolve();
        server.close(() => resolve());
        server.closeAllConnections();
      });
    },
  };
}
