import { Router } from 'express';
import { RequestContext } from '@mikro-orm/core';
import type { EntityManager } from '@mikro-orm/postgresql';
import { requireSession } from '../auth/guards';
import { createTokenBodySchema } from '../../shared/api/accounts';
import { createToken, listTokens, revokeToken } from '../services/tokens';
import { idParam, parseInput } from './input';

const em = () => RequestContext.getEntityManager() as EntityManager;

export function tokensRouter(): Router {
  const r = Router();
  r.use(requireSession);

  r.post('/', async (req, res) => {
    const body = parseInput(createTokenBodySchema, req.body);
    res.status(201).set('Cache-Control', 'no-store').json(await createToken(em(), req.user!, body));
  });

  r.get('/', async (req, res) => {
    res.json({ tokens: await listTokens(em(), req.user!) });
  });

  r.delete('/:id', async (req, res) => {
    await revokeToken(em(), req.user!, idParam(req.params.id, 'token'));
    res.status(204).end();
  });

  return r;
}
