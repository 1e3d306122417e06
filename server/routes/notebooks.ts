/**
 * Notebook routes: parse, authorize through the one role middleware, call the service.
 */
import { Router, type Request } from 'express';
import type { AppDeps } from '../deps';
import { authorize, groupFromParam } from '../auth/authorize';
import { forbidden } from '../http/errors';
import { parseBody, parseParams, parseQuery } from '../http/validate';
import {
  CopyNotebookBody,
  CreateNotebookBody,
  ListNotebooksQuery,
  NotebookIdParams,
  NotebookVersionParams,
  RestoreNotebookBody,
  SaveNotebookBody,
  type ListNotebooksResponse,
  type ListVersionsResponse,
  type NotebookDetailResponse,
  type NotebookResponse,
  type VersionResponse,
} from '../../shared/schemas/notebooks';
import * as notebooks from '../services/notebooks';

const roleRank = { viewer: 0, editor: 1, owner: 2 } as const;

export function notebooksRouter(deps: AppDeps): Router {
  const { db } = deps;
  const router = Router();

  // A malformed id means "no such notebook" to authorize (404), never a database error.
  const notebookOf = (req: Request) => {
    const id = Number(req.params.id);
    return Number.isInteger(id) && id > 0 ? notebooks.notebookGroupId(db, id) : undefined;
  };

  router.get('/groups/:groupId/notebooks', authorize('viewer', groupFromParam('groupId')), async (req, res) => {
    const query = parseQuery(ListNotebooksQuery, req);
    const body: ListNotebooksResponse = { notebooks: await notebooks.listNotebooks(db, req.groupId!, query) };
    res.json(body);
  });

  router.post('/groups/:groupId/notebooks', authorize('editor', groupFromParam('groupId')), async (req, res) => {
    const input = parseBody(CreateNotebookBody, req);
    const notebook = await notebooks.createNotebook(db, { groupId: req.groupId!, userId: req.user!.id, ...input });
    const body: NotebookResponse = { notebook };
    res.status(201).json(body);
  });

  router.get('/notebooks/:id', authorize('viewer', notebookOf), async (req, res) => {
    const { id } = parseParams(NotebookIdParams, req);
    const notebook = await notebooks.getNotebook(db, id);
    const lastRuns = await notebooks.lastRunsByBlock(db, id, notebook.blocks.map((b) => b.id));
    const role = req.groupRole ?? 'viewer';
    const body: NotebookDetailResponse = { notebook, lastRuns, canEdit: roleRank[role] >= roleRank.editor };
    res.json(body);
  });

  router.put('/notebooks/:id', authorize('editor', notebookOf), async (req, res) => {
    const { id } = parseParams(NotebookIdParams, req);
    const input = parseBody(SaveNotebookBody, req);
    const notebook = await notebooks.saveNotebook(db, { id, userId: req.user!.id, ...input });
    const body: NotebookResponse = { notebook };
    res.json(body);
  });

  router.get('/notebooks/:id/versions', authorize('viewer', notebookOf), async (req, res) => {
    const { id } = parseParams(NotebookIdParams, req);
    const body: ListVersionsResponse = { versions: await notebooks.listVersions(db, id) };
    res.json(body);
  });

  router.get('/notebooks/:id/versions/:n', authorize('viewer', notebookOf), async (req, res) => {
    const { id, n } = parseParams(NotebookVersionParams, req);
    const body: VersionResponse = { version: await notebooks.getVersion(db, id, n) };
    res.json(body);
  });

  router.post('/notebooks/:id/restore', authorize('editor', notebookOf), async (req, res) => {
    const { id } = parseParams(NotebookIdParams, req);
    const { version } = parseBody(RestoreNotebookBody, req);
    const body: NotebookResponse = { notebook: await notebooks.restoreVersion(db, { id, userId: req.user!.id, version }) };
    res.json(body);
  });

  // Two groups are involved: the caller reads the source (viewer+) and writes into the target (editor+).
  // The target check reuses the same middleware, so the membership rule is the one used everywhere.
  router.post(
    '/notebooks/:id/copy',
    authorize('viewer', notebookOf),
    (req, res, next) => {
      res.locals.sourceGroupId = req.groupId;
      res.locals.copyBody = parseBody(CopyNotebookBody, req);
      next();
    },
    authorize('editor', (_req, res) => (res.locals.copyBody as CopyNotebookBody).groupId),
    async (req, res) => {
      const { id } = parseParams(NotebookIdParams, req);
      const input = res.locals.copyBody as CopyNotebookBody;
      const notebook = await notebooks.copyNotebook(db, { id, userId: req.user!.id, targetGroupId: input.groupId, title: input.title });
      const body: NotebookResponse = { notebook };
      res.status(201).json(body);
    },
  );

  router.delete('/notebooks/:id', authorize('viewer', notebookOf), async (req, res) => {
    const { id } = parseParams(NotebookIdParams, req);
    const row = await notebooks.getNotebookRow(db, id);
    const role = req.groupRole ?? 'viewer';
    const isGroupOwner = role === 'owner';
    // The notebook's own author may delete it only while they can still edit in the group.
    const isNotebookOwner = row.owner_id === req.user!.id && roleRank[role] >= roleRank.editor;
    if (!isGroupOwner && !isNotebookOwner) throw forbidden('Only the group owner or the notebook owner can delete a notebook');
    await notebooks.deleteNotebook(db, { id, userId: req.user!.id });
    res.status(204).end();
  });

  return router;
}
