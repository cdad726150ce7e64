import { HttpErrorResponse } from '@angular/common/http';

/** An API failure in a form screens can show: a readable message plus per-field messages. */
export class ApiError extends Error {
  constructor(
    /** HTTP status, 0 when the server could not be reached. */
    readonly status: number,
    /** The server's error code (`invalid_credentials`, ...) or one of ours (`offline`, ...). */
    readonly code: string,
    message: string,
    /** Messages by form field name (from 400/422 details). */
    readonly fieldErrors: Readonly<Record<string, string>> = {},
    /** Seconds the server asked us to wait (from Retry-After), when it said. */
    readonly retryAfterSeconds: number | null = null,
    /** The error's `details` as the server sent them (e.g. a 409's conflicts), unchecked. */
    readonly details: unknown = null,
  ) {
    super(message);
    this.name = 'ApiError';
  }
}

/** Words for a wait of `seconds`, rounded up to whole minutes past one minute. */
export function describeWait(seconds: number): string {
  if (seconds < 60) {
    const s = Math.max(1, Math.ceil(seconds));
    return s === 1 ? '1 second' : `${s} seconds`;
  }
  const minutes = Math.ceil(seconds / 60);
  return minutes === 1 ? '1 minute' : `${minutes} minutes`;
}

/** Seconds from a Retry-After header: either delay-seconds or an HTTP date (RFC 9110 §10.2.3). */
export function parseRetryAfter(value: string | null, now = Date.now()): number | null {
  if (!value) return null;
  const trimmed = value.trim();
  if (/^\d+$/.test(trimmed)) return Number(trimmed);
  const at = Date.parse(trimmed);
  return Number.isNaN(at) ? null : Math.max(0, Math.round((at - now) / 1000));
}

/** Message used when the server gave none, by status. */
function fallbackMessage(status: number): string {
  if (status === 0)
    return 'Evalon can’t reach the server right now. Check your connection and try again.';
  if (status === 401) return 'Your session has ended. Sign in again to continue.';
  if (status === 403) return 'You don’t have access to this in the current organisation.';
  if (status === 404) return 'We couldn’t find that. It may have been moved or removed.';
  if (status === 409) return 'Someone changed this at the same time. Reload and try again.';
  if (status === 429) return 'Too many attempts in a short time. Wait a moment and try again.';
  if (status >= 500) return 'Something went wrong on our side. Try again in a moment.';
  return 'That didn’t work. Check what you entered and try again.';
}

function firstMessage(value: unknown): string | null {
  if (typeof value === 'string') return value;
  if (Array.isArray(value)) {
    const found = value.find((v): v is string => typeof v === 'string');
    return found ?? null;
  }
  return null;
}

/**
 * Per-field messages from an error's `details`. The contract only says details "carry field
 * messages", so this accepts the shapes zod produces (`issues` lists, `flatten()` output) and a
 * plain `{field: message}` map.
 */
export function fieldErrorsFrom(details: unknown): Record<string, string> {
  const result: Record<string, string> = {};
  if (!details || typeof details !== 'object') return result;
  const list = Array.isArray(details)
    ? details
    : Array.isArray((details as { issues?: unknown }).issues)
      ? (details as { issues: unknown[] }).issues
      : null;
  if (list) {
    for (const issue of list) {
      if (!issue || typeof issue !== 'object') continue;
      const { path, message } = issue as { path?: unknown; message?: unknown };
      const key = Array.isArray(path) ? path.join('.') : typeof path === 'string' ? path : '';
      if (key && typeof message === 'string' && !(key in result)) result[key] = message;
    }
    return result;
  }
  const fields = (details as { fieldErrors?: unknown }).fieldErrors ?? details;
  if (fields && typeof fields === 'object') {
    for (const [key, value] of Object.entries(fields as Record<string, unknown>)) {
      const message = firstMessage(value);
      if (message) result[key] = message;
    }
  }
  return result;
}

/** Turns an HTTP failure into an {@link ApiError} with the server's words where it sent some. */
export function toApiError(response: HttpErrorResponse): ApiError {
  const body: unknown = response.error;
  const error =
    body && typeof body === 'object' && 'error' in body
      ? (body as { error?: { code?: unknown; message?: unknown; details?: unknown } }).error
      : undefined;
  const code =
    typeof error?.code === 'string' ? error.code : response.status === 0 ? 'offline' : 'http_error';
  const retryAfter = parseRetryAfter(response.headers?.get('Retry-After') ?? null);
  let message =
    typeof error?.message === 'string' && error.message.trim()
      ? error.message
      : fallbackMessage(response.status);
  if (response.status === 429 && retryAfter !== null) {
    message = `Too many attempts in a short time. Try again in ${describeWait(retryAfter)}.`;
  }
  return new ApiError(
    response.status,
    code,
    message,
    fieldErrorsFrom(error?.details),
    retryAfter,
    error?.details ?? null,
  );
}

/** A readable message for anything a request or a promise may throw. */
export function messageOf(error: unknown): string {
  if (error instanceof ApiError) return error.message;
  if (error instanceof HttpErrorResponse) return toApiError(error).message;
  return 'Something unexpected happened. Try again, and reload the page if it keeps happening.';
}

/** The error a lender's page shows when the active organisation is not a lender. */
export function noLender(message: string): ApiError {
  return new ApiError(0, 'no_lender', message);
}
