import type { Express } from 'express';
import type { AppDeps } from '../deps';
import { adminRouter } from './admin';
import { authRouter } from './auth';
import { datasetsRouter } from './datasets';
import { recipesRouter } from './recipes';
import { groupsRouter } from './groups';
import { healthRouter } from './health';
import { notebooksRouter } from './notebooks';
import { sweepsRouter } from './sweeps';
import { runsRouter } from './runs';
import { limitsRouter } from './limits';

/**
 * Every API router, mounted under /api. Add yours with one line:
 *   app.use('/api', xxxRouter(deps));
 * Routers declare full paths below /api (e.g. '/notebooks/:id') and guard themselves
 * with requireUser / requireAdmin / authorize.
 */
export function mountRoutes(app: Express, deps: AppDeps): void {
  app.use('/api', healthRouter(deps));
  app.use('/api', authRouter(deps));
  app.use('/api', groupsRouter(deps));
  app.use('/api', adminRouter(deps));
  app.use('/api', datasetsRouter(deps));
  app.use('/api', recipesRouter(deps));
  app.use('/api', notebooksRouter(deps));
  app.use('/api', sweepsRouter(deps));
  app.use('/api', runsRouter(deps));
  app.use('/api', limitsRouter(deps));
}
