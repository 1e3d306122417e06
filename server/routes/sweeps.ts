/**
 * Sweep routes: parse, authorize through the one role middleware, call the sweep service.
 * Running a sweep is running scripts, so viewers may start one (as they may run a block).
 */
import { Router, type Request } from 'express';
import type { AppDeps } from '../deps';
import { authorize, groupFromParam } from '../auth/authorize';
import { AppError } from '../http/errors';
import { intParam, parseBody, parseQuery } from '../http/validate';
import { CreateSweepSchema, ListSweepsQuerySchema, SweepResultsQuerySchema } from '../../shared/schemas/sweeps';
import { cancelSweep, createSweep, getSweep, sweepGroupId, sweepResults } from '../services/sweeps/service';
import { listSweeps } from '../services/sweeps/store';
import { getLimits } from '../services/limits';
import { declarationsOf } from '../services/recipes';
import { requireUser } from '../auth/index';
import { SweepDeclarationsSchema } from '../../shared/schemas/sweeps';
import { resultsToCsv } from '../services/sweeps/results';
import type { SweepQueue } from '../services/sweeps/queue';

export function sweepsRouter(deps: AppDeps): Router {
  const { db } = deps;
  const router = Router();
  const queue = (): SweepQueue => {
    if (!deps.sweeps) throw new AppError(503, 'unavailable', 'Sweeps are not available on this server.');
    return deps.sweeps;
  };
  const sweepOf = (req: Request) => sweepGroupId(db, intParam(req, 'id'));
  const groupInBody = (req: Request) => {
    const g = (req.body as { groupId?: unknown } | undefined)?.groupId;
    if (typeof g !== 'number' || !Number.isInteger(g) || g <= 0) {
      throw new AppError(400, 'invalid_input', 'groupId: must be a positive integer', { field: 'groupId' });
    }
    return g;
  };

  router.get('/groups/:groupId/sweeps', authorize('viewer', groupFromParam('groupId')), async (req, res) => {
    const { limit } = parseQuery(ListSweepsQuerySchema, req);
    res.json({ sweeps: await listSweeps(db, req.groupId!, limit) });
  });

  /** What the sweep form needs before starting: how many points this group may sweep. */
  router.get('/groups/:groupId/sweep-limit', authorize('viewer', groupFromParam('groupId')), async (req, res) => {
    const limits = await getLimits(db, req.groupId!);
    res.json({ sweepPoints: limits.sweepPoints });
  });

  /** The inputs a script declares with param(), read statically, so the form can offer them. */
  router.post('/sweeps/declarations', requireUser, async (req, res) => {
    const body = parseBody(SweepDeclarationsSchema, req);
    res.json({ params: declarationsOf(body.source, body.language) });
  });

  router.post('/sweeps', authorize('viewer', groupInBody), async (req, res) => {
    const body = parseBody(CreateSweepSchema, req);
    const sweep = await createSweep(db, queue(), req.user!.id, body);
    res.status(202).json({ sweep });
  });

  router.get('/sweeps/:id', authorize('viewer', sweepOf), async (req, res) => {
    res.json({ sweep: await getSweep(db, intParam(req, 'id')) });
  });

  router.get('/sweeps/:id/results', authorize('viewer', sweepOf), async (req, res) => {
    const { format } = parseQuery(SweepResultsQuerySchema, req);
    const results = await sweepResults(db, intParam(req, 'id'));
    if (format === 'csv') {
      res.setHeader('Content-Type', 'text/csv; charset=utf-8');
      res.setHeader('Content-Disposition', `attachment; filename="sweep-${results.sweep.id}.csv"`);
      res.send(resultsToCsv(results));
      return;
    }
    res.json(results);
  });

  router.post('/sweeps/:id/cancel', authorize('viewer', sweepOf), async (req, res) => {
    res.json({ sweep: await cancelSweep(db, queue(), req.user!.id, intParam(req, 'id')) });
  });

  /** Server-Sent Events: `progress` while it runs, then one `end` and the stream closes. */
  router.get('/sweeps/:id/events', authorize('viewer', sweepOf), async (req, res) => {
    const id = intParam(req, 'id');
    const q = queue();
    res.status(200);
    res.setHeader('Content-Type', 'text/event-stream; charset=utf-8');
    res.setHeader('Cache-Control', 'no-cache, no-transform');
    res.setHeader('Connection', 'keep-alive');
    res.setHeader('X-Accel-Buffering', 'no');
    res.flushHeaders();
    let closed = false;
    const send = (event: string, data: unknown) => {
      if (!closed) res.write(`event: ${event}\ndata: ${JSON.stringify(data)}\n\n`);
    };
    const end = () => {
      if (closed) return;
      closed = true;
      unsubscribe();
      clearInterval(heartbeat);
      res.end();
    };
    const unsubscribe = q.subscribe(id, (p) => {
      const finished = p.status !== 'running' && p.status !== 'queued';
      send(finished ? 'end' : 'progress', p);
      if (finished) end();
    });
    const heartbeat = setInterval(() => !closed && res.write(': keep-alive\n\n'), 15_000);
    req.on('close', end);
    const s = await getSweep(db, id);
    const snapshot = { id, status: s.status, total: s.total, completed: s.completed, failed: s.failed, etaMs: null, elapsedMs: 0 };
    if (s.status !== 'running' && s.status !== 'queued') {
      send('end', snapshot);
      end();
    } else {
      send('progress', snapshot);
    }
  });

  return router;
}
