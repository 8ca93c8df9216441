import type { z } from 'zod';
import { ApiError } from '../errors';
import { issuePath } from '../../shared/spec';

/** Parses a body or query with its shared schema; the first problem becomes a 400 naming the field. */
export function parseInput<S extends z.ZodType>(schema: S, data: unknown): z.infer<S> {
  const parsed = schema.safeParse(data ?? {});
  if (parsed.success) return parsed.data;
  const issue = parsed.error.issues[0];
  const field = issuePath(issue) || 'body';
  throw new ApiError('BAD_REQUEST', `${field}: ${issue.message}`, { field });
}

/** A numeric id from the path; anything else names nothing, so it is a 404. */
export function idParam(raw: string, what: string): number {
  const id = /^[1-9][0-9]{0,9}$/.test(raw) ? Number(raw) : NaN;
  if (!Number.isSafeInteger(id) || id > 2 ** 31 - 1) throw new ApiError('NOT_FOUND', `No ${what} ${raw}`);
  return id;
}
