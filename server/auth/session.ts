import type { Response, Request } from 'express';
import jwt from 'jsonwebtoken';
import type { AppConfig } from '../deps';

export const SESSION_COOKIE = 'comoving_session';

interface SessionClaims {
  sub: string;
  /** users.session_version at issue time; a bump (password change, disabling) ends older sessions. */
  sv: number;
}

export function issueSession(res: Response, config: AppConfig, user: { id: number; session_version: number }): void {
  const token = jwt.sign({ sv: user.session_version } satisfies Omit<SessionClaims, 'sub'>, config.jwtSecret, {
    algorithm: 'HS256',
    subject: String(user.id),
    expiresIn: config.sessionTtlSeconds,
  });
  res.cookie(SESSION_COOKIE, token, {
    httpOnly: true,
    sameSite: 'strict',
    secure: config.appOrigin.startsWith('https:'),
    path: '/',
    maxAge: config.sessionTtlSeconds * 1000,
  });
}

export function clearSession(res: Response, config: AppConfig): void {
  res.clearCookie(SESSION_COOKIE, { httpOnly: true, sameSite: 'strict', secure: config.appOrigin.startsWith('https:'), path: '/' });
}

/** The claims of a valid, unexpired session cookie, or undefined. */
export function readSession(req: Request, config: AppConfig): { userId: number; sessionVersion: number } | undefined {
  const token = (req.cookies as Record<string, string> | undefined)?.[SESSION_COOKIE];
  if (!token) return undefined;
  try {
    const claims = jwt.verify(token, config.jwtSecret, { algorithms: ['HS256'] }) as jwt.JwtPayload & Partial<SessionClaims>;
    const userId = Number(claims.sub);
    if (!Number.isSafeInteger(userId) || typeof claims.sv !== 'number') return undefined;
    return { userId, sessionVersion: claims.sv };
  } catch {
    return undefined;
  }
}
