// The control API under /__fake (never under /v1, and never affected by the fault switches):
// health, state dump, reset, clock, fault switches, webhook endpoints and retry settings, and a
// flush that waits for pending webhook deliveries.
import express from 'express';
import { publicView } from './store.mjs';

const fail = (res, message) =>
  res.status(400).json({ error: { type: 'invalid_request_error', message } });

/**
 * Builds the /__fake router.
 * @param {object} ctx the fake's context.
 */
export function createControlRouter(ctx) {
  const router = express.Router();
  router.use(express.json({ limit: '256kb' }));
  router.use(express.urlencoded({ extended: true }));

  const clockInfo = () => ({
    now: ctx.clock.now(),
    nowIso: new Date(ctx.clock.nowMs()).toISOString(),
    offsetSeconds: ctx.state.clockOffsetMs / 1000,
  });

  router.get('/health', (req, res) => {
    res.json({
      ok: true,
      service: 'evalon-payments-fake',
      clock: clockInfo(),
      stateFile: ctx.persistence.file,
    });
  });

  router.get('/state', (req, res) => {
    if (ctx.sweep()) ctx.changed();
    const { state } = ctx;
    res.json({
      clock: clockInfo(),
      faults: { ...ctx.faults.settings, injected: ctx.faults.injected },
      webhookEndpoints: ctx.webhooks.listEndpoints(),
      webhookSettings: ctx.webhooks.settings,
      paymentIntents: Object.values(state.paymentIntents).map(publicView),
      charges: Object.values(state.charges).map(publicView),
      refunds: Object.values(state.refunds).map(publicView),
      checkoutSessions: Object.values(state.checkoutSessions).map(publicView),
      events: state.events,
      deliveries: state.deliveries,
      idempotencyKeys: Object.keys(state.idempotency).length,
    });
  });

  router.post('/reset', (req, res) => {
    ctx.reset();
    res.json({ ok: true, clock: clockInfo() });
  });

  router.get('/clock', (req, res) => res.json(clockInfo()));
  router.post('/clock', (req, res) => {
    const seconds = Number(req.body?.advanceSeconds);
    if (!Number.isFinite(seconds) || seconds < 0) {
      return fail(
        res,
        'advanceSeconds must be a number of seconds, 0 or more (the clock only moves forward).',
      );
    }
    ctx.clock.advance(seconds);
    ctx.sweep();
    ctx.changed();
    return res.json(clockInfo());
  });

  router.get('/faults', (req, res) =>
    res.json({ ...ctx.faults.settings, injected: ctx.faults.injected }),
  );
  router.post('/faults', (req, res) => {
    try {
      ctx.faults.configure(req.body ?? {});
    } catch (err) {
      return fail(res, err.message);
    }
    return res.json({ ...ctx.faults.settings, injected: ctx.faults.injected });
  });

  router.get('/webhook-endpoints', (req, res) => res.json({ data: ctx.webhooks.listEndpoints() }));
  router.post('/webhook-endpoints', (req, res) => {
    const { url, secret, enabledEvents, replace } = req.body ?? {};
    try {
      const parsed = new URL(url);
      if (parsed.protocol !== 'http:' && parsed.protocol !== 'https:') throw new Error('scheme');
    } catch {
      return fail(res, 'url must be an absolute http(s) URL.');
    }
    if (typeof secret !== 'string' || !secret.startsWith('whsec_')) {
      return fail(res, 'secret must be a string starting with whsec_.');
    }
    if (
      enabledEvents !== undefined &&
      !(Array.isArray(enabledEvents) && enabledEvents.every((e) => typeof e === 'string'))
    ) {
      return fail(res, 'enabledEvents must be a list of event types (or ["*"]).');
    }
    const endpoint = ctx.webhooks.addEndpoint({
      url,
      secret,
      enabledEvents: enabledEvents ?? ['*'],
      replace: replace === true || replace === 'true',
    });
    return res
      .status(201)
      .json({ id: endpoint.id, url: endpoint.url, data: ctx.webhooks.listEndpoints() });
  });
  router.delete('/webhook-endpoints', (req, res) => {
    ctx.webhooks.clearEndpoints();
    res.json({ data: [] });
  });

  router.post('/webhooks/settings', (req, res) => {
    const next = {};
    for (const name of ['retryBaseMs', 'retryMaxMs', 'maxAttempts', 'timeoutMs']) {
      const value = req.body?.[name];
      if (value === undefined) continue;
      const n = Number(value);
      if (!Number.isInteger(n) || n < 1) return fail(res, `${name} must be a positive integer.`);
      next[name] = n;
    }
    ctx.webhooks.configure(next);
    return res.json(ctx.webhooks.settings);
  });

  router.post('/webhooks/flush', async (req, res) => {
    const timeoutMs = Number(req.body?.timeoutMs ?? 30_000);
    const result = await ctx.webhooks.flush(Number.isFinite(timeoutMs) ? timeoutMs : 30_000);
    res.status(result.settled ? 200 : 504).json(result);
  });

  router.use((req, res) => {
    res.status(404).json({
      error: {
        type: 'invalid_request_error',
        message: `No control endpoint ${req.method} ${req.baseUrl}${req.path}.`,
      },
    });
  });

  router.use((err, req, res, next) => {
    if (res.headersSent) return next(err);
    return res
      .status(err.status ?? 500)
      .json({ error: { type: 'api_error', message: err.message } });
  });

  return router;
}
