import { Router } from 'express';
import { rateLimit } from 'express-rate-limit';
import {
  InvitationAcceptBody,
  PasswordResetCompleteBody,
  PasswordResetRequestBody,
  SignInBody,
} from '../../shared/schemas/auth';
import { requireUser } from '../auth/requireUser';
import { clearSession, issueSession, readSession } from '../auth/session';
import type { AppDeps } from '../deps';
import { AppError } from '../http/errors';
import { parseBody } from '../http/validate';
import { audit } from '../services/audit';
import { checkCredentials, completePasswordReset, requestPasswordReset } from '../services/auth';
import { acceptInvitation, describeInvitation } from '../services/invitations';
import { toSessionUser } from '../services/users';

function tooMany(): AppError {
  return new AppError(429, 'rate_limited', 'Too many attempts; wait a few minutes and try again.');
}

export function authRouter(deps: AppDeps): Router {
  const r = Router();
  const { windowMs, limit } = deps.config.signInRateLimit;
  // Only failed attempts count, so that a lab signing in from one address is not locked out.
  const signInLimiter = rateLimit({
    windowMs,
    limit,
    skipSuccessfulRequests: true,
    standardHeaders: 'draft-8',
    legacyHeaders: false,
    handler: (_req, _res, next) => next(tooMany()),
  });
  // Link-sending and token endpoints: a plain budget per address.
  const linkLimiter = rateLimit({
    windowMs,
    limit: Math.max(limit, 1) * 2,
    standardHeaders: 'draft-8',
    legacyHeaders: false,
    handler: (_req, _res, next) => next(tooMany()),
  });

  r.post('/auth/sign-in', signInLimiter, async (req, res) => {
    const body = parseBody(SignInBody, req);
    let user;
    try {
      user = await checkCredentials(deps.db, body.email, body.password);
    } catch (err) {
      await audit(deps.db, { userId: null, action: 'auth.sign_in_failed', target: null, details: { email: body.email, ip: req.ip ?? null } });
      throw err;
    }
    issueSession(res, deps.config, user);
    await audit(deps.db, { userId: user.id, action: 'auth.sign_in', target: `user:${user.id}`, details: { ip: req.ip ?? null } });
    res.json({ user: toSessionUser(user) });
  });

  r.post('/auth/sign-out', async (req, res) => {
    const s = readSession(req, deps.config);
    clearSession(res, deps.config);
    if (s) await audit(deps.db, { userId: s.userId, action: 'auth.sign_out', target: `user:${s.userId}` });
    res.status(204).end();
  });

  r.get('/auth/me', requireUser, (req, res) => {
    res.json({ user: req.user });
  });

  r.post('/auth/password-reset/request', linkLimiter, async (req, res) => {
    const body = parseBody(PasswordResetRequestBody, req);
    void requestPasswordReset(deps, body.email, req.ip);
    res.status(202).json({ status: 'accepted', message: 'If an account has this address, a reset link is on its way.' });
  });

  r.post('/auth/password-reset/complete', linkLimiter, async (req, res) => {
    const body = parseBody(PasswordResetCompleteBody, req);
    const user = await completePasswordReset(deps, body.token, body.password);
    issueSession(res, deps.config, user);
    res.json({ user: toSessionUser(user) });
  });

  r.get('/invitations/:token', linkLimiter, async (req, res) => {
    res.json({ invitation: await describeInvitation(deps.db, String(req.params.token)) });
  });

  r.post('/invitations/:token/accept', linkLimiter, async (req, res) => {
    const body = parseBody(InvitationAcceptBody, req);
    const user = await acceptInvitation(deps, String(req.params.token), body);
    issueSession(res, deps.config, user);
    res.json({ user: toSessionUser(user) });
  });

  return r;
}
