import { Router } from 'express';
import { RequestContext } from '@mikro-orm/core';
import type { EntityManager } from '@mikro-orm/postgresql';
import { requireUser } from '../auth/guards';
import { tableUpload } from './upload';
import { readParticleUpload } from '../services/particleTables';

const em = () => RequestContext.getEntityManager() as EntityManager;

/** POST /api/particle-tables: a particle file read with the same rules and limits as a galaxy table. */
export function particleTablesRouter(): Router {
  const r = Router();
  r.use(requireUser);
  r.post('/', tableUpload, async (req, res) => {
    res.json(await readParticleUpload(em(), req.user!, req.file));
  });
  return r;
}
