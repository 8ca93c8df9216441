import type { EntityManager } from '@mikro-orm/postgresql';
import { ApiError } from '../errors';
import { idParam, parseInput } from '../routes/input';
import { Cohort, CohortMember, Galaxy, GalaxyFit, GalaxySample, type User } from '../db/entities';
import { parseRotationCurve, TableError } from '../../shared/galaxy/table';
import path from 'node:path';
import { Worker } from 'node:worker_threads';
import type { FitOptions, GalaxyFitReport, SampleFitReport, SampleGalaxy } from '../../shared/galaxy/fit';
import type { RotationCurve } from '../../shared/galaxy/table';
import type { FitJob } from './fitThread';
import {
  FIT_MAX_POINTS,
  galaxyFitRequestSchema,
  galaxySampleRequestSchema,
  galaxyRunRequestSchema,
  GALAXY_PAIR_LAW,
  SAMPLE_MAX_POINTS,
  type GalaxySampleRecord,
  type GalaxySampleSummary,
  updateGalaxyBodySchema,
  uploadGalaxyFieldsSchema,
  type GalaxyDetail,
  type GalaxyFitRecord,
  type GalaxyMapping,
  type GalaxySummary,
  type GalaxyVisibility,
} from '../../shared/api/galaxies';
import { uploadLimits } from './quotas';
import { quotaLimitText, type QuotaLimits, type UploadLimits } from '../../shared/api/accounts';
import type { Queue } from 'bullmq';
import type { RunJobData } from '../queue';
import type { RunSummary } from '../../shared/api/contract';
import { galaxyRunSpec, HALO_FITS, type HaloFit } from '../../shared/galaxy/toRun';
import { submitRuns } from './runs';

// Who may see a galaxy: its owner and admins always; a cohort galaxy also the cohort's
// members and instructor; a public one everyone signed in. Only owner and admins change it.
// Anything the caller may not see is answered as missing, so ids reveal nothing.

export interface UploadedFile {
  originalname: string;
  buffer: Buffer;
}

/** Fits kept per galaxy: the newest; older ones are dropped as new ones arrive. */
const FITS_KEPT = 10;

const owner = (u: User) => ({ id: u.id, login: u.login, name: u.name });

/** Cohorts the user belongs to or teaches. */
async function cohortIdsOf(em: EntityManager, user: User): Promise<number[]> {
  const [members, taught] = await Promise.all([em.find(CohortMember, { user: user.id }, { fields: ['cohort'] }), em.find(Cohort, { instructor: user.id }, { fields: ['id'] })]);
  return [...new Set([...members.map((m) => (m.cohort as Cohort).id), ...taught.map((c) => c.id)])];
}

async function visibleFilter(em: EntityManager, user: User): Promise<Record<string, unknown>> {
  if (user.role === 'admin') return {};
  return { $or: [{ owner: user.id }, { visibility: 'public' }, { visibility: 'cohort', cohort: { $in: await cohortIdsOf(em, user) } }] };
}

const canManage = (user: User, g: Galaxy) => user.role === 'admin' || (g.owner as User).id === user.id;

/** The cohort a galaxy is shared with: one the caller belongs to or teaches (admins: any). */
async function shareTarget(em: EntityManager, user: User, visibility: GalaxyVisibility, cohortId: number | null | undefined): Promise<Cohort | null> {
  if (visibility !== 'cohort') {
    if (cohortId != null) throw new ApiError('BAD_REQUEST', `cohortId: only a galaxy shared with a cohort names one (visibility is ${visibility})`, { field: 'cohortId' });
    return null;
  }
  if (cohortId == null) throw new ApiError('BAD_REQUEST', 'cohortId: say which cohort to share the galaxy with', { field: 'cohortId' });
  const cohort = await em.findOne(Cohort, { id: cohortId });
  if (!cohort || (user.role !== 'admin' && !(await cohortIdsOf(em, user)).includes(cohort.id))) {
    throw new ApiError('BAD_REQUEST', `cohortId: you are not in cohort ${cohortId}`, { field: 'cohortId' });
  }
  return cohort;
}

function summary(user: User, g: Galaxy): GalaxySummary {
  const cohort = g.cohort as Cohort | null;
  return {
    id: g.id,
    name: g.name,
    owner: owner(g.owner as User),
    visibility: g.visibility,
    cohort: cohort ? { id: cohort.id, name: cohort.name } : null,
    invented: g.invented,
    points: g.points,
    fileName: g.fileName,
    fileBytes: g.fileSize,
    uploadedAt: g.uploadedAt.toISOString(),
    canManage: canManage(user, g),
  };
}

function fitRecord(f: GalaxyFit): GalaxyFitRecord {
  return { id: f.id, request: f.request, results: f.results, requestedBy: owner(f.requestedBy as User), createdAt: f.createdAt.toISOString() };
}

