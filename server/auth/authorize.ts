import type { Request, RequestHandler, Response } from 'express';
import type { AppDeps } from '../deps';
import { forbidden, notFound, unauthorized } from '../http/errors';
import { intParam } from '../http/validate';
import { loadSessionUser } from './requireUser';
import { roleAtLeast, type GroupRole } from './types';

/** Finds the group a request's resource belongs to; undefined when the resource does not exist. */
export type GroupOf = (req: Request, res: Response) => Promise<number | undefined> | number | undefined;

/** The deps createApp stored on the app, so that middleware needs no extra argument. */
export function depsOf(req: Request): AppDeps {
  const deps = req.app.locals.deps as AppDeps | undefined;
  if (!deps) throw new Error('app.locals.deps is not set: build the app with createApp(deps)');
  return deps;
}

/** The caller's role in a group: their membership, or 'owner' for a site admin; undefined for others. */
export async function groupRoleOf(db: AppDeps['db'], user: { id: number; role: 'admin' | 'member' }, groupId: number): Promise<GroupRole | undefined> {
  const m = (await db('memberships').where({ group_id: groupId, user_id: user.id }).first('role')) as { role: GroupRole } | undefined;
  if (user.role === 'admin') return 'owner';
  return m?.role;
}

/**
 * The one group-role check: 401 signed out, 404 when groupOf finds no resource (or the group
 * does not exist), 403 when the caller is not a member or their role is below minRole.
 * Site admins pass as owner. Sets req.groupId and req.groupRole.
 */
export function authorize(minRole: GroupRole, groupOf: GroupOf): RequestHandler {
  return async (req, res, next) => {
    const deps = depsOf(req);
    req.user ??= await loadSessionUser(deps, req);
    const user = req.user;
    if (!user) throw unauthorized();
    const groupId = await groupOf(req, res);
    if (groupId === undefined) throw notFound('Resource');
    const group = await deps.db('groups').where({ id: groupId }).first('id');
    if (!group) throw notFound('Group');
    const role = await groupRoleOf(deps.db, user, groupId);
    if (!role) throw forbidden('You are not a member of this group.');
    if (!roleAtLeast(role, minRole)) throw forbidden(`This needs the ${minRole} role in the group; you are ${role}.`);
    req.groupId = groupId;
    req.groupRole = role;
    next();
  };
}

/** groupOf for routes like /api/groups/:groupId/... (400 when the parameter is not a positive integer). */
export function groupFromParam(name = 'groupId'): GroupOf {
  return (req) => intParam(req, name);
}
