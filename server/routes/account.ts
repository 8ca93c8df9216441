import { Router } from 'express';
import { RequestContext } from '@mikro-orm/core';
import type { EntityManager } from '@mikro-orm/postgresql';
import { requireUser } from '../auth/guards';
import { updateAccountBodySchema, type AccountSettings } from '../../shared/api/accounts';
import { accountUsage } from '../services/quotas';
import { toAccountUser, updateSettings } from '../services/users';
import { parseInput } from './input';
import type { User } from '../db/entities';

const em = () => RequestContext.getEntityManager() as EntityManager;
const settings = (u: User): AccountSettings => ({ user: toAccountUser(u), notifyOnFinish: u.notifyOnFinish });

export function accountRouter(): Router {
  const r = Router();
  r.use(requireUser);

  r.get('/', (req, res) => {
    res.json(settings(req.user!));
  });

  r.patch('/', async (req, res) => {
    const body = parseInput(updateAccountBodySchema, req.body);
    await updateSettings(em(), req.user!, body.notifyOnFinish);
    res.json(settings(req.user!));
  });

  r.get('/usage', async (req, res) => {
    res.set('Cache-Control', 'no-store').json(await accountUsage(em(), req.user!));
  });

  return r;
}
