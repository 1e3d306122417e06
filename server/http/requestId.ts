import { randomUUID } from 'node:crypto';
import type { RequestHandler } from 'express';
import { log } from './log';

const SAFE_ID = /^[A-Za-z0-9._-]{8,100}$/;

/** Gives every request an id (a caller's X-Request-Id is kept when it looks sane) and echoes it. */
export function requestId(opts: { logRequests: boolean }): RequestHandler {
  return (req, res, next) => {
    const given = req.get('x-request-id');
    req.id = given && SAFE_ID.test(given) ? given : randomUUID();
    res.setHeader('X-Request-Id', req.id);
    if (opts.logRequests) {
      const started = process.hrtime.bigint();
      res.on('finish', () => {
        const ms = Number(process.hrtime.bigint() - started) / 1e6;
        log('info', 'request', { requestId: req.id, method: req.method, path: req.originalUrl, status: res.statusCode, ms: Math.round(ms * 10) / 10, userId: req.user?.id });
      });
    }
    next();
  };
}
