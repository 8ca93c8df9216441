import { randomUUID } from 'node:crypto';
import type { EntityManager } from '@mikro-orm/postgresql';
import type { Queue } from 'bullmq';
import { ApiError } from '../errors';
import { Run, RunOutput, RunSnapshot, type Galaxy, type User } from '../db/entities';
import { lawName, modelName } from '../../shared/engine';
import { parseRunSpec, particleCount, stepCount, estimateInteractions, type RunSpec, issuePath } from '../../shared/spec';
import { submitRunBodySchema, type ListRunsQuery } from '../../shared/api/requests';
import type { RunDetail, RunProgress, RunSummary } from '../../shared/api/contract';
import { encodeSnapshots, type ParticleParts } from '../../shared/api/snapshots';
import { queueCall, type RunJobData } from '../queue';
import { visibleRunsFilter, canSeeRun, canManageRun } from './access';
import { admitRuns } from './admission';
import { refundUncomputed } from './quotas';
import { notifyRunEnded } from './notifications';

function firstIssue(issues: { path: string; message: string }[], prefix: string): ApiError {
  const first = issues[0];
  const field = first.path ? `${prefix}.${first.path}` : prefix;
  return new ApiError('INVALID_SPEC', `${field}: ${first.message}`, { field, details: issues.map((i) => ({ ...i, path: i.path ? `${prefix}.${i.path}` : prefix })) });
}

/**
 * The run's name may come beside the spec (`name`) or inside it (`spec.name`); both are
 * checked by the same schema. Given twice, they must agree, so neither is silently dropped.
 */
function runName(top: string | undefined, inSpec: string | undefined): string | undefined {
  if (top !== undefined && inSpec !== undefined && top !== inSpec) {
    throw new ApiError('BAD_REQUEST', `name: "${top}" differs from spec.name "${inSpec}"; give the name once, or the same in both places`, { field: 'name' });
  }
  return inSpec ?? top;
}

/**
 * Validates a submission into one spec, or two sharing the model and seed (so the same
 * positions); each balances its velocities for its own law unless the model names one.
 */
export function specsFromBody(body: unknown): { name: string; specs: RunSpec[] } {
  const parsed = submitRunBodySchema.safeParse(body);
  if (!parsed.success) {
    const issue = parsed.error.issues[0];
    const field = issuePath(issue) || 'body';
    throw new ApiError('BAD_REQUEST', `${field}: ${issue.message}`, { field });
  }
  const spec = parseRunSpec(parsed.data.spec);
  if (!spec.ok) throw firstIssue(spec.issues, 'spec');
  const given = runName(parsed.data.name, spec.spec.name);
  const specs = [given === undefined ? spec.spec : { ...spec.spec, name: given }];
  if (parsed.data.pairLaw !== undefined) {
    const twin = parseRunSpec({ ...specs[0], law: parsed.data.pairLaw });
    if (!twin.ok) throw firstIssue(twin.issues.map((i) => ({ ...i, path: i.path.replace(/^law\.?/, '') })), 'pairLaw');
    if (JSON.stringify(twin.spec.law) === JSON.stringify(spec.spec.law)) {
      throw new ApiError('BAD_REQUEST', 'pairLaw: the pair must use a different force law from spec.law', { field: 'pairLaw' });
    }
    specs.push(twin.spec);
  }
  const name = given ?? `${modelName(spec.spec.model.kind)} under ${specs.map((s) => lawName(s.law.kind)).join(' vs ')}`;
  return { name, specs };
}

export function toSummary(run: Run): RunSummary {
  const owner = run.owner as User;
  return {
    id: run.id,
    name: run.name,
    status: run.status,
    progress: run.progress,
    modelKind: run.modelKind,
    lawKind: run.lawKind,
    particles: run.particles,
    steps: run.steps,
    costInteractions: run.costInteractions,
    pairId: run.pairId ?? null,
    galaxyId: (run.galaxy as Galaxy | null | undefined)?.id ?? null,
    error: run.error ?? null,
    createdAt: run.createdAt.toISOString(),
    startedAt: run.startedAt ? run.startedAt.toISOString() : null,
    finishedAt: run.finishedAt ? run.finishedAt.toISOString() : null,
    owner: { id: owner.id, login: owner.login, name: owner.name },
  };
}

/**
 * Stores the runs and enqueues them. Rows are written first (status queued) in one
 * transaction with the usage charge, so a refused or failed admission leaves nothing.
 */
export async function submitRuns(em: EntityManager, queue: Queue<RunJobData>, user: User, body: unknown, origin: { galaxy?: number } = {}): Promise<RunSummary[]> {
  const { name, specs } = specsFromBody(body);
  // The queue must answer before anything is stored: with Redis away the request gets 503 and nothing is charged.
  await queueCall(queue, (c) => c.get('infall:ping'));
  const pairId = specs.length > 1 ? randomUUID() : null;
  const runs = await em.transactional(async (tx) => {
    const costs = specs.map((s) => estimateInteractions(s));
    await admitRuns(tx, user, specs, costs);
    return specs.map((spec, k) =>
      tx.create(Run, {
        id: randomUUID(),
        owner: user.id,
        name: specs.length > 1 ? `${name} · ${lawName(spec.law.kind)}` : name,
        spec,
        modelKind: spec.model.kind,
        lawKind: spec.law.kind,
        particles: particleCount(spec),
        steps: stepCount(spec),
        costInteractions: costs[k],
        pairId,
        galaxy: origin.galaxy ?? null,
      }),
    );
  });
  // Job ids are run ids, so a later add of the same run (after a timeout here) is a no-op.
  await queueCall(queue, () => queue.addBulk(runs.map((r) => ({ name: 'run', data: { runId: r.id }, opts: { jobId: r.id } }))));
  await em.populate(runs, ['owner']);
  return runs.map(toSummary);
}

