// Idempotent POSTs as the provider documents them: the first answer to a key is kept (24 h of
// the fake clock) and replayed for the same request with `Idempotent-Replayed: true`; the same
// key with other parameters is an `idempotency_error`; a key longer than 255 characters is
// refused; a key still being worked on answers 409. Parameter validation errors are not kept.
import crypto from 'node:crypto';
import { ApiError, invalidParam } from './errors.mjs';

/** Longest key the provider accepts (docs/references.md). */
export const MAX_KEY_LENGTH = 255;

/** JSON with keys sorted at every level, so the same parameters always compare equal. */
function canonical(value) {
  if (Array.isArray(value)) return `[${value.map(canonical).join(',')}]`;
  if (value && typeof value === 'object') {
    return `{${Object.keys(value)
      .sort()
      .map((k) => `${JSON.stringify(k)}:${canonical(value[k])}`)
      .join(',')}}`;
  }
  return JSON.stringify(value ?? null);
}

const sha256 = (text) => crypto.createHash('sha256').update(text).digest('hex');

/**
 * @param {{state: object, clock: object}} deps
 */
export function createIdempotency({ state, clock }) {
  const inFlight = new Set();

  return {
    /**
     * Runs `execute` (→ {status, body, remember}) once per key. Returns the answer to send and
     * whether it is a replay.
     */
    async run({ apiKey, key, method, path, params }, execute) {
      if (key.length > MAX_KEY_LENGTH) {
        throw invalidParam(
          `Idempotency keys can be at most ${MAX_KEY_LENGTH} characters long; this one has ${key.length}.`,
          'Idempotency-Key',
        );
      }
      // Keys belong to one account; the API key stands for it. Only its hash is kept.
      const scope = `${sha256(apiKey).slice(0, 16)}:${key}`;
      const fingerprint = sha256(`${method} ${path} ${canonical(params)}`);
      const kept = state.idempotency[scope];
      if (kept && clock.now() - kept.created < 24 * 60 * 60) {
        if (kept.fingerprint !== fingerprint) {
          throw new ApiError(
            400,
            'idempotency_error',
            `Keys for idempotent requests can only be used with the same parameters they were ` +
              `first used with. Try using a key other than '${key}' if you meant to execute a ` +
              `different request.`,
            { remember: false },
          );
        }
        return { status: kept.status, body: kept.body, requestId: kept.requestId, replayed: true };
      }
      if (inFlight.has(scope)) {
        throw new ApiError(
          409,
          'idempotency_error',
          `There is currently another in-progress request using the idempotency key '${key}'. ` +
            'Try again later.',
          { remember: false },
        );
      }
      inFlight.add(scope);
      try {
        const answer = await execute();
        if (answer.remember) {
          state.idempotency[scope] = {
            created: clock.now(),
            fingerprint,
            status: answer.status,
            body: answer.body,
            requestId: answer.requestId,
          };
        }
        return { ...answer, replayed: false };
      } finally {
        inFlight.delete(scope);
      }
    },
  };
}
