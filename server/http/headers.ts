import type { IncomingMessage, ServerResponse } from 'node:http';
import { randomUUID } from 'node:crypto';
import helmet from 'helmet';
import { pino, type Logger } from 'pino';
import { pinoHttp } from 'pino-http';
import type { RequestHandler } from 'express';
import { config } from '../config';

/**
 * Security headers. The web export loads only its own script files (no inline
 * script); react-native-web writes its styles into <style> elements at run time,
 * hence 'unsafe-inline' for styles only. No page may frame the app.
 */
export function securityHeaders(): RequestHandler {
  const https = config.publicUrl.startsWith('https:');
  return helmet({
    contentSecurityPolicy: {
      useDefaults: false,
      directives: {
        defaultSrc: ["'self'"],
        // 'wasm-unsafe-eval' lets the page compile the direct-sum WebAssembly kernel (its preview
        // runs the engine) without allowing eval of JavaScript.
        scriptSrc: ["'self'", "'wasm-unsafe-eval'"],
        styleSrc: ["'self'", "'unsafe-inline'"],
        imgSrc: ["'self'", 'data:', 'blob:'],
        fontSrc: ["'self'", 'data:'],
        connectSrc: ["'self'"],
        workerSrc: ["'self'", 'blob:'],
        objectSrc: ["'none'"],
        baseUri: ["'self'"],
        formAction: ["'self'"],
        frameAncestors: ["'none'"],
        // Only behind https: on plain http it would send the browser to a port that is not there.
        ...(https ? { upgradeInsecureRequests: [] } : {}),
      },
    },
    referrerPolicy: { policy: 'same-origin' },
    strictTransportSecurity: https,
  });
}

/** The request logger's lines: method, path without its query (it may carry codes or tokens), status, time. Never headers. */
export function createLogger(destination?: NodeJS.WritableStream): Logger {
  // Jest sets NODE_ENV=test: tests stay quiet unless they hand in a destination.
  const level = process.env.INFALL_LOG_LEVEL ?? (process.env.NODE_ENV === 'test' && !destination ? 'silent' : 'info');
  return destination ? pino({ level }, destination) : pino({ level });
}

const pathOnly = (url: string | undefined) => (url ?? '').split('?')[0];

/** Structured request logs with a request id, echoed to the client as X-Request-Id. */
export function requestLogs(logger: Logger): RequestHandler {
  return pinoHttp({
    logger,
    genReqId: (_req: IncomingMessage, res: ServerResponse) => {
      const id = randomUUID();
      res.setHeader('X-Request-Id', id);
      return id;
    },
    serializers: {
      req: (req: { id: string; method: string; url: string }) => ({ id: req.id, method: req.method, path: pathOnly(req.url) }),
      res: (res: { statusCode: number }) => ({ status: res.statusCode }),
      err: pino.stdSerializers.err,
    },
    customProps: (req: IncomingMessage) => {
      const user = (req as IncomingMessage & { user?: { id: number } }).user;
      return user ? { userId: user.id } : {};
    },
    customLogLevel: (_req, res, err) => (err || res.statusCode >= 500 ? 'error' : res.statusCode >= 400 ? 'warn' : 'info'),
    // Static files of the web app are not worth a line each.
    autoLogging: { ignore: (req: IncomingMessage) => !(req.url ?? '').startsWith('/api') },
  }) as unknown as RequestHandler;
}
