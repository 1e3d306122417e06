/**
 * Sandbox limits and usage for site admins: site-wide limits, per-group overrides, and the usage
 * report. Every change is audited and applies to the next run.
 */
import { Router } from 'express';
import { z } from 'zod';
import type { AppDeps } from '../deps';
import { currentUser, requireAdmin } from '../auth/requireUser';
import { notFound } from '../http/errors';
import { parseBody, parseParams, parseQuery } from '../http/validate';
import {
  DEFAULT_LIMITS,
  GroupLimitOverridesSchema,
  LIMIT_FIELDS,
  UpdateLimitsSchema,
  type GroupLimitsResponse,
  type LimitsResponse,
} from '../../shared/schemas/limits';
import { getGroupOverrides, getLimits, getSiteLimits, updateGroupOverrides, updateLimits } from '../services/limits';
import { usageReport } from '../services/usage';

const GroupParams = z.object({ groupId: z.coerce.number().int().positive() });
const UsageQuery = z.object({ since: z.iso.datetime({ error: 'since must be an ISO 8601 time' }).optional() });

export function limitsRouter(deps: AppDeps): Router {
  const { db } = deps;
  const r = Router();
  r.use('/admin', requireAdmin);

  const fields = LIMIT_FIELDS as LimitsResponse['fields'];

  r.get('/admin/limits', async (_req, res) => {
    const out: LimitsResponse = { limits: await getSiteLimits(db), defaults: DEFAULT_LIMITS, fields };
    res.json(out);
  });

  r.put('/admin/limits', async (req, res) => {
    const changes = parseBody(UpdateLimitsSchema, req);
    const limits = await updateLimits(db, { userId: currentUser(req).id, changes });
    const out: LimitsResponse = { limits, defaults: DEFAULT_LIMITS, fields };
    res.json(out);
  });

  const groupLimits = async (groupId: number): Promise<GroupLimitsResponse> => {
    const group = await db('groups').where({ id: groupId }).first('id');
    if (!group) throw notFound('Group');
    return { groupId, overrides: await getGroupOverrides(db, groupId), effective: await getLimits(db, groupId), fields };
  };

  r.get('/admin/groups/:groupId/limits', async (req, res) => {
    const { groupId } = parseParams(GroupParams, req);
    res.json(await groupLimits(groupId));
  });

  r.put('/admin/groups/:groupId/limits', async (req, res) => {
    const { groupId } = parseParams(GroupParams, req);
    const changes = parseBody(GroupLimitOverridesSchema, req);
    await groupLimits(groupId);
    await updateGroupOverrides(db, { userId: currentUser(req).id, groupId, changes });
    res.json(await groupLimits(groupId));
  });

  r.get('/admin/usage', async (req, res) => {
    const q = parseQuery(UsageQuery, req);
    res.json(await usageReport(db, { since: q.since }));
  });

  return r;
}
