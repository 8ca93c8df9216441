import type { User } from '../db/entities';
import type { EntityManager } from '@mikro-orm/postgresql';
import { ApiError } from '../errors';
import { TableError } from '../../shared/galaxy/table';
import { parseParticleTable, type ParticleTableUpload } from '../../shared/api/particleTable';
import { effectiveLimits, uploadLimits } from './quotas';
import { cleanFileName, tableRefusal, type UploadedFile } from './galaxies';

/**
 * Reads an uploaded particle table for the new-run form. Nothing is stored: the particles go
 * back to the form and into the run's spec, which the run submission checks again. Rows are
 * capped by the upload limit and by the particles a run may have, whichever is lower.
 */
export async function readParticleUpload(em: EntityManager, user: User, file: UploadedFile | undefined): Promise<ParticleTableUpload> {
  if (!file) throw new ApiError('BAD_REQUEST', 'file: attach the particle table as the multipart field "file"', { field: 'file' });
  const { maxUploadBytes, maxUploadRows } = uploadLimits(user);
  const { maxParticles } = await effectiveLimits(em, user);
  try {
    const particles = parseParticleTable(file.buffer, { maxBytes: maxUploadBytes, maxRows: Math.min(maxUploadRows, maxParticles) });
    return { fileName: cleanFileName(file.originalname), particles };
  } catch (err) {
    throw err instanceof TableError ? tableRefusal(err) : err;
  }
}