/** A file name as a label only: no path, no control characters, bounded. */
export function cleanFileName(name: string): string {
  const base = name.split(/[\\/]/).pop() ?? '';
  return base.replace(/[\u0000-\u001f\u007f]/g, '').slice(0, 120) || 'table.txt';
}

/**
 * Parses and stores an uploaded table in one flush. Any refusal (fields, quota, the table
 * itself) throws before anything is written, so a failed upload leaves nothing behind.
 */
export async function createGalaxy(em: EntityManager, user: User, file: UploadedFile | undefined, fields: unknown): Promise<Galaxy> {
  const input = parseInput(uploadGalaxyFieldsSchema, fields);
  if (!file) throw new ApiError('BAD_REQUEST', 'file: attach the rotation-curve table as the multipart field "file"', { field: 'file' });
  const limits = await uploadLimits(em, user);
  const mapping: GalaxyMapping = input.mapping ?? { columns: {}, radiusUnit: 'kpc' };
  const cohort = await shareTarget(em, user, input.visibility, input.cohortId);
  const curve = readCurve(file.buffer, mapping, limits);
  const g = em.create(Galaxy, {
    owner: user,
    name: input.name,
    visibility: input.visibility,
    cohort,
    invented: false,
    fileName: cleanFileName(file.originalname),
    fileBytes: file.buffer,
    fileSize: file.buffer.length,
    mapping,
    curve,
    points: curve.radiusKpc.length,
  });
  await em.flush();
  return g;
}

/** The table parser's refusal as a 400 naming line and column (or 413 for a table over the limits). */
export function tableRefusal(err: TableError, rowLimit?: { key: keyof QuotaLimits; max: number }): ApiError {
  // The parser words its size and row refusals as "... the limit ..." and names no line. The
  // size is refused by the upload middleware before the parser sees the file, so an over-limit
  // refusal here is the row limit, which the caller names.
  const overLimit = err.line === undefined && /\bthe limit\b/.test(err.message);
  const named = overLimit && rowLimit ? `; ${quotaLimitText(rowLimit.key, rowLimit.max)}` : '';
  return new ApiError(overLimit ? 'PAYLOAD_TOO_LARGE' : 'BAD_REQUEST', `file: ${err.message}${named}`, {
    field: 'file',
    details: { line: err.line ?? null, column: err.column ?? null },
  });
}

function readCurve(bytes: Uint8Array, mapping: GalaxyMapping, limits: UploadLimits) {
  try {
    return parseRotationCurve(bytes, { maxBytes: limits.maxUploadBytes, maxRows: limits.maxUploadRows, ...mapping });
  } catch (err) {
    throw err instanceof TableError ? tableRefusal(err, { key: 'maxUploadRows', max: limits.maxUploadRows }) : err;
  }
}

export async function listGalaxies(em: EntityManager, user: User): Promise<GalaxySummary[]> {
  const rows = await em.find(Galaxy, await visibleFilter(em, user), { populate: ['owner', 'cohort'], exclude: ['fileBytes', 'curve', 'mapping'], orderBy: { uploadedAt: 'desc', id: 'desc' }, limit: 500 });
  // The summary reads none of the excluded columns.
  return rows.map((g) => summary(user, g as Galaxy));
}

export async function findVisibleGalaxy(em: EntityManager, user: User, rawId: string): Promise<Galaxy> {
  const id = idParam(rawId, 'galaxy');
  const g = await em.findOne(Galaxy, { $and: [{ id }, await visibleFilter(em, user)] }, { populate: ['owner', 'cohort'], exclude: ['fileBytes'] });
  if (!g) throw new ApiError('NOT_FOUND', `No galaxy ${rawId}`);
  // The raw bytes stay in the database until galaxyFile asks for them.
  return g as Galaxy;
}

function requireManage(user: User, g: Galaxy): void {
  if (!canManage(user, g)) throw new ApiError('FORBIDDEN', 'Only the galaxy’s owner (or an admin) can change it');
}

export async function galaxyDetail(em: EntityManager, user: User, g: Galaxy): Promise<GalaxyDetail> {
  const fits = await em.find(GalaxyFit, { galaxy: g.id }, { populate: ['requestedBy'], orderBy: { createdAt: 'desc', id: 'desc' }, limit: FITS_KEPT });
  return { ...summary(user, g), mapping: g.mapping, curve: g.curve, fits: fits.map(fitRecord) };
}

/** The uploaded file exactly as it was sent. */
export async function galaxyFile(em: EntityManager, g: Galaxy): Promise<Buffer> {
  const row = await em.findOneOrFail(Galaxy, { id: g.id }, { fields: ['fileBytes'] });
  return Buffer.from(row.fileBytes);
}

