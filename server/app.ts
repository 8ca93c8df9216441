import path from 'node:path';
import fs from 'node:fs';
import express, { type Express } from 'express';
import { RequestContext } from '@mikro-orm/core';
import type { Queue } from 'bullmq';
import type { Orm } from './db/orm';
import type { RunJobData, RunSignals } from './queue';
import { errorHandler, notFoundHandler } from './errors';
import { createAuth } from './auth';
import { jsonBodies } from './http/body';
import { installAfterCommit } from './services/after-commit';
import { healthDeadline, healthRouter } from './routes/health';
import { runsRouter } from './routes/runs';
import { exportsRouter } from './routes/exports';
import { securityHeaders, requestLogs, createLogger } from './http/headers';
import type { Logger } from 'pino';
import { galaxiesRouter } from './routes/galaxies';
import { galaxySamplesRouter } from './routes/galaxySamples';
import { particleTablesRouter } from './routes/particleTables';
import { accountRouter } from './routes/account';
import { tokensRouter } from './routes/tokens';
import { cohortsRouter } from './routes/cohorts';
import { templatesRouter } from './routes/templates';
import { adminRouter } from './routes/admin';

export interface Deps {
  orm: Orm;
  queue: Queue<RunJobData>;
  signals: RunSignals;
}

/** The HTTP application: thin routes over services, wired to the given resources. */
export function createApp(deps: Deps, opts: { webDir?: string; logger?: Logger } = {}): Express {
  const app = express();
  app.disable('x-powered-by');
  app.set('trust proxy', 'loopback');
  app.use(requestLogs(opts.logger ?? createLogger()));
  app.use(securityHeaders());
  app.use((_req, _res, next) => RequestContext.create(deps.orm.em, next));

  installAfterCommit(deps.orm);
  const auth = createAuth(deps);

  // Every router is mounted here. Health's deadline runs first, so a hanging session store
  // still gets an answer; then who is asking, and only then are bodies read (server/http/body.ts).
  const api = express.Router();
  api.use('/health', healthDeadline);
  api.use(auth.authenticate);
  api.use(jsonBodies());
  api.use('/auth', auth.routes);
  api.use('/health', healthRouter(deps));
  api.use('/account', accountRouter());
  api.use('/tokens', tokensRouter());
  api.use('/cohorts', cohortsRouter(deps.queue));
  api.use('/templates', templatesRouter());
  api.use('/admin', adminRouter());
  api.use('/runs', runsRouter(deps));
  api.use('/runs', exportsRouter());
  api.use('/galaxies', galaxiesRouter(deps));
  api.use('/galaxy-samples', galaxySamplesRouter());
  api.use('/particle-tables', particleTablesRouter());
  api.use(notFoundHandler);
  app.use('/api', api);

  // The exported web app: files as they are, every other path to the app shell.
  const webDir = opts.webDir && path.resolve(opts.webDir);
  if (webDir && fs.existsSync(path.join(webDir, 'index.html'))) {
    app.use(express.static(webDir, { index: false, maxAge: '1h' }));
    app.get('/{*path}', (_req, res) => res.sendFile(path.join(webDir, 'index.html')));
  }
  app.use(errorHandler);
  return app;
}
