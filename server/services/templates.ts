import type { EntityManager } from '@mikro-orm/postgresql';
import { ApiError } from '../errors';
import { Cohort, CohortMember, CohortTemplate, type User } from '../db/entities';
import type { PublishTemplateBody, TemplateDetail, TemplateSummary } from '../../shared/api/accounts';
import { specsFromBody } from './runs';
import { isManager } from './cohorts';

export function toTemplateSummary(t: CohortTemplate): TemplateSummary {
  const cohort = t.cohort as Cohort;
  return {
    id: t.id,
    cohortId: cohort.id,
    cohortName: cohort.name,
    name: t.name,
    description: t.description,
    modelKind: t.spec.model.kind,
    lawKind: t.spec.law.kind,
    pairLawKind: t.pairLaw ? t.pairLaw.kind : null,
    createdAt: t.createdAt.toISOString(),
  };
}

export function toTemplateDetail(t: CohortTemplate): TemplateDetail {
  return { ...toTemplateSummary(t), spec: t.spec, pairLaw: t.pairLaw ?? null };
}

/**
 * Stores a template after checking its spec exactly as a submission would be checked. The
 * template's name is its own title, so it is not held against a name inside the spec.
 */
export async function publishTemplate(em: EntityManager, author: User, cohort: Cohort, body: PublishTemplateBody): Promise<CohortTemplate> {
  const { specs } = specsFromBody({ spec: body.spec, ...(body.pairLaw !== undefined ? { pairLaw: body.pairLaw } : {}) });
  const t = em.create(CohortTemplate, {
    cohort,
    name: body.name,
    description: body.description,
    spec: specs[0],
    pairLaw: specs[1]?.law ?? null,
    createdBy: author.id,
  });
  await em.flush();
  return t;
}

/** Templates of the cohorts a user belongs to or runs; admins see all. */
export async function listTemplates(em: EntityManager, user: User): Promise<CohortTemplate[]> {
  let where = {};
  if (user.role !== 'admin') {
    const memberOf = (await em.find(CohortMember, { user: user.id })).map((m) => (m.cohort as Cohort).id);
    where = { $or: [{ cohort: { instructor: user.id } }, { cohort: { $in: memberOf } }] };
  }
  return em.find(CohortTemplate, where, { populate: ['cohort'], orderBy: { createdAt: 'desc' } });
}

export async function templatesOf(em: EntityManager, cohort: Cohort): Promise<CohortTemplate[]> {
  return em.find(CohortTemplate, { cohort: cohort.id }, { populate: ['cohort'], orderBy: { createdAt: 'desc' } });
}

export async function findVisibleTemplate(em: EntityManager, user: User, id: number): Promise<CohortTemplate> {
  const t = await em.findOne(CohortTemplate, { id }, { populate: ['cohort'] });
  const cohort = t?.cohort as Cohort | undefined;
  if (t && cohort && (isManager(user, cohort) || (await em.count(CohortMember, { cohort: cohort.id, user: user.id })) > 0)) return t;
  throw new ApiError('NOT_FOUND', `No template ${id}`);
}

export async function deleteTemplate(em: EntityManager, user: User, t: CohortTemplate): Promise<void> {
  if (!isManager(user, t.cohort as Cohort)) throw new ApiError('FORBIDDEN', "Only the cohort's instructor or an admin can remove its templates");
  await em.remove(t).flush();
}