export async function updateGalaxy(em: EntityManager, user: User, g: Galaxy, body: unknown): Promise<GalaxySummary> {
  requireManage(user, g);
  const input = parseInput(updateGalaxyBodySchema, body);
  if (input.name !== undefined) g.name = input.name;
  if (input.visibility !== undefined || input.cohortId !== undefined) {
    const visibility = input.visibility ?? g.visibility;
    const cohortId = input.cohortId !== undefined ? input.cohortId : visibility === 'cohort' ? ((g.cohort as Cohort | null)?.id ?? null) : null;
    g.cohort = await shareTarget(em, user, visibility, cohortId);
    g.visibility = visibility;
  }
  await em.flush();
  return summary(user, g);
}

export async function deleteGalaxy(em: EntityManager, user: User, g: Galaxy): Promise<void> {
  requireManage(user, g);
  await em.remove(g).flush();
}

/**
 * Fits the galaxy's curve under the requested laws and stores the result. Anyone who can see
 * the galaxy may fit it (a class works on a shared galaxy); each fit records who asked.
 */
export async function requestFit(em: EntityManager, user: User, g: Galaxy, body: unknown): Promise<GalaxyFitRecord> {
  const request = parseInput(galaxyFitRequestSchema, body);
  if (g.points > FIT_MAX_POINTS) throw new ApiError('BAD_REQUEST', `This galaxy has ${g.points} points; fits through the service take at most ${FIT_MAX_POINTS}`);
  const results = await fitInThread(g.curve, request);
  const fit = await em.transactional(async (tx) => {
    const made = tx.create(GalaxyFit, { galaxy: g.id, requestedBy: user.id, request, results });
    await tx.flush();
    const old = await tx.find(GalaxyFit, { galaxy: g.id }, { fields: ['id'], orderBy: { createdAt: 'desc', id: 'desc' }, offset: FITS_KEPT });
    if (old.length) await tx.nativeDelete(GalaxyFit, { id: { $in: old.map((f) => f.id) } });
    return made;
  });
  return { id: fit.id, request, results, requestedBy: owner(user), createdAt: fit.createdAt.toISOString() };
}

/**
 * Fits one shared parameter per law across several galaxies (each one the caller may see) and
 * keeps the result with the caller. A galaxy the caller may not see is answered as missing.
 */
export async function requestSampleFit(em: EntityManager, user: User, body: unknown): Promise<GalaxySampleRecord> {
  const request = parseInput(galaxySampleRequestSchema, body);
  const found = await em.find(Galaxy, { $and: [{ id: { $in: request.galaxyIds } }, await visibleFilter(em, user)] }, { fields: ['id', 'name', 'points', 'curve'] });
  const byId = new Map(found.map((g) => [g.id, g]));
  const missing = request.galaxyIds.filter((id) => !byId.has(id));
  if (missing.length) throw new ApiError('NOT_FOUND', `No galaxy ${missing.join(', ')}`, { field: 'galaxyIds' });
  const galaxies = request.galaxyIds.map((id) => byId.get(id)!);
  const points = galaxies.reduce((n, g) => n + g.points, 0);
  if (points > SAMPLE_MAX_POINTS) throw new ApiError('BAD_REQUEST', `galaxyIds: these galaxies have ${points} points in all; a sample fit through the service takes at most ${SAMPLE_MAX_POINTS}`, { field: 'galaxyIds' });
  // Names can repeat across owners; the id keeps each galaxy's label in the report distinct.
  const named = galaxies.map((g) => ({ id: g.id, name: g.name }));
  const results = await fitInThread(galaxies.map((g) => ({ name: `${g.name} (#${g.id})`, curve: g.curve })), request);
  const made = em.create(GalaxySample, { requestedBy: user.id, request, galaxies: named, results });
  await em.flush();
  return { id: made.id, request, galaxies: named, results, requestedBy: owner(user), createdAt: made.createdAt.toISOString() };
}

const sampleFilter = (user: User) => (user.role === 'admin' ? {} : { requestedBy: user.id });

export async function listSampleFits(em: EntityManager, user: User): Promise<GalaxySampleSummary[]> {
  const rows = await em.find(GalaxySample, sampleFilter(user), { fields: ['id', 'galaxies', 'request', 'createdAt'], orderBy: { createdAt: 'desc', id: 'desc' }, limit: 100 });
  return rows.map((r) => ({ id: r.id, galaxies: r.galaxies, laws: r.request.laws, createdAt: r.createdAt.toISOString() }));
}

