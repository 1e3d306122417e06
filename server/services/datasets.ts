/**
 * Datasets: checked numeric tables a group's scripts read by name. Every upload, copy and delete is one
 * transaction with its audit entry, so a refused or failed request leaves nothing behind.
 */
import type { Knex } from 'knex';
import { audit } from './audit';
import { AppError, conflict, notFound } from '../http/errors';
import { CsvProblem, parseCovarianceCsv, parseDatasetCsv, tableToCsv } from './csv';
import type { DatasetTable } from '../sandbox/types';
import type {
  DatasetColumn,
  DatasetDetail,
  DatasetKind,
  DatasetSummary,
  DatasetVersionSummary,
} from '../../shared/schemas/datasets';
import { groupIdOf } from '../db/groupOf';
import { latestVersionsOf } from '../db/latestVersion';

/**
 * What a script sees for `dataset('name')` is the sandbox's DatasetTable: columns in file order, each
 * with its values (for the three measurement kinds the required columns carry the canonical names
 * z, mu | H | fsigma8, sigma), and the covariance when one was uploaded (n×n, same row order).
 */
export type { DatasetTable };

interface DatasetRow {
  id: number;
  group_id: number;
  name: string;
  latest_version: number;
  created_at: string;
  created_by: number | null;
  updated_at: string;
}

interface VersionRow {
  id: number;
  dataset_id: number;
  version: number;
  kind: DatasetKind;
  description: string;
  columns_json: string;
  rows_json: string;
  row_count: number;
  csv_text: string;
  covariance_json: string | null;
  covariance_csv: string | null;
  copied_from_dataset_id: number | null;
  copied_from_version: number | null;
  created_at: string;
  created_by: number | null;
}

const now = (): string => new Date().toISOString();

/** A CSV refusal as the API's 400: code, message, and where (field, row, column). */
function fileError(p: CsvProblem, field: 'file' | 'covariance'): AppError {
  const extra: Record<string, unknown> = { field };
  if (p.row !== undefined) extra.row = p.row;
  if (p.column !== undefined) extra.column = p.column;
  if (p.columnName !== undefined) extra.columnName = p.columnName;
  const text = field === 'covariance' && !p.message.startsWith('covariance') ? `covariance file: ${p.message}` : p.message;
  return new AppError(400, p.code, sentence(text), extra);
}

function sentence(s: string): string {
  const t = s.charAt(0).toUpperCase() + s.slice(1);
  return /[.!?]$/.test(t) ? t : `${t}.`;
}

/** The group a dataset belongs to, or undefined when there is none (for authorize's 404). */
export const datasetGroupId = (db: Knex, id: number): Promise<number | undefined> => groupIdOf(db, 'datasets', id);

export async function listDatasets(db: Knex, groupId: number): Promise<DatasetSummary[]> {
  const rows = (await latestVersionsOf(db, 'datasets', groupId)
    .leftJoin('users as u', 'u.id', 'v.created_by')
    .orderBy('d.name', 'asc')
    .select(
      'd.id',
      'd.name',
      'd.latest_version as version',
      'v.kind',
      'v.row_count',
      'v.description',
      'v.created_at',
      'v.created_by',
      'u.name as created_by_name',
      db.raw('v.covariance_json IS NOT NULL as has_cov'),
    )) as {
    id: number;
    name: string;
    version: number;
    kind: DatasetKind;
    row_count: number;
    description: string;
    created_at: string;
    created_by: number | null;
    created_by_name: string | null;
    has_cov: number;
  }[];
  return rows.map((r) => ({
    id: r.id,
    name: r.name,
    kind: r.kind,
    version: r.version,
    rowCount: r.row_count,
    description: r.description,
    hasCovariance: Boolean(r.has_cov),
    createdAt: r.created_at,
    createdBy: { id: r.created_by, name: r.created_by_name },
  }));
}

export interface UploadInput {
  groupId: number;
  userId: number | null;
  name: string;
  kind: DatasetKind;
  description?: string;
  csvText: string;
  covarianceText?: string;
}

/** Parse and check both files before touching the database; the stored version is all or nothing. */
export function checkUpload(kind: DatasetKind, csvText: string, covarianceText?: string) {
  let table;
  try {
    table = parseDatasetCsv(csvText, kind);
  } catch (e) {
    if (e instanceof CsvProblem) throw fileError(e, 'file');
    throw e;
  }
  let covariance: number[][] | undefined;
  if (covarianceText !== undefined) {
    try {
      covariance = parseCovarianceCsv(covarianceText, table.rows.length);
    } catch (e) {
      if (e instanceof CsvProblem) throw fileError(e, 'covariance');
      throw e;
    }
  }
  return { ...table, covariance };
}

