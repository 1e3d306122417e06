import { Router } from 'express';
import type { AppDeps } from '../deps';

export function healthRouter(deps: AppDeps): Router {
  const r = Router();
  r.get('/health', async (_req, res) => {
    // Touch the database so that a broken file shows up here rather than on the first real request.
    await deps.db.raw('select 1');
    res.json({ status: 'ok' });
  });
  return r;
}
