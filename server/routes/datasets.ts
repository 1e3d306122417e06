/**
 * Dataset routes: parse, authorize through the one role middleware, call the service.
 */
import { Router, type Request, type RequestHandler } from 'express';
import multer from 'multer';
import type { AppDeps } from '../deps';
import { authorize, groupFromParam } from '../auth/authorize';
import { AppError } from '../http/errors';
import { parseBody, parseParams, parseQuery } from '../http/validate';
import {
  DATASET_MAX_BYTES,
  DatasetCopyBody,
  DatasetGetQuery,
  DatasetIdParams,
  DatasetUploadFields,
  type DatasetListResponse,
  type DatasetResponse,
  type DatasetVersionsResponse,
} from '../../shared/schemas/datasets';
import * as datasets from '../services/datasets';
import { CsvProblem, decodeUtf8 } from '../services/csv';

const MB = (DATASET_MAX_BYTES / (1024 * 1024)).toFixed(0);

/** Multer's own errors become the API's {error:{code,message,field}} instead of a bare 500. */
function uploadFiles(): RequestHandler {
  const handler = multer({
    storage: multer.memoryStorage(),
    limits: { fileSize: DATASET_MAX_BYTES, files: 2, fields: 10, fieldSize: 16 * 1024, parts: 14 },
  }).fields([
    { name: 'file', maxCount: 1 },
    { name: 'covariance', maxCount: 1 },
  ]);
  return (req, res, next) => {
    handler(req, res, (err: unknown) => {
      if (!err) return next();
      if (err instanceof multer.MulterError) {
        const field = err.field;
        switch (err.code) {
          case 'LIMIT_FILE_SIZE':
            return next(new AppError(413, 'file_too_large', `The ${field === 'covariance' ? 'covariance file' : 'file'} is larger than the ${MB} MB limit for uploads.`, { field: field ?? 'file' }));
          case 'LIMIT_UNEXPECTED_FILE':
            return next(new AppError(400, 'unexpected_file', `Unexpected file part "${field}"; send the table as "file" and an optional covariance matrix as "covariance".`, { field }));
          default:
            return next(new AppError(400, 'bad_upload', `The upload was refused: ${err.message}.`, field ? { field } : {}));
        }
      }
      next(err);
    });
  };
}

function textOf(file: Express.Multer.File, field: 'file' | 'covariance'): string {
  try {
    return decodeUtf8(file.buffer, field === 'file' ? 'file' : 'covariance file');
  } catch (e) {
    if (e instanceof CsvProblem) throw new AppError(400, e.code, e.message, { field });
    throw e;
  }
}

export function datasetsRouter(deps: AppDeps): Router {
  const { db } = deps;
  const router = Router();

  // A malformed id means "no such dataset" to authorize (404), never a database error.
  const datasetOf = (req: Request) => datasets.datasetGroupId(db, Number(req.params.id));

  router.get('/groups/:groupId/datasets', authorize('viewer', groupFromParam('groupId')), async (req, res) => {
    const body: DatasetListResponse = { datasets: await datasets.listDatasets(db, req.groupId!) };
    res.json(body);
  });

  router.post('/groups/:groupId/datasets', authorize('editor', groupFromParam('groupId')), uploadFiles(), async (req, res) => {
    const fields = parseBody(DatasetUploadFields, req);
    const files = (req.files ?? {}) as Record<string, Express.Multer.File[] | undefined>;
    const file = files.file?.[0];
    if (!file) throw new AppError(400, 'file_required', 'Send the table as a multipart/form-data part named "file" (a CSV with a header row).', { field: 'file' });
    const cov = files.covariance?.[0];
    const dataset = await datasets.uploadDataset(db, {
      groupId: req.groupId!,
      userId: req.user!.id,
      name: fields.name,
      kind: fields.kind,
      description: fields.description,
      csvText: textOf(file, 'file'),
      covarianceText: cov ? textOf(cov, 'covariance') : undefined,
    });
    const body: DatasetResponse = { dataset };
    res.status(201).json(body);
  });

  router.get('/datasets/:id', authorize('viewer', datasetOf), async (req, res) => {
    const { id } = parseParams(DatasetIdParams, req);
    const q = parseQuery(DatasetGetQuery, req);
    const body: DatasetResponse = { dataset: await datasets.getDataset(db, id, { version: q.version, covariance: q.covariance === '1' || q.covariance === 'true' }) };
    res.json(body);
  });

  router.get('/datasets/:id/versions', authorize('viewer', datasetOf), async (req, res) => {
    const { id } = parseParams(DatasetIdParams, req);
    const body: DatasetVersionsResponse = { versions: await datasets.listVersions(db, id) };
    res.json(body);
  });

  router.get('/datasets/:id/csv', authorize('viewer', datasetOf), async (req, res) => {
    const { id } = parseParams(DatasetIdParams, req);
    const q = parseQuery(DatasetGetQuery, req);
    const { filename, text } = await datasets.datasetCsv(db, id, q.version);
    res.type('text/csv; charset=utf-8').attachment(filename).send(text);
  });

  // Two groups are involved: the caller reads the source (viewer+) and writes into the target (editor+),
  // both through the same middleware. The target check runs first; the source check runs last so that
  // req.groupId ends as the source group.
  router.post(
    '/datasets/:id/copy',
    authorize('editor', (req) => parseBody(DatasetCopyBody, req).groupId),
    authorize('viewer', datasetOf),
    async (req, res) => {
      const { id } = parseParams(DatasetIdParams, req);
      const input = parseBody(DatasetCopyBody, req);
      const body: DatasetResponse = {
        dataset: await datasets.copyDataset(db, { id, userId: req.user!.id, targetGroupId: input.groupId, name: input.name, version: input.version }),
      };
      res.status(201).json(body);
    },
  );

  router.delete('/datasets/:id', authorize('editor', datasetOf), async (req, res) => {
    const { id } = parseParams(DatasetIdParams, req);
    await datasets.deleteDataset(db, { id, userId: req.user!.id });
    res.status(204).end();
  });

  return router;
}
