import type { EntityManager } from '@mikro-orm/core';
import { config } from '../config';
import { Run, type Cohort, type User } from '../db/entities';
import { compose, sendMail } from './mail';

const fmt = (n: number) => n.toExponential(2).replace('e+', 'e');

export type NotifyOutcome = 'sent' | 'skipped' | 'failed';

/**
 * Tells a run's owner by mail that it finished or failed, if they opted in.
 * Called by the worker after the run's final state is stored. Never throws for a
 * mail problem: a run's outcome must not depend on the mail relay.
 */
export async function notifyRunEnded(em: EntityManager, runId: string): Promise<NotifyOutcome> {
  const run = await em.findOne(Run, { id: runId }, { populate: ['owner'] });
  if (!run || (run.status !== 'finished' && run.status !== 'failed')) return 'skipped';
  const owner = run.owner as User;
  if (!owner.notifyOnFinish || !owner.email) return 'skipped';
  const url = `${config.publicUrl}/runs/${run.id}`;
  const finished = run.status === 'finished';
  const mail = compose(finished ? `Run finished: ${run.name}` : `Run failed: ${run.name}`, [
    `Hello ${owner.name},`,
    finished
      ? `Your run "${run.name}" (${run.modelKind} under ${run.lawKind}, ${run.particles} particles, ${run.steps} steps) has finished.`
      : `Your run "${run.name}" (${run.modelKind} under ${run.lawKind}) failed: ${run.error ?? 'no reason was recorded'}.`,
    { text: finished ? 'See its diagnostics' : 'See the run', href: url },
    'You get this mail because run notifications are on in your account settings.',
  ]);
  try {
    await sendMail({ to: owner.email, ...mail });
    return 'sent';
  } catch (err) {
    console.error(`[mail] could not send the end-of-run mail for ${run.id}`, err);
    return 'failed';
  }
}

export async function sendCohortInvitation(cohort: Cohort, instructor: User, to: string[]): Promise<void> {
  const url = `${config.publicUrl}/cohorts/join?code=${encodeURIComponent(cohort.enrolmentCode)}`;
  const mail = compose(`Join ${cohort.name} on Infall`, [
    `${instructor.name} invites you to the cohort "${cohort.name}" on Infall, where you will run N-body simulations within the cohort's quota.`,
    `Sign in, then join with the enrolment code ${cohort.enrolmentCode}.`,
    { text: 'Join the cohort', href: url },
  ]);
  // One message per address, so students don't see each other's addresses.
  for (const address of to) await sendMail({ to: address, ...mail });
}

export async function sendQuotaWarning(user: User, usage: { used: number; max: number; day: string }): Promise<void> {
  if (!user.email) return;
  const pct = Math.floor((100 * usage.used) / usage.max);
  const mail = compose(`You have used ${pct} % of today's compute budget`, [
    `Hello ${user.name},`,
    `Your runs today (${usage.day}, UTC) have used ${fmt(usage.used)} of your ${fmt(usage.max)} pair interactions.`,
    'Runs that need more than what is left will be refused until the budget resets at 00:00 UTC.',
    { text: 'See your usage', href: `${config.publicUrl}/account` },
  ]);
  await sendMail({ to: user.email, ...mail });
}
