import { Router } from 'express';
import { RequestContext } from '@mikro-orm/core';
import type { EntityManager } from '@mikro-orm/postgresql';
import { requireUser } from '../auth/guards';
import { tableUpload } from './upload';
import { uploadLimits } from '../services/quotas';
import { createGalaxy, deleteGalaxy, findVisibleGalaxy, galaxyDetail, galaxyFile, listGalaxies, requestFit, runsFromGalaxy, updateGalaxy } from '../services/galaxies';
import type { Deps } from '../app';
import type { GalaxyList } from '../../shared/api/galaxies';

const em = () => RequestContext.getEntityManager() as EntityManager;

export function galaxiesRouter({ queue }: Pick<Deps, 'queue'>): Router {
  const r = Router();
  r.use(requireUser);

  r.get('/', async (req, res) => {
    const body: GalaxyList = { galaxies: await listGalaxies(em(), req.user!), limits: await uploadLimits(em(), req.user!) };
    res.json(body);
  });

  r.post('/', tableUpload, async (req, res) => {
    const g = await createGalaxy(em(), req.user!, req.file, req.body);
    res.status(201).json(await galaxyDetail(em(), req.user!, g));
  });

  r.get('/:id', async (req, res) => {
    const g = await findVisibleGalaxy(em(), req.user!, req.params.id);
    res.json(await galaxyDetail(em(), req.user!, g));
  });

  // The raw table as uploaded: always a download, never rendered by the browser.
  r.get('/:id/file', async (req, res) => {
    const g = await findVisibleGalaxy(em(), req.user!, req.params.id);
    res.attachment(g.fileName).type('application/octet-stream').set('X-Content-Type-Options', 'nosniff').send(await galaxyFile(em(), g));
  });

  r.post('/:id/fits', async (req, res) => {
    const g = await findVisibleGalaxy(em(), req.user!, req.params.id);
    res.status(201).json(await requestFit(em(), req.user!, g, req.body));
  });

  // A pair of runs built from the galaxy's Newtonian fit: anyone who sees the galaxy may start one.
  r.post('/:id/runs', async (req, res) => {
    const g = await findVisibleGalaxy(em(), req.user!, req.params.id);
    res.status(201).json({ runs: await runsFromGalaxy(em(), queue, req.user!, g, req.body) });
  });

  r.patch('/:id', async (req, res) => {
    const g = await findVisibleGalaxy(em(), req.user!, req.params.id);
    res.json(await updateGalaxy(em(), req.user!, g, req.body));
  });

  r.delete('/:id', async (req, res) => {
    const g = await findVisibleGalaxy(em(), req.user!, req.params.id);
    await deleteGalaxy(em(), req.user!, g);
    res.status(204).end();
  });

  return r;
}
