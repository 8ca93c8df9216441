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

/** Which backing service an error says is down (connection refused or lost, pool or call timeout), if any. */
export function unavailable(err: unknown): Service | null {
  if (err instanceof ServiceTimeout) return err.service;
  const e = err as { code?: string; name?: string; message?: string } | null;
  // Knex's pool timeout, MikroORM's wrapped connection errors, a refused socket, the server shutting down (57P01).
  if (e?.name === 'KnexTimeoutError' || e?.name === 'ConnectionException' || e?.code === 'ECONNREFUSED' || e?.code === '57P01') return 'The database';
  // The pg driver's query_timeout: a statement the server never answered (see config.queryTimeoutMs).
  if (/Query read timeout/.test(e?.message ?? '')) return 'The database';
  // ioredis with no offline queue refuses commands at once while disconnected.
  if (/Stream isn't writeable|Connection is closed/.test(e?.message ?? '')) return 'The queue';
  return null;
}

type Service = 'The database' | 'The queue';

/** A call to PostgreSQL or Redis that took longer than a request may wait. */
export class ServiceTimeout extends Error {
  constructor(readonly service: Service, ms: number) {
    super(`${service} did not answer within ${ms} ms`);
  }
}

/** Races a service call against a deadline, so a request answers 503 instead of hanging. */
export function withTimeout<T>(work: Promise<T>, service: Service, ms: number): Promise<T> {
  let timer: ReturnType<typeof setTimeout> | undefined;
  const deadline = new Promise<never>((_, reject) => (timer = setTimeout(() => reject(new ServiceTimeout(service, ms)), ms)));
  return Promise.race([work, deadline]).finally(() => clearTimeout(timer));
}

// Turns whatever reached it into the JSON error shape; never leaks a stack.
export const errorHandler: ErrorRequestHandler = (err, _req, res, _next) => {
  let e: ApiError;
  if (err instanceof ApiError) e = err;
  else if (err?.type === 'entity.too.large') e = new ApiError('PAYLOAD_TOO_LARGE', `Request body is larger than the ${err.limit}-byte limit`);
  else if (err?.type === 'entity.parse.failed') e = new ApiError('BAD_REQUEST', 'Request body is not valid JSON');
  else if (err?.type === 'entity.too.deep') e = new ApiError('BAD_REQUEST', err.message);
  else if (unavailable(err)) e = new ApiError('UNAVAILABLE', `${unavailable(err)} is not answering; try again shortly`);
  else {
    console.error('[server] unhandled error', err);
    e = new ApiError('INTERNAL', 'Something went wrong on the server; the error was logged');
  }
  if (res.headersSent) return;
  res.status(e.status).json(e.body());
};
