// The /v1 REST subset the official SDK calls, form-encoded in and JSON out, with the provider's
// error shape. Pipeline per call: down/latency switches → API key → parameters → time passing
// (expiries) → error-rate switch → idempotency → handler.
import express from 'express';
import { ApiError, noSuch } from './errors.mjs';
import { asList, readExpand, readInteger, readString } from './params.mjs';
import {
  cancelIntent,
  captureIntent,
  confirmIntent,
  createIntent,
  createRefund,
  createSession,
  expireSession,
  getIntent,
  getSession,
  lineItemList,
  render,
  updateIntent,
} from './resources.mjs';
import { newId, publicView } from './store.mjs';
import { API_VERSION } from './webhooks.mjs';

function send(res, status, body, headers = {}) {
  for (const [name, value] of Object.entries(headers)) res.setHeader(name, value);
  res
    .status(status)
    .type('application/json')
    .send(JSON.stringify(body, null, 2));
}

function apiError(status, type, message, code) {
  return new ApiError(status, type, message, { code, remember: false });
}

/** Reads the secret key from `Authorization: Bearer sk_test_...` (or HTTP Basic, key as user). */
function readApiKey(req) {
  const header = req.get('authorization') ?? '';
  const bearer = /^Bearer\s+(\S+)$/i.exec(header);
  if (bearer) return bearer[1];
  const basic = /^Basic\s+(\S+)$/i.exec(header);
  if (basic) return Buffer.from(basic[1], 'base64').toString('utf8').split(':')[0];
  return null;
}

/** A list object as the provider pages them (newest first, `limit`, `starting_after`). */
function list(items, query, url) {
  const limit = readInteger(query, 'limit', { min: 1 }) ?? 10;
  if (limit > 100) throw apiError(400, 'invalid_request_error', 'limit must be at most 100.');
  let start = 0;
  const after = readString(query, 'starting_after');
  if (after) {
    const at = items.findIndex((item) => item.id === after);
    if (at < 0) throw noSuch('object', after, 'starting_after');
    start = at + 1;
  }
  const page = items.slice(start, start + limit);
  return { object: 'list', data: page, has_more: start + limit < items.length, url };
}

/**
 * Builds the /v1 router.
 * @param {object} ctx the fake's context (state, clock, emit, faults, idempotency, ...).
 */
