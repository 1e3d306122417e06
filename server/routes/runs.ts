/**
 * Runs: start one (waits for it), read one, list a page, cancel one. Group runs are read through the
 * one role middleware; a run without a group is its author's alone (and a site admin's).
 */
import { Router, type NextFunction, type Request, type Response } from 'express';
import type { AppDeps } from '../deps';
import { authorize } from '../auth/authorize';
import { requireUser } from '../auth/requireUser';
import { forbidden, notFound } from '../http/errors';
import { parseBody, parseParams, parseQuery } from '../http/validate';
import { CreateRunSchema, ListRunsQuerySchema, RunIdParamsSchema, type RunListResponse, type RunResponse } from '../../shared/schemas/runs';
import { cancelRun, checkNotebookInGroup, executeRun, getRun, listRuns, notebookGroupId, runOwnership } from '../services/runs';

export function runsRouter(deps: AppDeps): Router {
  const { db } = deps;
  const r = Router();

  /** Readers of a run: members of its group (viewer+), or its author when it has no group. */
  const canRead = async (req: Request, res: Response, next: NextFunction) => {
    const { id } = parseParams(RunIdParamsSchema, req);
    const own = await runOwnership(db, id);
    if (own && own.groupId !== null) return authorize('viewer', () => own.groupId!)(req, res, next);
    return requireUser(req, res, (err?: unknown) => {
      if (err) return next(err);
      if (!own || (own.userId !== req.user!.id && req.user!.role !== 'admin')) return next(notFound('Run'));
      next();
    });
  };

  r.post(
    '/runs',
    requireUser,
    async (req, _res, next) => {
      const body = parseBody(CreateRunSchema, req);
      req.body = body;
      // Viewers read and run (they cannot save): a run is the caller's own record, it changes no
      // notebook, recipe or dataset of the group.
      if (body.groupId !== undefined) return authorize('viewer', () => body.groupId)(req, _res, next);
      next();
    },
    async (req, res) => {
      const body = parseBody(CreateRunSchema, req);
      if (body.notebookId !== undefined) await checkNotebookInGroup(db, body.notebookId, body.groupId ?? null);
      const run = await executeRun(deps, {
        userId: req.user!.id,
        groupId: body.groupId ?? null,
        source: body.source,
        language: body.language,
        params: body.params,
        seed: body.seed,
        notebookId: body.notebookId,
        notebookVersion: body.notebookVersion,
        blockId: body.blockId,
      });
      const out: RunResponse = { run };
      res.status(201).json(out);
    },
  );

  r.get(
    '/runs',
    requireUser,
    async (req, res, next) => {
      const q = parseQuery(ListRunsQuerySchema, req);
      if (q.groupId !== undefined) return authorize('viewer', () => q.groupId)(req, res, next);
      if (q.notebookId !== undefined) return authorize('viewer', () => notebookGroupId(db, q.notebookId!))(req, res, next);
      next();
    },
    async (req, res) => {
      const q = parseQuery(ListRunsQuerySchema, req);
      const scope = req.groupId !== undefined ? { groupId: req.groupId } : { userId: req.user!.id };
      const out: RunListResponse = await listRuns(db, q, scope);
      res.json(out);
    },
  );

  r.get('/runs/:id', canRead, async (req, res) => {
    const { id } = parseParams(RunIdParamsSchema, req);
    const run = await getRun(db, id);
    if (!run) throw notFound('Run');
    const out: RunResponse = { run };
    res.json(out);
  });

  r.post('/runs/:id/cancel', canRead, async (req, res) => {
    const { id } = parseParams(RunIdParamsSchema, req);
    const own = await runOwnership(db, id);
    if (!own) throw notFound('Run');
    // Readers may look; only the author (or a group owner, or a site admin) may stop someone's run.
    const mayStop = own.userId === req.user!.id || req.user!.role === 'admin' || req.groupRole === 'owner';
    if (!mayStop) throw forbidden('Only the author of a run or an owner of its group can cancel it.');
    const run = await cancelRun(db, id);
    if (!run) throw notFound('Run');
    const out: RunResponse = { run };
    res.json(out);
  });

  return r;
}