/**
 * Store an upload: a new dataset at version 1, or, when the group already has a dataset of that name,
 * its next immutable version. A new version without a description keeps the previous one's.
 */
export async function uploadDataset(db: Knex, input: UploadInput): Promise<DatasetDetail> {
  const checked = checkUpload(input.kind, input.csvText, input.covarianceText);
  const { id, version } = await db.transaction(async (trx) => {
    const at = now();
    const existing = await trx<DatasetRow>('datasets').where({ group_id: input.groupId, name: input.name }).first();
    let datasetId: number;
    let version: number;
    let description = input.description ?? '';
    if (existing) {
      datasetId = existing.id;
      version = existing.latest_version + 1;
      if (input.description === undefined) {
        const prev = await trx<VersionRow>('dataset_versions').where({ dataset_id: datasetId, version: existing.latest_version }).first('description');
        description = prev?.description ?? '';
      }
      await trx('datasets').where({ id: datasetId }).update({ latest_version: version, updated_at: at });
    } else {
      version = 1;
      const [row] = await trx('datasets')
        .insert({ group_id: input.groupId, name: input.name, latest_version: 1, created_at: at, created_by: input.userId, updated_at: at })
        .returning('id');
      datasetId = typeof row === 'object' ? (row as { id: number }).id : (row as number);
    }
    await trx('dataset_versions').insert({
      dataset_id: datasetId,
      version,
      kind: input.kind,
      description,
      columns_json: JSON.stringify(checked.columns),
      rows_json: JSON.stringify(checked.rows),
      row_count: checked.rows.length,
      csv_text: input.csvText,
      covariance_json: checked.covariance ? JSON.stringify(checked.covariance) : null,
      covariance_csv: input.covarianceText ?? null,
      created_at: at,
      created_by: input.userId,
    });
    await audit(trx, {
      userId: input.userId,
      action: version === 1 ? 'dataset.create' : 'dataset.version',
      target: `dataset:${datasetId}`,
      details: { groupId: input.groupId, name: input.name, kind: input.kind, version, rowCount: checked.rows.length, covariance: Boolean(checked.covariance) },
    });
    return { id: datasetId, version };
  });
  return getDataset(db, id, { version });
}

async function loadVersion(db: Knex, id: number, version?: number): Promise<{ ds: DatasetRow; v: VersionRow }> {
  const ds = await db<DatasetRow>('datasets').where({ id }).first();
  if (!ds) throw notFound('Dataset');
  const n = version ?? ds.latest_version;
  const v = await db<VersionRow>('dataset_versions').where({ dataset_id: id, version: n }).first();
  if (!v) throw new AppError(404, 'not_found', `Dataset "${ds.name}" has no version ${n} (latest is ${ds.latest_version}).`, { field: 'version' });
  return { ds, v };
}

export async function getDataset(db: Knex, id: number, opts: { version?: number; covariance?: boolean } = {}): Promise<DatasetDetail> {
  const { ds, v } = await loadVersion(db, id, opts.version);
  const author = v.created_by ? await db('users').where({ id: v.created_by }).first('name') : undefined;
  const detail: DatasetDetail = {
    id: ds.id,
    groupId: ds.group_id,
    name: ds.name,
    kind: v.kind,
    version: v.version,
    latestVersion: ds.latest_version,
    description: v.description,
    columns: JSON.parse(v.columns_json) as DatasetColumn[],
    rows: JSON.parse(v.rows_json) as number[][],
    rowCount: v.row_count,
    hasCovariance: v.covariance_json !== null,
    createdAt: v.created_at,
    createdBy: { id: v.created_by, name: (author as { name?: string } | undefined)?.name ?? null },
  };
  if (opts.covariance && v.covariance_json) detail.covariance = JSON.parse(v.covariance_json) as number[][];
  return detail;
}

export async function listVersions(db: Knex, id: number): Promise<DatasetVersionSummary[]> {
  const ds = await db<DatasetRow>('datasets').where({ id }).first();
  if (!ds) throw notFound('Dataset');
  const rows = (await db('dataset_versions as v')
    .leftJoin('users as u', 'u.id', 'v.created_by')
    .where('v.dataset_id', id)
    .orderBy('v.version', 'desc')
    .select('v.*', 'u.name as created_by_name')) as (VersionRow & { created_by_name: string | null })[];
  return rows.map((v) => ({
    version: v.version,
    kind: v.kind,
    rowCount: v.row_count,
    description: v.description,
    hasCovariance: v.covariance_json !== null,
    createdAt: v.created_at,
    createdBy: { id: v.created_by, name: v.created_by_name },
    copiedFrom: v.copied_from_dataset_id !== null && v.copied_from_version !== null ? { datasetId: v.copied_from_dataset_id, version: v.copied_from_version } : null,
  }));
}

