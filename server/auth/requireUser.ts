import type { Request, RequestHandler } from 'express';
import type { AppDeps } from '../deps';
import { forbidden, unauthorized } from '../http/errors';
import { readSession } from './session';
import type { SessionUser } from './types';

interface UserRow {
  id: number;
  email: string;
  name: string;
  role: 'admin' | 'member';
  disabled: number | boolean;
  session_version: number;
}

/** The user of a valid session cookie whose account is enabled and whose session is current. */
export async function loadSessionUser(deps: AppDeps, req: Request): Promise<SessionUser | undefined> {
  const s = readSession(req, deps.config);
  if (!s) return undefined;
  const row = (await deps.db('users').where({ id: s.userId }).first('id', 'email', 'name', 'role', 'disabled', 'session_version')) as UserRow | undefined;
  if (!row || row.disabled || row.session_version !== s.sessionVersion) return undefined;
  return { id: row.id, email: row.email, name: row.name, role: row.role };
}

function depsOf(req: Request): AppDeps {
  const deps = req.app.locals.deps as AppDeps | undefined;
  if (!deps) throw new Error('app.locals.deps is not set: build the app with createApp(deps)');
  return deps;
}

/** Middleware: 401 unless the request carries a valid session of an enabled account; sets req.user. */
export const requireUser: RequestHandler = async (req, _res, next) => {
  req.user ??= await loadSessionUser(depsOf(req), req);
  if (!req.user) throw unauthorized();
  next();
};

/** Middleware: sets req.user when a valid session exists; never refuses. */
export const optionalUser: RequestHandler = async (req, _res, next) => {
  req.user ??= await loadSessionUser(depsOf(req), req);
  next();
};

/** Middleware: 401 signed out, 403 unless the user is a site admin. */
export const requireAdmin: RequestHandler = async (req, _res, next) => {
  req.user ??= await loadSessionUser(depsOf(req), req);
  if (!req.user) throw unauthorized();
  if (req.user.role !== 'admin') throw forbidden('Only a site admin may do this.');
  next();
};

/** The signed-in user of a route behind requireUser/authorize. */
export function currentUser(req: Request): SessionUser {
  if (!req.user) throw unauthorized();
  return req.user;
}