export async function listRuns(em: EntityManager, user: User, q: ListRunsQuery): Promise<RunSummary[]> {
  const where: Record<string, unknown> = { ...(await visibleRunsFilter(em, user, q.cohort)) };
  if (q.status) where.status = q.status;
  if (q.law) where.lawKind = q.law;
  if (q.pair) where.pairId = q.pair;
  const runs = await em.find(Run, where, { populate: ['owner'], orderBy: { createdAt: 'desc' }, limit: q.limit });
  return runs.map(toSummary);
}

// The exact 8-4-4-4-12 shape: anything else (36 dashes, say) would reach PostgreSQL as an invalid uuid.
const UUID = /^[0-9a-f]{8}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{12}$/i;

export async function findVisibleRun(em: EntityManager, user: User, id: string): Promise<Run> {
  if (!UUID.test(id)) throw new ApiError('NOT_FOUND', `No run with id ${id}`);
  const run = await em.findOne(Run, { id }, { populate: ['owner'] });
  // A run the user may not see is reported as missing, so ids can't be probed.
  if (!run || !(await canSeeRun(em, user, run))) throw new ApiError('NOT_FOUND', `No run with id ${id}`);
  return run;
}

export async function runDetail(em: EntityManager, run: Run): Promise<RunDetail> {
  const output = await em.findOne(RunOutput, { run: run.id });
  const frames = output
    ? await em.find(RunSnapshot, { run: run.id }, { fields: ['frame', 'step', 'timeMyr'], orderBy: { frame: 'asc' } })
    : [];
  return {
    ...toSummary(run),
    spec: run.spec,
    output: output
      ? {
          law: output.law,
          timescales: output.timescales,
          warnings: output.warnings,
          diagnostics: output.diagnostics,
          rotationCurves: output.rotationCurves,
          summary: output.summary,
          snapshotParticles: output.snapshotParticles,
          frames: frames.map((f) => ({ frame: f.frame, step: f.step, time_Myr: f.timeMyr })),
        }
      : null,
  };
}

/** The progress samples a running run has reported so far (kept on its job until it ends). */
export async function progressSoFar(queue: Queue<RunJobData>, runId: string): Promise<RunProgress[]> {
  const { logs } = await queueCall(queue, () => queue.getJobLogs(runId, 0, -1, true));
  return logs.map((row) => JSON.parse(row) as RunProgress);
}

/** Each stored particle's id and component, for runs stored since ids and components were kept. */
export function storedParts(output: RunOutput): (ParticleParts & { ids: Uint32Array }) | null {
  const components = output.components ?? null;
  if (!output.particleIds || !components) return null;
  const b = output.particleIds as Uint8Array;
  const copy = new Uint8Array(b.byteLength);
  copy.set(b); // a Buffer slice may not sit on the 4-byte alignment Uint32Array needs
  const ids = new Uint32Array(copy.buffer);
  const component = Uint8Array.from(ids, (i) => Math.max(0, components.findIndex((c) => i >= c.start && i < c.start + c.count)));
  return { ids, labels: components.map((c) => c.label), component };
}

export async function snapshotBytes(em: EntityManager, run: Run): Promise<Uint8Array> {
  const rows = await em.find(RunSnapshot, { run: run.id }, { orderBy: { frame: 'asc' } });
  const frames = rows.map((r) => {
    const b = r.positions as Uint8Array;
    const copy = new Uint8Array(b.byteLength);
    copy.set(b); // Float32Array needs 4-byte alignment, which a Buffer slice may not have
    return { step: r.step, time_Myr: r.timeMyr, positions: new Float32Array(copy.buffer) };
  });
  const n = frames.length ? frames[0].positions.length / 3 : 0;
  const output = await em.findOne(RunOutput, { run: run.id });
  const parts = output ? storedParts(output) : null;
  // Runs stored before components were kept are one unnamed component.
  const known = parts !== null && parts.component.length === n;
  return encodeSnapshots({ frames, labels: known ? parts.labels : [], component: known ? parts.component : new Uint8Array(n) });
}

/** Marks a run for cancelling; a queued one ends at once, a running one at its next check. */
export async function cancelRun(em: EntityManager, queue: Queue<RunJobData>, user: User, run: Run): Promise<{ endedNow: boolean }> {
  if (!(await canManageRun(em, user, run))) throw new ApiError('FORBIDDEN', 'Only the run owner or an admin may cancel this run');
  if (run.status !== 'queued' && run.status !== 'running') {
    throw new ApiError('CONFLICT', `Run is already ${run.status}; only queued or running runs can be cancelled`);
  }
  run.cancelRequested = true;
  let endedNow = false;
  if (run.status === 'queued') {
    // remove() fails when a worker has just locked the job; then the worker sees the flag.
    // With the queue away the flag is kept too: whichever worker later takes the job ends it.
    const removed = await queueCall(queue, () => queue.getJob(run.id).then((job) => (job ? job.remove().then(() => true, () => false) : true))).catch(() => false);
    if (removed) {
      refundUncomputed(em, run, 0);
      run.status = 'cancelled';
      run.finishedAt = new Date();
      endedNow = true;
    }
  }
  await em.flush();
  // No worker sees a queued run that ends here: if its twin has already ended, the pair's
  // one mail goes out now (in the background; a mail problem never fails the cancel).
  if (endedNow && run.pairId) void notifyRunEnded(em.fork(), run.id);
  return { endedNow };
}
