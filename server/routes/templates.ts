import { Router } from 'express';
import { RequestContext } from '@mikro-orm/core';
import type { EntityManager } from '@mikro-orm/postgresql';
import { requireUser } from '../auth/guards';
import { deleteTemplate, findVisibleTemplate, listTemplates, toTemplateDetail, toTemplateSummary } from '../services/templates';
import { idParam } from './input';

const em = () => RequestContext.getEntityManager() as EntityManager;

// Cloning a template is reading its detail: the app fills the new-run form with spec and pairLaw.
export function templatesRouter(): Router {
  const r = Router();
  r.use(requireUser);

  r.get('/', async (req, res) => {
    res.json({ templates: (await listTemplates(em(), req.user!)).map(toTemplateSummary) });
  });

  r.get('/:id', async (req, res) => {
    res.json({ template: toTemplateDetail(await findVisibleTemplate(em(), req.user!, idParam(req.params.id, 'template'))) });
  });

  r.delete('/:id', async (req, res) => {
    const t = await findVisibleTemplate(em(), req.user!, idParam(req.params.id, 'template'));
    await deleteTemplate(em(), req.user!, t);
    res.status(204).end();
  });

  return r;
}
