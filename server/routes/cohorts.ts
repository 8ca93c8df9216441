import { Router } from 'express';
import { RequestContext } from '@mikro-orm/core';
import type { EntityManager } from '@mikro-orm/postgresql';
import { requireRole, requireUser } from '../auth/guards';
import { createCohortBodySchema, inviteBodySchema, joinCohortBodySchema, publishTemplateBodySchema, quotaLimitsSchema } from '../../shared/api/accounts';
import {
  cohortMembers,
  createCohort,
  findManagedCohort,
  findVisibleCohort,
  inviteToCohort,
  joinCohort,
  listCohorts,
  rotateEnrolmentCode,
  setCohortQuota,
  toCohortSummary,
} from '../services/cohorts';
import { publishTemplate, templatesOf, toTemplateDetail, toTemplateSummary } from '../services/templates';
import { idParam, parseInput } from './input';
import { mailLimiter } from '../auth/limits';
import type { Queue } from 'bullmq';

const em = () => RequestContext.getEntityManager() as EntityManager;

export function cohortsRouter(queue: Queue): Router {
  const r = Router();
  const mail = mailLimiter(queue);
  r.use(requireUser);

  r.post('/', requireRole('instructor', 'admin'), async (req, res) => {
    const body = parseInput(createCohortBodySchema, req.body);
    const c = await createCohort(em(), req.user!, body.name, body.quota);
    res.status(201).json({ cohort: await toCohortSummary(em(), c, req.user!) });
  });

  r.get('/', async (req, res) => {
    const cohorts = await listCohorts(em(), req.user!);
    res.json({ cohorts: await Promise.all(cohorts.map((c) => toCohortSummary(em(), c, req.user!))) });
  });

  // Registered before "/:id" routes; only students enrol.
  r.post('/join', requireRole('student'), async (req, res) => {
    const { code } = parseInput(joinCohortBodySchema, req.body);
    const c = await joinCohort(em(), req.user!, code);
    res.json({ cohort: await toCohortSummary(em(), c, req.user!) });
  });

  r.get('/:id', async (req, res) => {
    const c = await findVisibleCohort(em(), req.user!, idParam(req.params.id, 'cohort'));
    res.json({ cohort: await toCohortSummary(em(), c, req.user!) });
  });

  r.put('/:id/quota', async (req, res) => {
    const c = await findManagedCohort(em(), req.user!, idParam(req.params.id, 'cohort'));
    await setCohortQuota(em(), c, parseInput(quotaLimitsSchema, req.body));
    res.json({ cohort: await toCohortSummary(em(), c, req.user!) });
  });

  r.post('/:id/code', async (req, res) => {
    const c = await findManagedCohort(em(), req.user!, idParam(req.params.id, 'cohort'));
    await rotateEnrolmentCode(em(), c);
    res.json({ cohort: await toCohortSummary(em(), c, req.user!) });
  });

  r.get('/:id/members', async (req, res) => {
    const c = await findManagedCohort(em(), req.user!, idParam(req.params.id, 'cohort'));
    res.set('Cache-Control', 'no-store').json({ members: await cohortMembers(em(), c) });
  });

  r.post('/:id/invitations', async (req, res) => {
    const c = await findManagedCohort(em(), req.user!, idParam(req.params.id, 'cohort'));
    const { emails } = parseInput(inviteBodySchema, req.body);
    await mail.take(req.user!.id, emails.length);
    res.status(202).json({ sent: await inviteToCohort(c, req.user!, emails) });
  });

  r.get('/:id/templates', async (req, res) => {
    const c = await findVisibleCohort(em(), req.user!, idParam(req.params.id, 'cohort'));
    res.json({ templates: (await templatesOf(em(), c)).map(toTemplateSummary) });
  });

  r.post('/:id/templates', async (req, res) => {
    const c = await findManagedCohort(em(), req.user!, idParam(req.params.id, 'cohort'));
    const t = await publishTemplate(em(), req.user!, c, parseInput(publishTemplateBodySchema, req.body));
    res.status(201).json({ template: toTemplateDetail(t) });
  });

  return r;
}
