import type { Config } from '../../config';
import crypto from 'node:crypto';
import { AppError } from '../../errors';

/** What we ask a carrier to move. */
export interface CarrierBooking {
  /** Our shipment reference (the carrier echoes it on every tracking event). */
  reference: string;
  service: 'standard' | 'express';
  shipFrom: { name: string; country: string; postalCode: string | null };
  shipTo: { name: string; country: string; postalCode: string | null };
  parcels: { reference: string; weightGrams: number }[];
  /** Makes a retried booking return the first one instead of booking twice. */
  idempotencyKey: string;
}

/** What the carrier answered. */
export interface CarrierBooked {
  trackingNumber: string;
  /** The carrier's own promise (calendar date), if it gives one. */
  estimatedDelivery: string | null;
}

/** One tracking event as every carrier adapter hands it to the domain. */
export interface TrackingEvent {
  /** The carrier's event id (stored once: a repeated delivery is a duplicate). */
  id: string;
  trackingNumber: string;
  status: string;
  detail: string | null;
  sequence: number | null;
  occurredAt: Date;
  location: string | null;
  estimatedDelivery: string | null;
}

/**
 * A carrier behind one interface: the stand-in speaks this; a real carrier's API would get its
 * own adapter (booking call, webhook verification and event mapping) with the same shape.
 */
export interface CarrierClient {
  /** The carrier's code stored on the shipment. */
  readonly code: string;
  book(booking: CarrierBooking): Promise<CarrierBooked>;
  /**
   * Checks a webhook's signature over the raw body and reads its event; throws AppError 400
   * `invalid_signature` / `invalid_payload` otherwise.
   */
  verifyWebhook(rawBody: Buffer, signature: string | undefined, now?: Date): TrackingEvent;
}

/** Settings of the stand-in's adapter. */
export interface CarrierOptions {
  baseUrl: string;
  apiKey: string;
  webhookSecret: string;
  /** How old a signed timestamp may be (seconds), against replays. */
  toleranceSeconds: number;
  timeoutMs: number;
}

/** The carrier settings from the environment (the local stand-in by default). */
export function carrierOptionsFromConfig(config: Pick<Config, 'shipments'>): CarrierOptions {
  const c = config.shipments.carrier;
  return {
    baseUrl: c.baseUrl,
    apiKey: c.apiKey,
    webhookSecret: c.webhookSecret,
    toleranceSeconds: 300,
    timeoutMs: c.timeoutMs,
  };
}

/** `t=<unix>,v1=<hex>` over `<t>.<raw body>`, compared in constant time. */
export function verifySignature(
  rawBody: Buffer,
  header: string | undefined,
  secret: string,
  toleranceSeconds: number,
  now: Date,
): void {
  const parts = Object.fromEntries(
    (header ?? '').split(',').map((p) => {
      const i = p.indexOf('=');
      return [p.slice(0, i).trim(), p.slice(i + 1).trim()];
    }),
  );
  const t = Number(parts.t);
  const given = Buffer.from(String(parts.v1 ?? ''), 'hex');
  const expected = crypto
    .createHmac('sha256', secret)
    .update(`${parts.t}.`)
    .update(rawBody)
    .digest();
  const fresh = Number.isInteger(t) && Math.abs(now.getTime() / 1000 - t) <= toleranceSeconds;
  if (!fresh || given.length !== expected.length || !crypto.timingSafeEqual(given, expected)) {
    throw AppError.badRequest(
      'invalid_signature',
      'The carrier signature is missing, wrong or too old.',
    );
  }
}

/** The adapter for the local carrier stand-in (docs/carrier-standin.md). */
export function createStandInCarrier(options: CarrierOptions): CarrierClient {
  return {
    code: 'wendrow',
    async book(b) {
      let res: Response;
      try {
        res = await fetch(`${options.baseUrl}/v1/shipments`, {
          method: 'POST',
          headers: {
            'content-type': 'application/json',
            authorization: `Bearer ${options.apiKey}`,
            'idempotency-key': b.idempotencyKey,
          },
          body: JSON.stringify({
            reference: b.reference,
            service: b.service,
            shipFrom: b.shipFrom,
            shipTo: b.shipTo,
            parcels: b.parcels,
          }),
          signal: AbortSignal.timeout(options.timeoutMs),
        });
      } catch {
        throw new AppError(
          502,
          'carrier_unavailable',
          'The carrier could not be reached; try again.',
        );
      }
      const body = (await res.json().catch(() => ({}))) as {
        trackingNumber?: string;
        estimatedDelivery?: string;
        error?: { message?: string };
      };
      if (res.status >= 500) {
        throw new AppError(502, 'carrier_unavailable', 'The carrier is not answering; try again.');
      }
      if (!res.ok || !body.trackingNumber) {
        throw new AppError(
          502,
          'carrier_refused',
          `The carrier refused the booking: ${body.error?.message ?? res.status}`,
        );
      }
      return {
        trackingNumber: body.trackingNumber,
        estimatedDelivery: body.estimatedDelivery ?? null,
      };
    },
    verifyWebhook(rawBody, signature, now = new Date()) {
      verifySignature(rawBody, signature, options.webhookSecret, options.toleranceSeconds, now);
      let parsed: {
        id?: unknown;
        data?: {
          trackingNumber?: unknown;
          status?: unknown;
          detail?: unknown;
          sequence?: unknown;
          occurredAt?: unknown;
          location?: unknown;
          estimatedDelivery?: unknown;
        };
      };
      try {
        parsed = JSON.parse(rawBody.toString('utf8'));
      } catch {
        throw AppError.badRequest('invalid_payload', 'The event is not JSON.');
      }
      const d = parsed.data ?? {};
      const occurredAt = new Date(String(d.occurredAt));
      if (
        typeof parsed.id !== 'string' ||
        typeof d.trackingNumber !== 'string' ||
        typeof d.status !== 'string' ||
        Number.isNaN(occurredAt.getTime())
      ) {
        throw AppError.badRequest(
          'invalid_payload',
          'The event lacks id, tracking number or status.',
        );
      }
      return {
        id: parsed.id,
        trackingNumber: d.trackingNumber,
        status: d.status,
        detail: typeof d.detail === 'string' ? d.detail : null,
        sequence: typeof d.sequence === 'number' ? d.sequence : null,
        occurredAt,
        location: typeof d.location === 'string' ? d.location : null,
        estimatedDelivery:
          typeof d.estimatedDelivery === 'string' && /^\d{4}-\d{2}-\d{2}$/.test(d.estimatedDelivery)
            ? d.estimatedDelivery
            : null,
      };
    },
  };
}
