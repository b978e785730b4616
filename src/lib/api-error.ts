/**
 * The typed failure every fetcher throws. It carries the API's `{ error: { code, message, details? } }`
 * so screens can tell a validation problem (422) from a conflict (409) or an expired session (401).
 */
export class ApiRequestError extends Error {
  override readonly name = "ApiRequestError";
  readonly status: number;
  readonly code: string;
  readonly details: unknown;

  constructor(init: { status: number; code: string; message: string; details?: unknown }) {
    super(init.message);
    this.status = init.status;
    this.code = init.code;
    this.details = init.details;
  }

  /** Network failures and server faults may pass on their own; client errors (4xx) will not. */
  get isRetryable(): boolean {
    return this.status === 0 || this.status === 429 || this.status >= 500;
  }
}

export function isApiRequestError(error: unknown): error is ApiRequestError {
  return error instanceof ApiRequestError;
}

export function hasStatus(error: unknown, status: number): boolean {
  return isApiRequestError(error) && error.status === status;
}
