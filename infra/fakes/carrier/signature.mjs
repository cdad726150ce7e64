// The carrier stand-in's webhook signature: header `Carrier-Signature: t=<unix seconds>,v1=<hex>`
// where v1 = HMAC-SHA256(secret, "<t>.<raw body>"). The same shape as the payments provider's
// scheme (see /work reference values: "t=<unix>,v1=<hex HMAC-SHA256 of "<t>.<raw body>">"), so
// the receiver can reuse one way of thinking about replay tolerance.
import crypto from 'node:crypto';

/** The header name the stand-in signs with (lower case, as Node presents it). */
export const SIGNATURE_HEADER = 'carrier-signature';

/** Signs a raw body at `timestamp` (unix seconds). */
export function signPayload(payload, secret, timestamp = Math.floor(Date.now() / 1000)) {
  const v1 = crypto.createHmac('sha256', secret).update(`${timestamp}.${payload}`).digest('hex');
  return `t=${timestamp},v1=${v1}`;
}