/** The uploaded CSV exactly as it was sent, for download. */
export async function datasetCsv(db: Knex, id: number, version?: number): Promise<{ filename: string; text: string }> {
  const { ds, v } = await loadVersion(db, id, version);
  return { filename: `${ds.name}-v${v.version}.csv`, text: v.csv_text || tableToCsv(JSON.parse(v.columns_json) as DatasetColumn[], JSON.parse(v.rows_json) as number[][]) };
}

/** A copy starts a fresh history in the target group; its version 1 records where it came from. */
export async function copyDataset(
  db: Knex,
  input: { id: number; userId: number; targetGroupId: number; name?: string; version?: number },
): Promise<DatasetDetail> {
  const { ds, v } = await loadVersion(db, input.id, input.version);
  const name = input.name ?? ds.name;
  const newId = await db.transaction(async (trx) => {
    const clash = await trx('datasets').where({ group_id: input.targetGroupId, name }).first('id');
    if (clash) {
      throw new AppError(409, 'name_taken', `The target group already has a dataset named "${name}"; pass another "name" for the copy.`, { field: 'name' });
    }
    const at = now();
    const [row] = await trx('datasets')
      .insert({ group_id: input.targetGroupId, name, latest_version: 1, created_at: at, created_by: input.userId, updated_at: at })
      .returning('id');
    const id = typeof row === 'object' ? (row as { id: number }).id : (row as number);
    const { id: _vid, dataset_id: _d, version: _n, created_at: _c, created_by: _b, copied_from_dataset_id: _cf, copied_from_version: _cv, ...content } = v;
    await trx('dataset_versions').insert({
      ...content,
      dataset_id: id,
      version: 1,
      copied_from_dataset_id: ds.id,
      copied_from_version: v.version,
      created_at: at,
      created_by: input.userId,
    });
    await audit(trx, {
      userId: input.userId,
      action: 'dataset.copy',
      target: `dataset:${id}`,
      details: { fromDatasetId: ds.id, fromVersion: v.version, fromGroupId: ds.group_id, groupId: input.targetGroupId, name },
    });
    return id;
  });
  return getDataset(db, newId);
}

/** Deletes the dataset with all its versions; the audit entry keeps what was removed. */
export async function deleteDataset(db: Knex, input: { id: number; userId: number }): Promise<void> {
  await db.transaction(async (trx) => {
    const ds = await trx<DatasetRow>('datasets').where({ id: input.id }).first();
    if (!ds) throw notFound('Dataset');
    await trx('datasets').where({ id: input.id }).delete();
    await audit(trx, {
      userId: input.userId,
      action: 'dataset.delete',
      target: `dataset:${ds.id}`,
      details: { groupId: ds.group_id, name: ds.name, versions: ds.latest_version },
    });
  });
}

/**
 * The latest versions of the named datasets of a group, for a run's `dataset('name')` calls. Names the
 * group does not have are left out: the sandbox then stops the run at that call, with its line and the
 * names the group has, which tells the member more than a refusal before the run could.
 */
export async function resolveDatasets(db: Knex, groupId: number, names: readonly string[]): Promise<Record<string, DatasetTable>> {
  const wanted = [...new Set(names)];
  const out: Record<string, DatasetTable> = {};
  if (wanted.length === 0) return out;
  const rows = (await latestVersionsOf(db, 'datasets', groupId)
    .whereIn('d.name', wanted)
    .select('d.name', 'v.version', 'v.kind', 'v.columns_json', 'v.rows_json', 'v.covariance_json')) as {
    name: string;
    version: number;
    kind: DatasetKind;
    columns_json: string;
    rows_json: string;
    covariance_json: string | null;
  }[];
  for (const r of rows) {
    const cols = JSON.parse(r.columns_json) as DatasetColumn[];
    const data = JSON.parse(r.rows_json) as number[][];
    const t: DatasetTable = { name: r.name, kind: r.kind, columns: cols.map((c, j) => ({ ...c, values: data.map((row) => row[j]) })) };
    if (r.covariance_json) t.cov = JSON.parse(r.covariance_json) as number[][];
    out[r.name] = t;
  }
  return out;
}
