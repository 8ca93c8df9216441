import type { EntityManager } from '@mikro-orm/postgresql';
import { Cohort, CohortMember, User } from './entities';
import { DEMO_COHORT, DEMO_IDENTITIES } from '../fakes/identities';

export interface SeededAccounts {
  users: Record<string, User>;
  cohort: Cohort;
}

/**
 * Creates (or brings back in line) the invented demo people of the local sign-in
 * provider, with their roles, and their invented cohort with its enrolment code,
 * quota and three students. Safe to run on every start.
 */
export async function seedAccounts(em: EntityManager): Promise<SeededAccounts> {
  const users: Record<string, User> = {};
  for (const d of DEMO_IDENTITIES) {
    const user = (await em.findOne(User, { providerId: String(d.id) })) ?? em.create(User, { providerId: String(d.id), login: d.login, name: d.name });
    Object.assign(user, { login: d.login, name: d.name, email: d.email, role: d.role });
    users[d.login] = user;
  }
  await em.flush();

  const instructor = users[DEMO_COHORT.instructorLogin];
  const cohort =
    (await em.findOne(Cohort, { enrolmentCode: DEMO_COHORT.enrolmentCode })) ??
    em.create(Cohort, { name: DEMO_COHORT.name, enrolmentCode: DEMO_COHORT.enrolmentCode, instructor, ...DEMO_COHORT.quota });
  Object.assign(cohort, { name: DEMO_COHORT.name, instructor, ...DEMO_COHORT.quota });
  await em.flush();
  for (const login of DEMO_COHORT.studentLogins) {
    await em.execute('insert into cohort_members (cohort_id, user_id, joined_at) values (?, ?, now()) on conflict do nothing', [cohort.id, users[login].id]);
  }
  return { users, cohort };
}
