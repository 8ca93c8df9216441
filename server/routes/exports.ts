import fs from 'node:fs';
import { pipeline } from 'node:stream/promises';
import { Router, type Request } from 'express';
import { RequestContext } from '@mikro-orm/core';
import type { EntityManager } from '@mikro-orm/postgresql';
import { requireUser } from '../auth/guards';
import { config } from '../config';
import { findVisibleRun } from '../services/runs';
import { writeSnapshotFile } from '../services/exports';
import { SNAPSHOT_FILE } from '../../shared/api/snapshots';

const em = () => RequestContext.getEntityManager() as EntityManager;

/** Downloads of a run's stored results, under /api/runs; whoever may read the run may download it. */
export function exportsRouter(): Router {
  const r = Router();

  r.get('/:id/snapshots.h5', requireUser, async (req: Request<{ id: string }>, res) => {
    const run = await findVisibleRun(em(), req.user!, req.params.id);
    const file = await writeSnapshotFile(em(), run, config.exportMaxBytes);
    try {
      res.attachment(file.filename);
      res.type(SNAPSHOT_FILE.mime);
      res.setHeader('Content-Length', String(file.bytes));
      res.setHeader('Cache-Control', 'private, no-store');
      await pipeline(fs.createReadStream(file.path), res);
    } finally {
      file.remove();
    }
  });

  return r;
}
