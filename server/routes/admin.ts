import { Router } from 'express';
import { RequestContext } from '@mikro-orm/core';
import type { EntityManager } from '@mikro-orm/postgresql';
import { requireRole } from '../auth/guards';
import { adminUsersQuerySchema, allocationBodySchema, grantRoleBodySchema } from '../../shared/api/accounts';
import { findUser, grantRole, listUsers, setAllocation, toAdminUser } from '../services/users';
import { accountUsage } from '../services/quotas';
import { idParam, parseInput } from './input';

const em = () => RequestContext.getEntityManager() as EntityManager;

export function adminRouter(): Router {
  const r = Router();
  r.use(requireRole('admin'));

  r.get('/users', async (req, res) => {
    res.json({ users: await listUsers(em(), parseInput(adminUsersQuerySchema, req.query)) });
  });

  r.get('/users/:id', async (req, res) => {
    const u = await findUser(em(), idParam(req.params.id, 'user'));
    res.json({ user: await toAdminUser(em(), u), usage: await accountUsage(em(), u) });
  });

  r.patch('/users/:id', async (req, res) => {
    const u = await findUser(em(), idParam(req.params.id, 'user'));
    await grantRole(em(), req.user!, u, parseInput(grantRoleBodySchema, req.body).role);
    res.json({ user: await toAdminUser(em(), u) });
  });

  r.put('/users/:id/allocation', async (req, res) => {
    const u = await findUser(em(), idParam(req.params.id, 'user'));
    await setAllocation(em(), u, parseInput(allocationBodySchema, req.body));
    res.json({ user: await toAdminUser(em(), u) });
  });

  return r;
}
