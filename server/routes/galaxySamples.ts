import { Router } from 'express';
import { RequestContext } from '@mikro-orm/core';
import type { EntityManager } from '@mikro-orm/postgresql';
import { requireUser } from '../auth/guards';
import { listSampleFits, requestSampleFit, sampleFit } from '../services/galaxies';

const em = () => RequestContext.getEntityManager() as EntityManager;

// Joint fits across several galaxies: made from galaxies the caller may see, kept with the caller.
export function galaxySamplesRouter(): Router {
  const r = Router();
  r.use(requireUser);

  r.get('/', async (req, res) => {
    res.json({ samples: await listSampleFits(em(), req.user!) });
  });

  r.post('/', async (req, res) => {
    res.status(201).json(await requestSampleFit(em(), req.user!, req.body));
  });

  r.get('/:id', async (req, res) => {
    res.json(await sampleFit(em(), req.user!, req.params.id));
  });

  return r;
}