export async function sampleFit(em: EntityManager, user: User, rawId: string): Promise<GalaxySampleRecord> {
  const id = idParam(rawId, 'sample');
  const r = await em.findOne(GalaxySample, { id, ...sampleFilter(user) }, { populate: ['requestedBy'] });
  if (!r) throw new ApiError('NOT_FOUND', `No sample fit ${rawId}`);
  return { id: r.id, request: r.request, galaxies: r.galaxies, results: r.results, requestedBy: owner(r.requestedBy as User), createdAt: r.createdAt.toISOString() };
}

/**
 * A pair of runs from one of the galaxy's Newtonian fits: the fitted baryons as a disk galaxy
 * under Newton + the fitted halo, and the same particles' positions under the pair law, through
 * the run service (spec limits, quota and queue as for any run). The runs remember the galaxy.
 */
export async function runsFromGalaxy(em: EntityManager, queue: Queue<RunJobData>, user: User, g: Galaxy, body: unknown): Promise<RunSummary[]> {
  const { fitId, halo, pairLaw, ...choices } = parseInput(galaxyRunRequestSchema, body);
  const fits = await em.find(GalaxyFit, fitId === undefined ? { galaxy: g.id } : { galaxy: g.id, id: fitId }, { orderBy: { createdAt: 'desc', id: 'desc' }, limit: FITS_KEPT });
  if (fitId !== undefined && !fits.length) throw new ApiError('NOT_FOUND', `No fit ${fitId} of this galaxy`, { field: 'fitId' });
  const wanted: readonly HaloFit[] = halo ? [halo] : HALO_FITS;
  const record = fits.find((f) => f.results.laws.some((l) => (wanted as readonly string[]).includes(l.law)));
  if (!record) throw new ApiError('BAD_REQUEST', `${fitId === undefined ? 'This galaxy has no fit' : `Fit ${fitId} has no fit`} under ${wanted.join(' or ')}; fit it under a Newtonian halo first`, { field: fitId === undefined ? 'halo' : 'fitId' });
  const fit = record.results.laws.filter((l) => (wanted as readonly string[]).includes(l.law)).reduce((a, b) => (b.bic < a.bic ? b : a));
  let built;
  try {
    built = galaxyRunSpec(fit, { ...choices, name: `${g.name} from its fit under ${fit.label}` });
  } catch (err) {
    throw new ApiError('BAD_REQUEST', `This fit cannot start a run: ${err instanceof Error ? err.message : String(err)}`);
  }
  return submitRuns(em, queue, user, { spec: built.spec, pairLaw: pairLaw ?? GALAXY_PAIR_LAW }, { galaxy: g.id });
}

/** Fits at once across the server; more wait for a minute rather than crowd the machine. */
const MAX_FITS_AT_ONCE = 2;
const FIT_TIME_LIMIT_MS = 60_000;
let fitting = 0;

type FitAnswer<R> = { ok: true; report: R } | { ok: false; refused: boolean; message: string };

/** Runs one fit (a galaxy, or a sample) in a worker thread (a .ts entry needs tsx's require hook there), with a time limit. */
function fitInThread(curve: RotationCurve, options: FitOptions): Promise<GalaxyFitReport>;
function fitInThread(sample: SampleGalaxy[], options: FitOptions): Promise<SampleFitReport>;
async function fitInThread(what: RotationCurve | SampleGalaxy[], options: FitOptions): Promise<GalaxyFitReport | SampleFitReport> {
  if (fitting >= MAX_FITS_AT_ONCE) throw new ApiError('UNAVAILABLE', 'The server is busy with other fits; try again in a minute');
  fitting += 1;
  const entry = path.join(__dirname, 'fitThread.ts');
  const job: FitJob = Array.isArray(what) ? { sample: what, options } : { curve: what, options };
  const worker = new Worker(`require(${JSON.stringify(require.resolve('tsx/cjs'))}); require(${JSON.stringify(entry)});`, { eval: true, workerData: job });
  try {
    const answer = await new Promise<FitAnswer<GalaxyFitReport | SampleFitReport>>((resolve, reject) => {
      const timer = setTimeout(() => reject(new ApiError('UNAVAILABLE', `The fit took longer than ${FIT_TIME_LIMIT_MS / 1000} s and was stopped`)), FIT_TIME_LIMIT_MS);
      worker.once('message', (m: FitAnswer<GalaxyFitReport | SampleFitReport>) => (clearTimeout(timer), resolve(m)));
      worker.once('error', (e) => (clearTimeout(timer), reject(e)));
      worker.once('exit', () => (clearTimeout(timer), reject(new Error('the fit thread stopped without an answer'))));
    });
    if (answer.ok) return answer.report;
    if (answer.refused) throw new ApiError('BAD_REQUEST', `The fit failed: ${answer.message}`);
    throw new Error(`the fit thread failed: ${answer.message}`);
  } finally {
    fitting -= 1;
    void worker.terminate();
  }
}
