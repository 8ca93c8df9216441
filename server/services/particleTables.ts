import fs from 'node:fs/promises';
import os from 'node:os';
import path from 'node:path';
import { randomUUID } from 'node:crypto';
import { Worker } from 'node:worker_threads';
import type { EntityManager } from '@mikro-orm/postgresql';
import type { User } from '../db/entities';
import { ApiError } from '../errors';
import { TableError } from '../../shared/galaxy/table';
import { parseParticleTable, type ParticleTableUpload, type TableParticle } from '../../shared/api/particleTable';
import { effectiveLimits } from './quotas';
import { quotaLimitText } from '../../shared/api/accounts';
import { cleanFileName, tableRefusal, type UploadedFile } from './galaxies';
import type { ParticleFileAnswer } from './particleFileThread';

/** The lower of the two quota limits on a particle file's rows: rows per table, particles per run. */
type RowLimit = { key: 'maxUploadRows' | 'maxParticles'; max: number };

/** The first eight bytes of every HDF5 file. */
const HDF5_SIGNATURE = Buffer.from([0x89, 0x48, 0x44, 0x46, 0x0d, 0x0a, 0x1a, 0x0a]);

/** The last frame of a snapshot file written by the export, read in a worker thread. */
async function particlesOfSnapshotFile(bytes: Buffer, rowLimit: RowLimit): Promise<TableParticle[]> {
  const file = path.join(os.tmpdir(), `infall-particles-${randomUUID()}.h5`);
  await fs.writeFile(file, bytes);
  const entry = path.join(__dirname, 'particleFileThread.ts');
  const worker = new Worker(`require(${JSON.stringify(require.resolve('tsx/cjs'))}); require(${JSON.stringify(entry)});`, { eval: true, workerData: file });
  try {
    const answer = await new Promise<ParticleFileAnswer>((resolve, reject) => {
      worker.once('message', resolve);
      worker.once('error', reject);
      worker.once('exit', () => reject(new Error('the snapshot file reader stopped without an answer')));
    });
    if (!answer.ok) throw new ApiError('BAD_REQUEST', `file: ${answer.message}`, { field: 'file' });
    const n = answer.masses.length;
    if (n > rowLimit.max) throw new ApiError('PAYLOAD_TOO_LARGE', `file: the snapshot file has ${n} particles; ${quotaLimitText(rowLimit.key, rowLimit.max)}`, { field: 'file' });
    const { positions: x, velocities: v, masses: m } = answer;
    return Array.from({ length: n }, (_, i) => ({ x_kpc: x[3 * i], y_kpc: x[3 * i + 1], z_kpc: x[3 * i + 2], vx_km_s: v[3 * i], vy_km_s: v[3 * i + 1], vz_km_s: v[3 * i + 2], mass_Msun: m[i] }));
  } finally {
    void worker.terminate();
    await fs.rm(file, { force: true });
  }
}

/**
 * Reads an uploaded particle table (text) or snapshot file (HDF5 from the export: its last
 * frame) for the new-run form. Nothing is stored: the particles go back to the form and into
 * the run's spec, which the run submission checks again. Rows are capped by the upload limit
 * and by the particles a run may have, whichever is lower.
 */
export async function readParticleUpload(em: EntityManager, user: User, file: UploadedFile | undefined): Promise<ParticleTableUpload> {
  if (!file) throw new ApiError('BAD_REQUEST', 'file: attach the particle table as the multipart field "file"', { field: 'file' });
  const { maxUploadBytes, maxUploadRows, maxParticles } = await effectiveLimits(em, user);
  const rowLimit: RowLimit = maxUploadRows <= maxParticles ? { key: 'maxUploadRows', max: maxUploadRows } : { key: 'maxParticles', max: maxParticles };
  const fileName = cleanFileName(file.originalname);
  if (file.buffer.subarray(0, 8).equals(HDF5_SIGNATURE)) return { fileName, particles: await particlesOfSnapshotFile(file.buffer, rowLimit) };
  try {
    return { fileName, particles: parseParticleTable(file.buffer, { maxBytes: maxUploadBytes, maxRows: rowLimit.max }) };
  } catch (err) {
    throw err instanceof TableError ? tableRefusal(err, rowLimit) : err;
  }
}
