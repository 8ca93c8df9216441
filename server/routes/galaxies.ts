import { Router, type RequestHandler } from 'express';
import multer, { MulterError } from 'multer';
import { RequestContext } from '@mikro-orm/core';
import type { EntityManager } from '@mikro-orm/postgresql';
import { requireUser } from '../auth/guards';
import { ApiError } from '../errors';
import { uploadLimits } from '../services/quotas';
import { createGalaxy, deleteGalaxy, findVisibleGalaxy, galaxyDetail, galaxyFile, listGalaxies, requestFit, updateGalaxy } from '../services/galaxies';
import type { GalaxyList } from '../../shared/api/galaxies';

const em = () => RequestContext.getEntityManager() as EntityManager;

/**
 * One file in memory, no bigger than the caller's upload quota (checked while it streams in),
 * plus a few short text fields. Multer's refusals become our error shape.
 */
const tableUpload: RequestHandler = (req, res, next) => {
  const { maxUploadBytes } = uploadLimits(req.user!);
  const upload = multer({ storage: multer.memoryStorage(), limits: { fileSize: maxUploadBytes, files: 1, fields: 8, fieldSize: 16_384, parts: 10 } }).single('file');
  upload(req, res, (err: unknown) => {
    if (!err) return next();
    if (err instanceof MulterError) {
      if (err.code === 'LIMIT_FILE_SIZE') return next(new ApiError('PAYLOAD_TOO_LARGE', `file: the table is larger than your upload limit of ${maxUploadBytes} bytes`, { field: 'file' }));
      if (err.code === 'LIMIT_UNEXPECTED_FILE') return next(new ApiError('BAD_REQUEST', `${err.field ?? 'file'}: send one table, as the multipart field "file"`, { field: 'file' }));
      return next(new ApiError('BAD_REQUEST', `The upload was refused: ${err.message}`));
    }
    if (err instanceof Error && /multipart|boundary/i.test(err.message)) return next(new ApiError('BAD_REQUEST', `The upload is not well-formed multipart data: ${err.message}`));
    next(err);
  });
};

export function galaxiesRouter(): Router {
  const r = Router();
  r.use(requireUser);

  r.get('/', async (req, res) => {
    const body: GalaxyList = { galaxies: await listGalaxies(em(), req.user!), limits: uploadLimits(req.user!) };
    res.json(body);
  });

  r.post('/', tableUpload, async (req, res) => {
    const g = await createGalaxy(em(), req.user!, req.file, req.body);
    res.status(201).json(await galaxyDetail(em(), req.user!, g));
  });

  r.get('/:id', async (req, res) => {
    const g = await findVisibleGalaxy(em(), req.user!, req.params.id);
    res.json(await galaxyDetail(em(), req.user!, g));
  });

  // The raw table as uploaded: always a download, never rendered by the browser.
  r.get('/:id/file', async (req, res) => {
    const g = await findVisibleGalaxy(em(), req.user!, req.params.id);
    res.attachment(g.fileName).type('application/octet-stream').set('X-Content-Type-Options', 'nosniff').send(await galaxyFile(em(), g));
  });

  r.post('/:id/fits', async (req, res) => {
    const g = await findVisibleGalaxy(em(), req.user!, req.params.id);
    res.status(201).json(await requestFit(em(), req.user!, g, req.body));
  });

  r.patch('/:id', async (req, res) => {
    const g = await findVisibleGalaxy(em(), req.user!, req.params.id);
    res.json(await updateGalaxy(em(), req.user!, g, req.body));
  });

  r.delete('/:id', async (req, res) => {
    const g = await findVisibleGalaxy(em(), req.user!, req.params.id);
    await deleteGalaxy(em(), req.user!, g);
    res.status(204).end();
  });

  return r;
}
