// Events and their webhook deliveries. Each event goes to every endpoint that wants its type;
// per endpoint, deliveries run one at a time in event order. A delivery is signed with the
// official SDK's own helper (header `Stripe-Signature: t=<unix>,v1=<hex>`), retried with
// exponential backoff until the endpoint answers 2xx, and given up after `maxAttempts` (it
// stays listed with status `failed`).
import { setImmediate } from 'node:timers';
import PaymentsSdk from 'stripe';
import { newId, publicView } from './store.mjs';

/** The API version stamped on events: the one the installed SDK speaks. */
export const API_VERSION = PaymentsSdk.API_VERSION;

/** Default retry settings (override with env or `POST /__fake/webhooks/settings`). */
export const DEFAULT_WEBHOOK_SETTINGS = Object.freeze({
  retryBaseMs: 500,
  retryMaxMs: 30_000,
  maxAttempts: 10,
  timeoutMs: 10_000,
});

/**
 * Creates the event log and delivery worker.
 * @param {{state: object, clock: object, settings?: object, changed?: () => void,
 *   log?: (msg: string) => void}} options
 */
export function createWebhooks({
  state,
  clock,
  settings = {},
  changed = () => {},
  log = () => {},
}) {
  const config = { ...DEFAULT_WEBHOOK_SETTINGS, ...settings };
  /** @type {{id: string, url: string, secret: string, enabledEvents: string[]}[]} */
  let endpoints = [];
  // Endpoint id → token of the loop delivering to it (one loop per endpoint at a time).
  const running = new Map();
  const sleepers = new Set();
  // Bumped by reset/close so that loops from before stop touching the new state.
  let generation = 0;

  const wants = (endpoint, type) =>
    endpoint.enabledEvents.includes('*') || endpoint.enabledEvents.includes(type);

  function sleep(ms) {
    return new Promise((resolve) => {
      const timer = setTimeout(() => {
        sleepers.delete(entry);
        resolve();
      }, ms);
      const entry = { timer, resolve };
      sleepers.add(entry);
    });
  }

  function wakeAll() {
    for (const { timer, resolve } of sleepers) {
      clearTimeout(timer);
      resolve();
    }
    sleepers.clear();
  }

  /** Backoff before attempt n+1 after n failures: base, 2·base, 4·base, ... capped. */
  const backoffMs = (failures) =>
    Math.min(config.retryBaseMs * 2 ** (failures - 1), config.retryMaxMs);

  async function attempt(endpoint, delivery, event) {
    const pending = state.deliveries.filter(
      (d) => d.event === event.id && d.status !== 'delivered',
    );
    const payload = JSON.stringify({ ...event, pending_webhooks: pending.length }, null, 2);
    // Real time, not the fake clock: the receiver compares it with its own clock (300 s).
    const timestamp = Math.floor(Date.now() / 1000);
    const signature = PaymentsSdk.webhooks.generateTestHeaderString({
      payload,
      secret: endpoint.secret,
      timestamp,
    });
    const started = Date.now();
    const record = {
      at: new Date(started).toISOString(),
      status: null,
      error: null,
      durationMs: 0,
    };
    try {
      const res = await fetch(endpoint.url, {
        method: 'POST',
        headers: {
          'content-type': 'application/json; charset=utf-8',
          'stripe-signature': signature,
          'user-agent': 'evalon-payments-fake/1.0',
        },
        body: payload,
        redirect: 'manual',
        signal: globalThis.AbortSignal.timeout(config.timeoutMs),
      });
      record.status = res.status;
      record.body = (await res.text()).slice(0, 300);
    } catch (err) {
      record.error = err.cause?.code ?? err.name ?? String(err);
    }
    record.durationMs = Date.now() - started;
    return record;
  }

  async function run(endpoint, gen) {
    const token = {};
    running.set(endpoint.id, token);
    try {
      for (;;) {
        if (gen !== generation) return;
        const delivery = state.deliveries.find(
          (d) => d.endpoint === endpoint.id && d.status === 'pending',
        );
        if (!delivery) return;
        const event = state.events.find((e) => e.id === delivery.event);
        if (!event) {
          delivery.status = 'failed';
          delivery.reason = 'event no longer kept';
          continue;
        }
        const record = await attempt(endpoint, delivery, event);
        if (gen !== generation) return;
        delivery.attempts.push(record);
        const ok = record.status !== null && record.status >= 200 && record.status < 300;
        if (ok) {
          delivery.status = 'delivered';
          delivery.nextAttemptAt = null;
          event.pending_webhooks = Math.max(0, event.pending_webhooks - 1);
        } else if (delivery.attempts.length >= config.maxAttempts) {
          delivery.status = 'failed';
          delivery.nextAttemptAt = null;
          delivery.reason = `gave up after ${delivery.attempts.length} attempts`;
          log(`webhook ${event.type} ${event.id} to ${endpoint.url}: ${delivery.reason}`);
        } else {
          const wait = backoffMs(delivery.attempts.length);
          delivery.nextAttemptAt = new Date(Date.now() + wait).toISOString();
          changed();
          await sleep(wait);
          continue;
        }
        changed();
      }
    } finally {
      if (running.get(endpoint.id) === token) running.delete(endpoint.id);
    }
  }

  function kick(endpoint) {
    if (running.has(endpoint.id)) return;
    run(endpoint, generation).catch((err) => log(`webhook worker failed: ${err.stack ?? err}`));
  }

  return {
    settings: config,

    /** Records an event for an object (a snapshot of its public view) and queues deliveries. */
    emit(type, object, request) {
      const event = {
        id: newId('evt_'),
        object: 'event',
        api_version: API_VERSION,
        created: clock.now(),
        data: { object: publicView(object) },
        livemode: false,
        pending_webhooks: 0,
        request: request
          ? { id: request.id ?? null, idempotency_key: request.idempotencyKey ?? null }
          : { id: null, idempotency_key: null },
        type,
      };
      state.events.push(event);
      for (const endpoint of endpoints) {
        if (!wants(endpoint, type)) continue;
        state.deliveries.push({
          id: newId('whd_'),
          event: event.id,
          type,
          endpoint: endpoint.id,
          url: endpoint.url,
          status: 'pending',
          attempts: [],
          nextAttemptAt: null,
          reason: null,
        });
        event.pending_webhooks += 1;
      }
      // Start after the caller has finished changing state (and answered, if it is a request).
      setImmediate(() => {
        for (const endpoint of endpoints) if (wants(endpoint, type)) kick(endpoint);
      });
      changed();
      return event;
    },

    /** Current endpoints (secrets shortened). */
    listEndpoints() {
      return endpoints.map((e) => ({
        ...e,
        secret: `${e.secret.slice(0, 6)}…${e.secret.slice(-4)}`,
      }));
    },

    /**
     * Adds an endpoint, or updates the secret and event filter of one with the same URL;
     * `replace` drops every other endpoint first. Pending deliveries to dropped endpoints fail.
     */
    addEndpoint({ url, secret, enabledEvents = ['*'], replace = false }) {
      if (replace) {
        const kept = endpoints.filter((e) => e.url === url);
        for (const d of state.deliveries) {
          if (d.status === 'pending' && !kept.some((e) => e.id === d.endpoint)) {
            d.status = 'failed';
            d.reason = 'endpoint removed';
          }
        }
        endpoints = kept;
      }
      const existing = endpoints.find((e) => e.url === url);
      if (existing) {
        existing.secret = secret;
        existing.enabledEvents = enabledEvents;
        return existing;
      }
      const endpoint = { id: newId('we_'), url, secret, enabledEvents };
      endpoints.push(endpoint);
      return endpoint;
    },

    /** Removes every endpoint. */
    clearEndpoints() {
      for (const d of state.deliveries) {
        if (d.status === 'pending') {
          d.status = 'failed';
          d.reason = 'endpoint removed';
        }
      }
      endpoints = [];
    },

    /** Changes retry settings. */
    configure(next) {
      Object.assign(config, next);
    },

    /**
     * After a restart: resumes deliveries left pending to an endpoint that is still configured
     * (matched by URL); the others fail.
     */
    resume() {
      for (const d of state.deliveries) {
        if (d.status !== 'pending') continue;
        const endpoint = endpoints.find((e) => e.url === d.url);
        if (endpoint) d.endpoint = endpoint.id;
        else {
          d.status = 'failed';
          d.reason = 'endpoint not configured after restart';
        }
      }
      for (const endpoint of endpoints) kick(endpoint);
    },

    /** Waits until no delivery is pending (all delivered or given up), or the time is up. */
    async flush(timeoutMs = 30_000) {
      const until = Date.now() + timeoutMs;
      const pendingCount = () => state.deliveries.filter((d) => d.status === 'pending').length;
      while ((pendingCount() > 0 || running.size > 0) && Date.now() < until) {
        await new Promise((resolve) => setTimeout(resolve, 10));
      }
      const count = (status) => state.deliveries.filter((d) => d.status === status).length;
      return {
        settled: pendingCount() === 0,
        delivered: count('delivered'),
        failed: count('failed'),
        pending: count('pending'),
      };
    },

    /** Stops every worker (their state is about to be replaced, or the process ends). */
    stop() {
      generation += 1;
      wakeAll();
      running.clear();
    },
  };
}
