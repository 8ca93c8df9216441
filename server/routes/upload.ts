import type { RequestHandler } from 'express';
import { RequestContext } from '@mikro-orm/core';
import type { EntityManager } from '@mikro-orm/postgresql';
import multer, { MulterError } from 'multer';
import { ApiError } from '../errors';
import { limitText, quotaLimitText } from '../../shared/api/accounts';
import { uploadLimits } from '../services/quotas';

/**
 * One file in memory, no bigger than the caller's upload quota (checked while it streams in),
 * plus a few short text fields. Multer's refusals become our error shape.
 */
export const tableUpload: RequestHandler = async (req, res, next) => {
  // Express 5 passes a rejection (the database unreachable) on as an error.
  const { maxUploadBytes } = await uploadLimits(RequestContext.getEntityManager() as EntityManager, req.user!);
  const upload = multer({ storage: multer.memoryStorage(), limits: { fileSize: maxUploadBytes, files: 1, fields: 8, fieldSize: 16_384, parts: 10 } }).single('file');
  upload(req, res, (err: unknown) => {
    if (!err) return next();
    if (err instanceof MulterError) {
      if (err.code === 'LIMIT_FILE_SIZE') return next(new ApiError('PAYLOAD_TOO_LARGE', `file: the table is larger than ${limitText('maxUploadBytes', maxUploadBytes)}, ${quotaLimitText('maxUploadBytes', maxUploadBytes)}`, { field: 'file' }));
      if (err.code === 'LIMIT_UNEXPECTED_FILE') return next(new ApiError('BAD_REQUEST', `${err.field ?? 'file'}: send one table, as the multipart field "file"`, { field: 'file' }));
      return next(new ApiError('BAD_REQUEST', `The upload was refused: ${err.message}`));
    }
    if (err instanceof Error && /multipart|boundary/i.test(err.message)) return next(new ApiError('BAD_REQUEST', `The upload is not well-formed multipart data: ${err.message}`));
    next(err);
  });
};

