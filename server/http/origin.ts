import type { RequestHandler } from 'express';
import { AppError } from './errors';

const SAFE_METHODS = new Set(['GET', 'HEAD', 'OPTIONS']);

/**
 * Refuses state-changing requests sent from another origin (on top of the SameSite=Strict
 * cookie). A request without an Origin header (curl, server-to-server, same-origin GETs) passes;
 * one whose Origin is neither the configured app origin nor the request's own host is refused.
 */
export function originCheck(appOrigin: string): RequestHandler {
  const allowed = appOrigin.toLowerCase();
  return (req, _res, next) => {
    if (SAFE_METHODS.has(req.method)) return next();
    const origin = req.get('origin');
    if (origin === undefined) return next();
    const o = origin.toLowerCase();
    const own = `${req.protocol}://${req.get('host') ?? ''}`.toLowerCase();
    if (o === allowed || o === own) return next();
    next(new AppError(403, 'bad_origin', `Requests from ${origin} may not change anything here.`));
  };
}
