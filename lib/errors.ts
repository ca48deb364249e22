// One error type for the whole server: a code the client can branch on, the HTTP status
// it maps to, and a message safe to show. Causes are logged, never sent.
export const errorStatus = {
  bad_request: 400,
  unauthorized: 401,
  forbidden: 403,
  not_found: 404,
  conflict: 409,
  payload_too_large: 413,
  unsupported_media_type: 415,
  rate_limited: 429,
  internal: 500,
  unavailable: 503,
} as const;

export type ErrorCode = keyof typeof errorStatus;

export interface ErrorBody {
  error: { code: ErrorCode; message: string; details?: unknown };
}

export class AppError extends Error {
  readonly status: number;
  constructor(
    readonly code: ErrorCode,
    message: string,
    readonly details?: unknown,
  ) {
    super(message);
    this.name = "AppError";
    this.status = errorStatus[code];
  }

  toBody(): ErrorBody {
    return {
      error: {
        code: this.code,
        message: this.message,
        ...(this.details === undefined ? {} : { details: this.details }),
      },
    };
  }
}

/**
 * True for an AppError from any copy of this module: Next bundles route code apart from
 * server.ts, so an error thrown by the alarm service is not `instanceof` the route's class.
 */
export function isAppError(err: unknown): err is AppError {
  return (
    err instanceof AppError ||
    (err instanceof Error &&
      err.name === "AppError" &&
      typeof (err as AppError).status === "number" &&
      typeof (err as AppError).toBody === "function")
  );
}

export const notFound = (what = "Not found") => new AppError("not_found", what);