export function createApiRouter(ctx) {
  const router = express.Router();

  router.use(async (req, res, next) => {
    req.requestId = newId('req_', 14);
    res.setHeader('Request-Id', req.requestId);
    res.setHeader('Stripe-Version', req.get('stripe-version') ?? API_VERSION);
    const faults = ctx.faults.settings;
    if (faults.down) {
      if (faults.downMode === 'close') {
        req.socket.destroy();
        return;
      }
      send(
        res,
        503,
        apiError(
          503,
          'api_error',
          'The payments service is unavailable (fault switch "down").',
        ).toBody(),
      );
      return;
    }
    if (faults.latencyMs > 0) await new Promise((resolve) => setTimeout(resolve, faults.latencyMs));
    next();
  });

  router.use((req, res, next) => {
    const key = readApiKey(req);
    if (!key) {
      throw apiError(
        401,
        'invalid_request_error',
        'You did not provide an API key. Send it as "Authorization: Bearer sk_test_...".',
      );
    }
    if (!key.startsWith('sk_test_') || key.length <= 'sk_test_'.length) {
      throw apiError(
        401,
        'invalid_request_error',
        `Invalid API Key provided: ${key.slice(0, 8)}****. The local stand-in takes test-mode ` +
          'secret keys (sk_test_...) only.',
        'api_key_invalid',
      );
    }
    req.apiKey = key;
    next();
  });

  router.use(express.urlencoded({ extended: true, limit: '1mb', parameterLimit: 10_000 }));

  router.use((req, res, next) => {
    if (ctx.sweep()) ctx.changed();
    req.injectFault = ctx.faults.draw();
    if (req.injectFault && (ctx.faults.settings.errorMode === 'before' || req.method !== 'POST')) {
      throw apiError(
        500,
        'api_error',
        'An unexpected error occurred (injected by the fault switch errorRate).',
      );
    }
    next();
  });

  /** Wraps a handler (req → {status?, body}) with idempotency and the "after" fault mode. */
  const route = (handler) => async (req, res) => {
    const request = { id: req.requestId, idempotencyKey: req.get('idempotency-key') ?? null };
    const execute = async () => {
      try {
        const { status = 200, body } = await handler(req, request);
        return { status, body, remember: true, requestId: req.requestId };
      } catch (err) {
        if (!(err instanceof ApiError)) throw err;
        return {
          status: err.status,
          body: err.toBody(),
          remember: err.remember,
          requestId: req.requestId,
        };
      }
    };
    let answer;
    if (req.method === 'POST' && request.idempotencyKey !== null) {
      answer = await ctx.idempotency.run(
        {
          apiKey: req.apiKey,
          key: request.idempotencyKey,
          method: req.method,
          path: req.baseUrl + req.path,
          params: req.body ?? {},
        },
        execute,
      );
    } else {
      answer = await execute();
    }
    if (req.method === 'POST') ctx.changed();
    if (req.injectFault) {
      // Mode "after": the change is made and kept under the key, but the answer is lost.
      throw apiError(
        500,
        'api_error',
        'An unexpected error occurred after the request was applied (fault switch errorRate, mode "after").',
      );
    }
    const headers = answer.replayed
      ? { 'Idempotent-Replayed': 'true', 'Original-Request': answer.requestId }
      : {};
    if (request.idempotencyKey !== null && req.method === 'POST')
      headers['Idempotency-Key'] = request.idempotencyKey;
    send(res, answer.status, answer.body, headers);
  };

  const params = (req) => ({ ...req.query, ...(req.body ?? {}) });
  const view = (req, object) => render(ctx, object, readExpand(params(req)));

  // PaymentIntents
  router.post(
    '/payment_intents',
    route((req, request) => ({
      body: view(req, createIntent(ctx, req.body ?? {}, request)),
    })),
  );
  router.get(
    '/payment_intents/:id',
    route((req) => ({ body: view(req, getIntent(ctx, req.params.id)) })),
  );
  router.post(
    '/payment_intents/:id',
    route((req) => ({
      body: view(req, updateIntent(ctx, getIntent(ctx, req.params.id), req.body ?? {})),
    })),
  );
  router.post(
    '/payment_intents/:id/confirm',
    route((req, request) => ({
      body: view(req, confirmIntent(ctx, getIntent(ctx, req.params.id), req.body ?? {}, request)),
    })),
  );
  router.post(
    '/payment_intents/:id/capture',
    route((req, request) => ({
      body: view(req, captureIntent(ctx, getIntent(ctx, req.params.id), req.body ?? {}, request)),
    })),
  );
  router.post(
    '/payment_intents/:id/cancel',
    route((req, request) => ({
      body: view(req, cancelIntent(ctx, getIntent(ctx, req.params.id), req.body ?? {}, request)),
    })),
  );

  // Charges (read-only: they come from confirming intents)
  router.get(
    '/charges/:id',
    route((req) => {
      const charge = ctx.state.charges[req.params.id];
      if (!charge) throw noSuch('charge', req.params.id);
      return { body: view(req, charge) };
    }),
  );

  // Refunds
  router.post(
    '/refunds',
    route((req, request) => ({
      body: view(req, createRefund(ctx, req.body ?? {}, request)),
    })),
  );
  router.get(
    '/refunds/:id',
    route((req) => {
      const refund = ctx.state.refunds[req.params.id];
      if (!refund) throw noSuch('refund', req.params.id);
      return { body: view(req, refund) };
    }),
  );
  router.get(
    '/refunds',
    route((req) => {
      const q = req.query;
      const items = Object.values(ctx.state.refunds)
        .filter((r) => !q.payment_intent || r.payment_intent === q.payment_intent)
        .filter((r) => !q.charge || r.charge === q.charge)
        .reverse()
        .map((r) => publicView(r));
      return { body: list(items, q, '/v1/refunds') };
    }),
  );

  // Checkout Sessions
  router.post(
    '/checkout/sessions',
    route((req) => ({
      body: view(req, createSession(ctx, req.body ?? {})),
    })),
  );
  router.get(
    '/checkout/sessions/:id',
    route((req) => ({
      body: view(req, getSession(ctx, req.params.id)),
    })),
  );
  router.get(
    '/checkout/sessions/:id/line_items',
    route((req) => ({
      body: lineItemList(getSession(ctx, req.params.id)),
    })),
  );
  router.post(
    '/checkout/sessions/:id/expire',
    route((req, request) => ({
      body: view(req, expireSession(ctx, getSession(ctx, req.params.id), request)),
    })),
  );

  // Events
  router.get(
    '/events/:id',
    route((req) => {
      const event = ctx.state.events.find((e) => e.id === req.params.id);
      if (!event) throw noSuch('event', req.params.id);
      return { body: event };
    }),
  );
  router.get(
    '/events',
    route((req) => {
      const q = req.query;
      const types = q.types ? asList(q.types) : q.type ? [q.type] : null;
      const items = ctx.state.events
        .filter((e) => !types || types.includes(e.type))
        .slice()
        .reverse();
      return { body: list(items, q, '/v1/events') };
    }),
  );

  router.use((req) => {
    throw apiError(
      404,
      'invalid_request_error',
      `Unrecognized request URL (${req.method}: ${req.baseUrl}${req.path}). The local payments ` +
        'stand-in implements PaymentIntents, Refunds, Checkout Sessions and Events only.',
    );
  });

  // Express 5 passes thrown and rejected errors here.
  router.use((err, req, res, next) => {
    if (res.headersSent) return next(err);
    if (err instanceof ApiError) return send(res, err.status, err.toBody());
    if (err?.type === 'entity.parse.failed' || err?.status === 400 || err?.status === 413) {
      return send(
        res,
        err.status ?? 400,
        apiError(400, 'invalid_request_error', `Invalid request body: ${err.message}`).toBody(),
      );
    }
    ctx.log(`unexpected error on ${req.method} ${req.originalUrl}: ${err?.stack ?? err}`);
    return send(
      res,
      500,
      apiError(500, 'api_error', 'An unexpected error occurred in the payments stand-in.').toBody(),
    );
  });

  return router;
}
