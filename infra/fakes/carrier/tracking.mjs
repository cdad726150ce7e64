// The tracking side of the carrier stand-in: the status ladder every parcel climbs, the events it
// emits on the way, and their signed webhook deliveries (each event delivered on its own, so
// with jitter they can arrive out of order; some delivered twice on purpose; retried with
// exponential backoff until the endpoint answers 2xx).
import crypto from 'node:crypto';
import { signPayload, SIGNATURE_HEADER } from './signature.mjs';

/** The ladder a parcel climbs; `exception` is a side report (delayed, lost, damaged). */
export const STATUSES = ['booked', 'picked_up', 'in_transit', 'out_for_delivery', 'delivered'];

/** Where each step happens, for the event's `location` (invented hub names). */
const LOCATION = {
  booked: 'origin',
  picked_up: 'origin',
  in_transit: 'Harlow Gate hub',
  out_for_delivery: 'destination',
  delivered: 'destination',
};

export const DEFAULT_SETTINGS = Object.freeze({
  retryBaseMs: 500,
  retryMaxMs: 30_000,
  maxAttempts: 10,
  timeoutMs: 10_000,
  /** Real time between automatic steps of every moving parcel; 0 = only the control API moves. */
  stepMs: 0,
});

export const DEFAULT_CHAOS = Object.freeze({
  /** Fraction of events delivered a second time. */
  duplicateRate: 0,
  /** Up to this many ms of random wait before each delivery (so deliveries overtake). */
  shuffleMs: 0,
  /** Whether the carrier is down: /v1 answers 503 and no webhook leaves until it is back. */
  down: false,
  /** Fraction of /v1 calls failing with 500. */
  errorRate: 0,
  /** Extra latency on every /v1 call. */
  latencyMs: 0,
  /** Seed for a repeatable random sequence (null: Math.random). */
  rngStart: null,
});

export const newId = (prefix, bytes = 9) => prefix + crypto.randomBytes(bytes).toString('hex');

/** mulberry32, a public-domain 32-bit generator: repeatable chaos when seeded. */
export function seeded(start) {
  let a = start | 0;
  return () => {
    a = (a + 0x6d2b79f5) | 0;
    let t = Math.imul(a ^ (a >>> 15), 1 | a);
    t = (t + Math.imul(t ^ (t >>> 7), 61 | t)) ^ t;
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
  };
}

/**
 * The event log and the delivery workers.
 * @param {{state: object, settings: object, chaos: object, random: () => number,
 *   log: (m: string) => void}} ctx
 */
