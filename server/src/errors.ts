// AppError lives outside http/ so that domain code can throw it without importing the web layer;
// http/errors.ts turns it into the JSON answer.

/**
 * The one error type the domain and the HTTP layer throw. The error middleware (http/errors.ts) turns it into
 * `{error: {code, message, details?}}` with `status`.
 */
export class AppError extends Error {
  constructor(
    /** HTTP status to answer with. */
    readonly status: number,
    /** Stable machine-readable code, e.g. `invalid_credentials`. */
    readonly code: string,
    /** Sentence a person can read; screens show it as is. */
    message: string,
    /** Extra machine-readable facts (field messages for validation errors). */
    readonly details?: unknown,
    /** Extra response headers, e.g. `Retry-After`. */
    readonly headers?: Record<string, string>,
  ) {
    super(message);
    this.name = 'AppError';
  }

  static badRequest(code: string, message: string, details?: unknown): AppError {
    return new AppError(400, code, message, details);
  }
  static unauthorized(code = 'not_signed_in', message = 'Sign in to continue.'): AppError {
    return new AppError(401, code, message);
  }
  static forbidden(code = 'forbidden', message = 'You do not have access to this.'): AppError {
    return new AppError(403, code, message);
  }
  static notFound(code = 'not_found', message = 'We could not find that.'): AppError {
    return new AppError(404, code, message);
  }
  static conflict(code: string, message: string, details?: unknown): AppError {
    return new AppError(409, code, message, details);
  }
  static gone(code: string, message: string): AppError {
    return new AppError(410, code, message);
  }
  /** A 422 pointing at one field, shaped like a validation failure so forms can show it. */
  static field(code: string, field: string, message: string): AppError {
    return new AppError(422, code, message, {
      fieldErrors: { [field]: [message] },
      formErrors: [],
    });
  }
}
