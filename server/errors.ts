import type { ErrorRequestHandler, RequestHandler } from 'express';
import type { ApiErrorBody, ErrorCode } from '../shared/api/contract';

const STATUS: Record<ErrorCode, number> = {
  BAD_REQUEST: 400,
  INVALID_SPEC: 400,
  UNAUTHENTICATED: 401,
  FORBIDDEN: 403,
  CSRF_REJECTED: 403,
  NOT_FOUND: 404,
  CONFLICT: 409,
  QUOTA_EXCEEDED: 429,
  RATE_LIMITED: 429,
  PAYLOAD_TOO_LARGE: 413,
  UNAVAILABLE: 503,
  INTERNAL: 500,
};

/** An error a route means to show: it becomes JSON with a stable code. */
export class ApiError extends Error {
  constructor(
    readonly code: ErrorCode,
    message: string,
    readonly extra: { field?: string; details?: unknown; status?: number } = {},
  ) {
    super(message);
  }
  get status(): number {
    return this.extra.status ?? STATUS[this.code];
  }
  body(): ApiErrorBody {
    const { field, details } = this.extra;
    return { error: { code: this.code, message: this.message, ...(field ? { field } : {}), ...(details !== undefined ? { details } : {}) } };
  }
}

export const notFoundHandler: RequestHandler = (req, _res, next) => {
  next(new ApiError('NOT_FOUND', `No API route ${req.method} ${req.path}`));
};

// Turns whatever reached it into the JSON error shape; never leaks a stack.
export const errorHandler: ErrorRequestHandler = (err, _req, res, _next) => {
  let e: ApiError;
  if (err instanceof ApiError) e = err;
  else if (err?.type === 'entity.too.large') e = new ApiError('PAYLOAD_TOO_LARGE', `Request body is larger than the ${err.limit}-byte limit`);
  else if (err?.type === 'entity.parse.failed') e = new ApiError('BAD_REQUEST', 'Request body is not valid JSON');
  else {
    console.error('[server] unhandled error', err);
    e = new ApiError('INTERNAL', 'Something went wrong on the server; the error was logged');
  }
  if (res.headersSent) return;
  res.status(e.status).json(e.body());
};