export function createTracking(ctx) {
  const { state } = ctx;
  let generation = 0;
  const timers = new Set();
  const inFlight = new Set();

  const sleep = (ms) =>
    new Promise((resolve) => {
      const t = setTimeout(() => {
        timers.delete(t);
        resolve();
      }, ms);
      timers.add(t);
    });

  const backoffMs = (failures) =>
    Math.min(ctx.settings.retryBaseMs * 2 ** (failures - 1), ctx.settings.retryMaxMs);

  async function attempt(delivery, event) {
    const payload = JSON.stringify({
      id: event.id,
      type: 'tracking.event',
      createdAt: event.createdAt,
      data: event.data,
    });
    const started = Date.now();
    const record = { at: new Date(started).toISOString(), status: null, error: null };
    try {
      const res = await fetch(state.endpoint.url, {
        method: 'POST',
        headers: {
          'content-type': 'application/json; charset=utf-8',
          [SIGNATURE_HEADER]: signPayload(payload, state.endpoint.secret),
          'user-agent': 'evalon-carrier-fake/1.0',
        },
        body: payload,
        redirect: 'manual',
        signal: globalThis.AbortSignal.timeout(ctx.settings.timeoutMs),
      });
      record.status = res.status;
      record.body = (await res.text()).slice(0, 200);
    } catch (err) {
      record.error = err.cause?.code ?? err.name ?? String(err);
    }
    record.durationMs = Date.now() - started;
    return record;
  }

  async function deliver(delivery, gen) {
    const event = state.events.find((e) => e.id === delivery.event);
    if (ctx.chaos.shuffleMs > 0) await sleep(Math.floor(ctx.random() * ctx.chaos.shuffleMs));
    for (;;) {
      if (gen !== generation) return;
      if (!state.endpoint) {
        delivery.status = 'failed';
        delivery.reason = 'no endpoint';
        return;
      }
      // While the carrier is down nothing leaves; attempts resume when it is back.
      if (ctx.chaos.down) {
        await sleep(50);
        continue;
      }
      const record = await attempt(delivery, event);
      if (gen !== generation) return;
      delivery.attempts.push(record);
      if (record.status !== null && record.status >= 200 && record.status < 300) {
        delivery.status = 'delivered';
        return;
      }
      if (delivery.attempts.length >= ctx.settings.maxAttempts) {
        delivery.status = 'failed';
        delivery.reason = `gave up after ${delivery.attempts.length} attempts`;
        ctx.log(`webhook ${event.id} (${event.data.status}): ${delivery.reason}`);
        return;
      }
      await sleep(backoffMs(delivery.attempts.length));
    }
  }

  /** Queues one delivery of an event and starts it. */
  function queue(event, copy = 'original') {
    if (!state.endpoint) return null;
    const delivery = {
      id: newId('cwd_'),
      event: event.id,
      status: 'pending',
      copy,
      attempts: [],
      reason: null,
    };
    state.deliveries.push(delivery);
    const p = deliver(delivery, generation)
      .catch((err) => {
        delivery.status = 'failed';
        delivery.reason = String(err);
      })
      .finally(() => inFlight.delete(p));
    inFlight.add(p);
    return delivery;
  }

  return {
    /** Records a tracking event for a parcel and sends it (maybe twice, under chaos). */
    emit(parcel, status, detail = null) {
      parcel.sequence += 1;
      const event = {
        id: newId('cev_'),
        createdAt: new Date().toISOString(),
        data: {
          trackingNumber: parcel.trackingNumber,
          reference: parcel.reference,
          sequence: parcel.sequence,
          status,
          detail,
          occurredAt: new Date().toISOString(),
          location: LOCATION[status] ?? 'in network',
          estimatedDelivery: parcel.estimatedDelivery,
        },
      };
      state.events.push(event);
      queue(event);
      if (ctx.chaos.duplicateRate > 0 && ctx.random() < ctx.chaos.duplicateRate) {
        queue(event, 'duplicate');
      }
      return event;
    },

    /** Delivers every event of a parcel `times` more times, in a shuffled order. */
    replay(trackingNumber, times) {
      const events = state.events.filter((e) => e.data.trackingNumber === trackingNumber);
      const copies = [];
      for (let i = 0; i < times; i += 1) copies.push(...events);
      // Fisher–Yates with the stand-in's generator, so a seeded run repeats.
      for (let i = copies.length - 1; i > 0; i -= 1) {
        const j = Math.floor(ctx.random() * (i + 1));
        [copies[i], copies[j]] = [copies[j], copies[i]];
      }
      return copies.map((e) => queue(e, 'replay')).filter(Boolean).length;
    },

    /** Waits until no delivery is pending or the time is up. */
    async flush(timeoutMs = 30_000) {
      const until = Date.now() + timeoutMs;
      while (inFlight.size > 0 && Date.now() < until) {
        await new Promise((resolve) => setTimeout(resolve, 10));
      }
      const count = (s) => state.deliveries.filter((d) => d.status === s).length;
      return {
        settled: inFlight.size === 0,
        delivered: count('delivered'),
        failed: count('failed'),
        pending: count('pending'),
      };
    },

    /** Stops every worker (reset or close). */
    stop() {
      generation += 1;
      for (const t of timers) clearTimeout(t);
      timers.clear();
      inFlight.clear();
    },
  };
}
