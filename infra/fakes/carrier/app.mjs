// The carrier stand-in ("Wendrow Parcel", an invented carrier) as a library:
// `createCarrierFake(options)` builds the app without listening, so tests can run it in-process;
// server.mjs is the command line. Two surfaces:
//   /v1      the carrier's booking and tracking API (bearer key, Idempotency-Key on bookings);
//   /__fake  the control API (move a parcel on, delay it, lose it, replay its events, go down,
//            set the webhook endpoint, flush deliveries). Never affected by the fault switches.
import http from 'node:http';
import express from 'express';
import {
  createTracking,
  DEFAULT_CHAOS,
  DEFAULT_SETTINGS,
  seeded,
  STATUSES,
} from './tracking.mjs';

/** Transit days per service, from booking (the carrier's own promise, calendar days). */
export const SERVICES = Object.freeze({ standard: 2, express: 1 });

const DAY_MS = 86_400_000;

function fail(res, status, code, message) {
  return res.status(status).json({ error: { code, message } });
}

/**
 * Creates the carrier stand-in.
 * @param {{webhookUrl?: string | null, webhookSecret?: string, apiKey?: string,
 *   settings?: object, chaos?: object, log?: (m: string) => void}} [options]
 */
export function createCarrierFake(options = {}) {
  const log = options.log ?? (() => {});
  const apiKey = options.apiKey ?? 'carrier_key_evalon_local';
  const fresh = () => ({
    parcels: {},
    events: [],
    deliveries: [],
    idempotency: {},
    endpoint: options.webhookUrl
      ? { url: options.webhookUrl, secret: options.webhookSecret ?? 'carrier_whsec_evalon_local' }
      : null,
  });
  const ctx = {
    state: fresh(),
    settings: { ...DEFAULT_SETTINGS, ...options.settings },
    chaos: { ...DEFAULT_CHAOS, ...options.chaos },
    random: Math.random,
    log,
  };
  if (ctx.chaos.rngStart !== null) ctx.random = seeded(ctx.chaos.rngStart);
  let tracking = createTracking(ctx);
  let stepTimer = null;

  /** Moves a parcel one rung up (or to `to`), emitting an event for every rung passed. */
  function advance(parcel, to) {
    if (parcel.lost) return [];
    const current = STATUSES.indexOf(parcel.status);
    const target = to ? STATUSES.indexOf(to) : current + 1;
    const emitted = [];
    for (let i = current + 1; i <= Math.min(target, STATUSES.length - 1); i += 1) {
      parcel.status = STATUSES[i];
      if (parcel.status === 'delivered') parcel.deliveredAt = new Date().toISOString();
      emitted.push(tracking.emit(parcel, parcel.status));
    }
    return emitted;
  }

  function restartStepper() {
    if (stepTimer) clearInterval(stepTimer);
    stepTimer = null;
    if (ctx.settings.stepMs > 0) {
      stepTimer = setInterval(() => {
        if (ctx.chaos.down) return;
        for (const p of Object.values(ctx.state.parcels)) {
          if (p.autoAdvance && !p.lost && p.status !== 'delivered') advance(p);
        }
      }, ctx.settings.stepMs);
      stepTimer.unref();
    }
  }
  restartStepper();

  const view = (p) => ({
    ...p,
    events: ctx.state.events
      .filter((e) => e.data.trackingNumber === p.trackingNumber)
      .map((e) => ({ id: e.id, ...e.data })),
  });

  // ---- /v1: the carrier API ---------------------------------------------------------------
  const api = express.Router();
  api.use(express.json({ limit: '64kb' }));
  api.use(async (req, res, next) => {
    if (ctx.chaos.latencyMs > 0) await new Promise((r) => setTimeout(r, ctx.chaos.latencyMs));
    if (ctx.chaos.down) return fail(res, 503, 'unavailable', 'The carrier is unavailable.');
    if (ctx.chaos.errorRate > 0 && ctx.random() < ctx.chaos.errorRate) {
      return fail(res, 500, 'internal', 'Something went wrong at the carrier (injected).');
    }
    if (req.headers.authorization !== `Bearer ${apiKey}`) {
      return fail(res, 401, 'unauthorised', 'Missing or wrong API key.');
    }
    return next();
  });

  api.post('/shipments', (req, res) => {
    const body = req.body ?? {};
    const key = req.headers['idempotency-key'];
    const fingerprint = JSON.stringify(body);
    if (typeof key === 'string' && ctx.state.idempotency[key]) {
      const seen = ctx.state.idempotency[key];
      if (seen.fingerprint !== fingerprint) {
        return fail(res, 409, 'idempotency_mismatch', 'This key was used with another request.');
      }
      return res.status(201).json(view(ctx.state.parcels[seen.trackingNumber]));
    }
    if (typeof body.reference !== 'string' || !body.reference) {
      return fail(res, 400, 'invalid', 'reference is required.');
    }
    const service = body.service ?? 'standard';
    if (!(service in SERVICES)) {
      return fail(res, 400, 'invalid', `service must be one of ${Object.keys(SERVICES)}.`);
    }
    if (!Array.isArray(body.parcels) || body.parcels.length === 0) {
      return fail(res, 400, 'invalid', 'parcels must list at least one parcel.');
    }
    const trackingNumber = `WP${String(Math.floor(Math.random() * 1e10)).padStart(10, '0')}`;
    const parcel = {
      trackingNumber,
      reference: body.reference,
      service,
      shipFrom: body.shipFrom ?? null,
      shipTo: body.shipTo ?? null,
      parcels: body.parcels,
      status: 'booked',
      sequence: 0,
      lost: false,
      autoAdvance: body.autoAdvance !== false,
      bookedAt: new Date().toISOString(),
      estimatedDelivery: new Date(Date.now() + SERVICES[service] * DAY_MS)
        .toISOString()
        .slice(0, 10),
      deliveredAt: null,
    };
    ctx.state.parcels[trackingNumber] = parcel;
    if (typeof key === 'string') ctx.state.idempotency[key] = { fingerprint, trackingNumber };
    log(`booked ${trackingNumber} for ${parcel.reference}`);
    return res.status(201).json(view(parcel));
  });

  api.get('/shipments/:tn', (req, res) => {
    const parcel = ctx.state.parcels[req.params.tn];
    if (!parcel) return fail(res, 404, 'not_found', 'No such tracking number.');
    return res.json(view(parcel));
  });

  // ---- /__fake: the control API -------------------------------------------------------------
  const control = express.Router();
  control.use(express.json({ limit: '64kb' }));
  const parcelOr404 = (req, res) => {
    const parcel = ctx.state.parcels[req.params.tn];
    if (!parcel) fail(res, 404, 'not_found', `No parcel ${req.params.tn}.`);
    return parcel;
  };

  control.get('/health', (req, res) => res.json({ ok: true, service: 'evalon-carrier-fake' }));
  control.get('/state', (req, res) =>
    res.json({
      settings: ctx.settings,
      chaos: ctx.chaos,
      endpoint: ctx.state.endpoint ? { url: ctx.state.endpoint.url } : null,
      parcels: Object.values(ctx.state.parcels).map(view),
      deliveries: ctx.state.deliveries,
    }),
  );
  control.post('/reset', (req, res) => {
    tracking.stop();
    ctx.state = fresh();
    ctx.chaos = { ...DEFAULT_CHAOS, ...options.chaos };
    ctx.random = ctx.chaos.rngStart !== null ? seeded(ctx.chaos.rngStart) : Math.random;
    tracking = createTracking(ctx);
    res.json({ ok: true });
  });
  control.post('/webhook-endpoint', (req, res) => {
    const { url, secret } = req.body ?? {};
    if (url === null) {
      ctx.state.endpoint = null;
      return res.json({ endpoint: null });
    }
    try {
      if (!/^https?:$/.test(new URL(url).protocol)) throw new Error('scheme');
    } catch {
      return fail(res, 400, 'invalid', 'url must be an absolute http(s) URL (or null).');
    }
    if (typeof secret !== 'string' || secret.length < 8) {
      return fail(res, 400, 'invalid', 'secret must be a string of 8 characters or more.');
    }
    ctx.state.endpoint = { url, secret };
    return res.json({ endpoint: { url } });
  });
  control.post('/settings', (req, res) => {
    for (const name of Object.keys(DEFAULT_SETTINGS)) {
      const value = req.body?.[name];
      if (value === undefined) continue;
      const n = Number(value);
      if (!Number.isInteger(n) || n < 0) {
        return fail(res, 400, 'invalid', `${name} must be a whole number.`);
      }
      ctx.settings[name] = n;
    }
    restartStepper();
    return res.json(ctx.settings);
  });
  control.post('/faults', (req, res) => {
    const b = req.body ?? {};
    for (const name of ['duplicateRate', 'errorRate']) {
      if (b[name] === undefined) continue;
      const n = Number(b[name]);
      if (!(n >= 0 && n <= 1)) return fail(res, 400, 'invalid', `${name} must be from 0 to 1.`);
      ctx.chaos[name] = n;
    }
    for (const name of ['shuffleMs', 'latencyMs']) {
      if (b[name] === undefined) continue;
      const n = Number(b[name]);
      if (!(Number.isInteger(n) && n >= 0 && n <= 120_000)) {
        return fail(res, 400, 'invalid', `${name} must be a whole number of ms up to 120000.`);
      }
      ctx.chaos[name] = n;
    }
    if (b.down !== undefined) {
      if (typeof b.down !== 'boolean') return fail(res, 400, 'invalid', 'down must be a boolean.');
      ctx.chaos.down = b.down;
    }
    if (b.rngStart !== undefined) {
      if (b.rngStart !== null && !Number.isInteger(b.rngStart)) {
        return fail(res, 400, 'invalid', 'rngStart must be an integer or null.');
      }
      ctx.chaos.rngStart = b.rngStart;
      ctx.random = b.rngStart === null ? Math.random : seeded(b.rngStart);
    }
    return res.json(ctx.chaos);
  });
  control.post('/shipments/:tn/advance', (req, res) => {
    const parcel = parcelOr404(req, res);
    if (!parcel) return undefined;
    const to = req.body?.to;
    if (to !== undefined && !STATUSES.includes(to)) {
      return fail(res, 400, 'invalid', `to must be one of ${STATUSES.join(', ')}.`);
    }
    if (parcel.lost) return fail(res, 409, 'lost', 'This parcel is lost; it does not move.');
    const events = advance(parcel, to);
    return res.json({ parcel: view(parcel), emitted: events.length });
  });
  control.post('/shipments/:tn/delay', (req, res) => {
    const parcel = parcelOr404(req, res);
    if (!parcel) return undefined;
    const days = Number(req.body?.days ?? 1);
    if (!(Number.isInteger(days) && days > 0 && days < 60)) {
      return fail(res, 400, 'invalid', 'days must be a whole number from 1 to 59.');
    }
    const eta = new Date(`${parcel.estimatedDelivery}T00:00:00Z`).getTime() + days * DAY_MS;
    parcel.estimatedDelivery = new Date(eta).toISOString().slice(0, 10);
    tracking.emit(parcel, 'exception', 'delayed');
    return res.json({ parcel: view(parcel) });
  });
  control.post('/shipments/:tn/lose', (req, res) => {
    const parcel = parcelOr404(req, res);
    if (!parcel) return undefined;
    parcel.lost = true;
    tracking.emit(parcel, 'exception', 'lost');
    return res.json({ parcel: view(parcel) });
  });
  control.post('/shipments/:tn/replay', (req, res) => {
    const parcel = parcelOr404(req, res);
    if (!parcel) return undefined;
    const times = Number(req.body?.times ?? 1);
    if (!(Number.isInteger(times) && times >= 1 && times <= 20)) {
      return fail(res, 400, 'invalid', 'times must be from 1 to 20.');
    }
    return res.json({ queued: tracking.replay(parcel.trackingNumber, times) });
  });
  control.post('/webhooks/flush', async (req, res) => {
    const result = await tracking.flush(Number(req.body?.timeoutMs ?? 30_000));
    res.status(result.settled ? 200 : 504).json(result);
  });

  const app = express();
  app.disable('x-powered-by');
  app.use('/v1', api);
  app.use('/__fake', control);
  app.get('/', (req, res) =>
    res.json({
      service: 'evalon-carrier-fake',
      about: 'Local carrier stand-in (see docs/carrier-standin.md).',
      api: '/v1',
      control: '/__fake',
    }),
  );
  app.use((req, res) => fail(res, 404, 'not_found', `No endpoint ${req.method} ${req.path}.`));

  const server = http.createServer(app);
  let port = null;
  return {
    app,
    server,
    ctx,
    url: () => `http://127.0.0.1:${port}`,
    listen(requestedPort = 0) {
      return new Promise((resolve, reject) => {
        server.once('error', reject);
        server.listen(requestedPort, '127.0.0.1', () => {
          server.off('error', reject);
          port = server.address().port;
          resolve({ port, url: `http://127.0.0.1:${port}` });
        });
      });
    },
    close() {
      tracking.stop();
      if (stepTimer) clearInterval(stepTimer);
      return new Promise((resolve) => {
        if (!server.listening) return resolve();
        server.close(() => resolve());
        server.closeAllConnections();
      });
    },
  };
}
