// Errors in the payment provider's shape: `{error: {type, code?, param?, message, ...}}` with the
// HTTP status the official SDK maps to its error classes (400/404 invalid request, 401
// authentication, 402 card, 409 idempotency conflict, 5xx API error).

/** An error answered to the API client in the provider's error shape. */
export class ApiError extends Error {
  /**
   * @param {number} status HTTP status.
   * @param {string} type Provider error type, e.g. `invalid_request_error`.
   * @param {string} message Human-readable message.
   * @param {{code?: string, param?: string, declineCode?: string, extra?: object,
   *   remember?: boolean}} [options] `remember`: whether an idempotency key keeps this answer
   *   (false for parameter validation, which the provider does not store either).
   */
  constructor(status, type, message, options = {}) {
    super(message);
    this.status = status;
    this.type = type;
    this.code = options.code;
    this.param = options.param;
    this.declineCode = options.declineCode;
    this.extra = options.extra;
    this.remember = options.remember ?? true;
  }

  /** The JSON body sent to the client. */
  toBody() {
    const error = { type: this.type, message: this.message };
    if (this.code) error.code = this.code;
    if (this.declineCode) error.decline_code = this.declineCode;
    if (this.param) error.param = this.param;
    return { error: { ...error, ...this.extra } };
  }
}

/** A 400 `invalid_request_error` raised while executing a request (kept by idempotency keys). */
export function invalidRequest(message, options = {}) {
  return new ApiError(400, 'invalid_request_error', message, options);
}

/** A 400 raised while validating parameters (not kept by idempotency keys). */
export function invalidParam(message, param, code) {
  return new ApiError(400, 'invalid_request_error', message, { param, code, remember: false });
}

/** A 404 for an unknown object id, in the provider's wording. */
export function noSuch(kind, id, param = 'id') {
  return new ApiError(404, 'invalid_request_error', `No such ${kind}: '${id}'`, {
    code: 'resource_missing',
    param,
    remember: false,
  });
}
