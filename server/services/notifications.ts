import type { EntityManager } from '@mikro-orm/core';
import { config } from '../config';
import { Run, type Cohort, type User } from '../db/entities';
import { compose, sendMail } from './mail';
import { lawName, modelName } from '../../shared/engine';

const fmt = (n: number) => n.toExponential(2).replace('e+', 'e');

export type NotifyOutcome = 'sent' | 'skipped' | 'failed';

const ENDED = new Set(['finished', 'failed', 'cancelled']);
const OPTED_IN = 'You get this mail because run notifications are on in your account settings.';

/**
 * Tells a run's owner by mail that it finished or failed, if they opted in; the two runs of
 * a pair send one mail, once both have ended, that links to their comparison. Called by the
 * worker after the run's final state is stored. Never throws for a mail problem: a run's
 * outcome must not depend on the mail relay.
 */
export async function notifyRunEnded(em: EntityManager, runId: string): Promise<NotifyOutcome> {
  const run = await em.findOne(Run, { id: runId }, { populate: ['owner'], refresh: true });
  if (!run || !ENDED.has(run.status)) return 'skipped';
  const owner = run.owner as User;
  if (!owner.notifyOnFinish || !owner.email) return 'skipped';
  const mail = run.pairId ? await pairMail(em, run, owner) : run.status === 'cancelled' ? null : runMail(run, owner);
  // The claim is one conditional update: of two callers for the same mail, one wins.
  if (!mail || (await em.nativeUpdate(Run, run.pairId ? { pairId: run.pairId, notifiedAt: null } : { id: run.id, notifiedAt: null }, { notifiedAt: new Date() })) === 0)
    return 'skipped';
  try {
    await sendMail({ to: owner.email, ...mail });
    return 'sent';
  } catch (err) {
    console.error(`[mail] could not send the end-of-run mail for ${run.id}`, err);
    return 'failed';
  }
}

function runMail(run: Run, owner: User) {
  const finished = run.status === 'finished';
  return compose(finished ? `Run finished: ${run.name}` : `Run failed: ${run.name}`, [
    `Hello ${owner.name},`,
    finished
      ? `Your run "${run.name}" (${modelName(run.modelKind)} under ${lawName(run.lawKind)}, ${run.particles} particles, ${run.steps} steps) has finished.`
      : `Your run "${run.name}" (${modelName(run.modelKind)} under ${lawName(run.lawKind)}) failed: ${run.error ?? 'no reason was recorded'}.`,
    { text: finished ? 'See its diagnostics' : 'See the run', href: `${config.publicUrl}/runs/${run.id}` },
    OPTED_IN,
  ]);
}

/** The pair's one mail, or null while its other run is still going (that run's end sends it). */
async function pairMail(em: EntityManager, run: Run, owner: User) {
  const runs = await em.find(Run, { pairId: run.pairId }, { orderBy: { createdAt: 'asc', id: 'asc' }, refresh: true });
  if (runs.some((r) => !ENDED.has(r.status)) || runs.every((r) => r.status === 'cancelled')) return null;
  const first = runs[0];
  // A pair's runs are named "<name> · <law>"; runs stored before names used the law's label carry its kind.
  const suffix = [` · ${lawName(first.lawKind)}`, ` · ${first.lawKind}`].find((s) => first.name.endsWith(s));
  const name = suffix ? first.name.slice(0, -suffix.length) : first.name;
  const allFinished = runs.every((r) => r.status === 'finished');
  const outcome = (r: Run) =>
    r.status === 'finished' ? `${lawName(r.lawKind)}: finished` : r.status === 'failed' ? `${lawName(r.lawKind)}: failed: ${r.error ?? 'no reason was recorded'}` : `${lawName(r.lawKind)}: cancelled`;
  return compose(allFinished ? `Pair finished: ${name}` : `Pair ended: ${name}`, [
    `Hello ${owner.name},`,
    `Both runs of your pair "${name}" (${modelName(first.modelKind)}, ${first.particles} particles, ${first.steps} steps, under ${runs.map((r) => lawName(r.lawKind)).join(' and ')}) have ended.`,
    runs.map(outcome).join('; ') + '.',
    { text: 'Compare the two runs', href: `${config.publicUrl}/compare?pair=${encodeURIComponent(run.pairId!)}` },
    OPTED_IN,
  ]);
}

export async function sendCohortInvitation(cohort: Cohort, instructor: User, to: string[]): Promise<void> {
  const url = `${config.publicUrl}/cohorts/join?code=${encodeURIComponent(cohort.enrolmentCode)}`;
  const mail = compose(`Join ${cohort.name} on Infall`, [
    `${instructor.name} invites you to the cohort "${cohort.name}" on Infall, where you will run N-body simulations within the cohort's quota.`,
    `The link below joins you (signing you in first if needed); or type the enrolment code ${cohort.enrolmentCode} on your account page.`,
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
