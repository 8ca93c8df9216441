import express, { type RequestHandler } from 'express';

/**
 * Request bodies: JSON only, read after authentication (an anonymous body is never
 * read), size-capped before it is read and depth-capped before it is parsed, so no
 * single request can hold the event loop. Bodies that carry a run spec (an uploaded
 * particle table of 20,000 rows is about 3 MB) get the large cap, the rest the small one.
 */
export const BODY_LIMITS = { specBytes: 4 * 1024 * 1024, otherBytes: 64 * 1024, depth: 32 } as const;

/** True for the routes whose body carries a run spec. */
const carriesSpec = (method: string, path: string): boolean => method === 'POST' && (path === '/runs' || /^\/cohorts\/[^/]+\/templates$/.test(path));

/** Deepest nesting of arrays and objects in JSON text, counted without parsing; stops once past `max`. */
export function jsonDepthExceeds(buf: Buffer, max: number): boolean {
  let depth = 0;
  let inString = false;
  for (let i = 0; i < buf.length; i++) {
    const c = buf[i];
    if (inString) {
      if (c === 0x5c) i++; // backslash: skip the escaped byte
      else if (c === 0x22) inString = false;
    } else if (c === 0x22) inString = true;
    else if (c === 0x7b || c === 0x5b) {
      if (++depth > max) return true;
    } else if (c === 0x7d || c === 0x5d) depth--;
  }
  return false;
}

const verify = (_req: unknown, _res: unknown, buf: Buffer) => {
  if (jsonDepthExceeds(buf, BODY_LIMITS.depth)) {
    throw Object.assign(new Error(`Request body is nested deeper than ${BODY_LIMITS.depth} levels`), { status: 400, type: 'entity.too.deep' });
  }
};

export function jsonBodies(): RequestHandler {
  const large = express.json({ limit: BODY_LIMITS.specBytes, verify });
  const small = express.json({ limit: BODY_LIMITS.otherBytes, verify });
  return (req, res, next) => {
    if (!req.user) return next();
    return (carriesSpec(req.method, req.path) ? large : small)(req, res, next);
  };
}
