/**
 * The one application error. Expected failures carry a code; each code has one HTTP status.
 * Anything else reaching a route is a bug: logged, answered with a generic 500.
 */
export const ERROR_STATUS = {
  bad_request: 400,
  unauthenticated: 401,
  forbidden: 403,
  not_found: 404,
  conflict: 409,
  too_large: 413,
  unsupported_media_type: 415,
  invalid: 422,
  rate_limited: 429,
  unavailable: 503,
} as const;

export type ErrorCode = keyof typeof ERROR_STATUS;

export type FieldError = { line: number | null; field: string | null; message: string };

export class AppError extends Error {
  readonly code: ErrorCode;
  readonly errors?: FieldError[];
  readonly details?: Record<string, unknown>;
  constructor(code: ErrorCode, message: string, opts: { errors?: FieldError[]; details?: Record<string, unknown> } = {}) {
    super(message);
    this.name = "AppError";
    this.code = code;
    this.errors = opts.errors;
    this.details = opts.details;
  }
  get status(): number {
    return ERROR_STATUS[this.code];
  }
}

export function isAppError(e: unknown): e is AppError {
  return e instanceof AppError;
}
