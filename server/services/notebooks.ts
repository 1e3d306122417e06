/**
 * Notebooks: an ordered list of blocks with an immutable history of versions. Routes call these
 * functions after authorization; every write happens in one transaction with its audit entry.
 */
import type { Knex } from 'knex';
import { audit } from './audit';
import { AppError, notFound } from '../http/errors';
import { nowIso } from '../db/time';
import { getRun } from './runs';
import type { Run } from '../../shared/schemas/runs';
import type {
  Block,
  ListNotebooksQuery,
  Notebook,
  NotebookListItem,
  NotebookVersion,
  NotebookVersionSummary,
} from '../../shared/schemas/notebooks';
import { groupIdOf } from '../db/groupOf';

interface NotebookRow {
  id: number;
  group_id: number;
  title: string;
  owner_id: number;
  current_version: number;
  created_at: string;
  updated_at: string;
}

interface VersionRow {
  notebook_id: number;
  n: number;
  title: string;
  blocks: string;
  message: string;
  author_id: number;
  created_at: string;
}

function parseBlocks(json: string): Block[] {
  return JSON.parse(json) as Block[];
}

/** The group a notebook belongs to, or undefined when there is no such notebook (for authorize). */
export const notebookGroupId = (db: Knex, id: number): Promise<number | undefined> => groupIdOf(db, 'notebooks', id);

export async function getNotebookRow(db: Knex, id: number): Promise<NotebookRow> {
  const row = await db<NotebookRow>('notebooks').where({ id }).first();
  if (!row) throw notFound('Notebook');
  return row;
}

export async function listNotebooks(db: Knex, groupId: number, query: ListNotebooksQuery): Promise<NotebookListItem[]> {
  const order = query.order ?? (query.sort === 'updated' ? 'desc' : 'asc');
  const qb = db('notebooks as nb')
    .join('users as owner', 'owner.id', 'nb.owner_id')
    .join('notebook_versions as v', function joinCurrent() {
      this.on('v.notebook_id', '=', 'nb.id').andOn('v.n', '=', 'nb.current_version');
    })
    .join('users as author', 'author.id', 'v.author_id')
    .where('nb.group_id', groupId)
    .select(
      'nb.id',
      'nb.title',
      'nb.owner_id',
      'owner.name as owner_name',
      'nb.current_version',
      'nb.updated_at',
      'author.name as updated_by_name',
    );
  if (query.q) {
    // Escape LIKE wildcards so a search for "100%" means the text, not a pattern.
    const needle = `%${query.q.toLowerCase().replace(/[\\%_]/g, (c) => `\\${c}`)}%`;
    qb.where((w) => {
      w.whereRaw("lower(nb.title) LIKE ? ESCAPE '\\'", [needle]).orWhereRaw("lower(owner.name) LIKE ? ESCAPE '\\'", [needle]);
    });
  }
  const column = query.sort === 'title' ? 'nb.title' : query.sort === 'owner' ? 'owner.name' : 'nb.updated_at';
  if (query.sort === 'updated') qb.orderBy(column, order);
  else qb.orderByRaw(`lower(${column}) ${order === 'desc' ? 'DESC' : 'ASC'}`);
  qb.orderBy('nb.id', order);
  const rows = (await qb) as Array<{
    id: number;
    title: string;
    owner_id: number;
    owner_name: string;
    current_version: number;
    updated_at: string;
    updated_by_name: string;
  }>;
  return rows.map((r) => ({
    id: r.id,
    title: r.title,
    ownerId: r.owner_id,
    ownerName: r.owner_name,
    version: r.current_version,
    updatedAt: r.updated_at,
    updatedByName: r.updated_by_name,
  }));
}

async function toNotebook(db: Knex, row: NotebookRow): Promise<Notebook> {
  const version = await db<VersionRow>('notebook_versions').where({ notebook_id: row.id, n: row.current_version }).first();
  if (!version) throw new Error(`notebook ${row.id} has no version ${row.current_version}`);
  const owner = await db('users').where({ id: row.owner_id }).first('name');
  return {
    id: row.id,
    groupId: row.group_id,
    title: row.title,
    version: row.current_version,
    blocks: parseBlocks(version.blocks),
    ownerId: row.owner_id,
    ownerName: (owner?.name as string | undefined) ?? '',
    createdAt: row.created_at,
    updatedAt: row.updated_at,
  };
}

export async function getNotebook(db: Knex, id: number): Promise<Notebook> {
  return toNotebook(db, await getNotebookRow(db, id));
}

export interface CreateNotebookInput {
  groupId: number;
  userId: number;
  title: string;
  blocks?: Block[];
  message?: string;
  auditAction?: string;
  auditDetails?: Record<string, unknown>;
}

export async function createNotebook(db: Knex, input: CreateNotebookInput): Promise<Notebook> {
  const id = await db.transaction(async (trx) => {
    const at = nowIso();
    const [inserted] = await trx('notebooks')
      .insert({ group_id: input.groupId, title: input.title, owner_id: input.userId, current_version: 1, created_at: at, updated_at: at })
      .returning('id');
    const newId = typeof inserted === 'object' ? (inserted as { id: number }).id : (inserted as number);
    await trx('notebook_versions').insert({
      notebook_id: newId,
      n: 1,
      title: input.title,
      blocks: JSON.stringify(input.blocks ?? []),
      message: input.message ?? 'Created',
      author_id: input.userId,
      created_at: at,
    });
    await audit(trx, {
      userId: input.userId,
      action: input.auditAction ?? 'notebook.create',
      target: `notebook:${newId}`,
      details: { groupId: input.groupId, title: input.title, ...input.auditDetails },
    });
    return newId;
  });
  return getNotebook(db, id);
}

export interface SaveNotebookInput {
  id: number;
  userId: number;
  blocks: Block[];
  baseVersion: number;
  message?: string;
  title?: string;
  auditAction?: string;
  auditDetails?: Record<string, unknown>;
}

/**
 * Writes a new version on top of `baseVersion`. The compare-and-set on current_version and the
 * primary key (notebook_id, n) both refuse a second save on the same base, so of two concurrent
 * saves exactly one wins and the other gets 409 stale_version.
 */
export async function saveNotebook(db: Knex, input: SaveNotebookInput): Promise<Notebook> {
  await db.transaction(async (trx) => {
    const row = await trx<NotebookRow>('notebooks').where({ id: input.id }).first();
    if (!row) throw notFound('Notebook');
    if (row.current_version !== input.baseVersion) throw staleVersion(input.baseVersion, row.current_version);
    const n = row.current_version + 1;
    const at = nowIso();
    const title = input.title ?? row.title;
    const updated = await trx('notebooks')
      .where({ id: input.id, current_version: input.baseVersion })
      .update({ current_version: n, title, updated_at: at });
    if (updated !== 1) {
      const fresh = await trx<NotebookRow>('notebooks').where({ id: input.id }).first('current_version');
      throw staleVersion(input.baseVersion, fresh?.current_version ?? row.current_version);
    }
    await trx('notebook_versions').insert({
      notebook_id: input.id,
      n,
      title,
      blocks: JSON.stringify(input.blocks),
      message: input.message ?? '',
      author_id: input.userId,
      created_at: at,
    });
    await audit(trx, {
      userId: input.userId,
      action: input.auditAction ?? 'notebook.save',
      target: `notebook:${input.id}`,
      details: { version: n, baseVersion: input.baseVersion, blocks: input.blocks.length, ...input.auditDetails },
    });
  });
  return getNotebook(db, input.id);
}

/** 409 with its own code so the page can offer "reload" or "keep both" rather than a generic conflict. */
function staleVersion(baseVersion: number, currentVersion: number): AppError {
  return new AppError(
    409,
    'stale_version',
    `This notebook was saved by someone else since version ${baseVersion}; the current version is ${currentVersion}. Reload it or keep your copy.`,
    { currentVersion },
  );
}

export async function listVersions(db: Knex, id: number): Promise<NotebookVersionSummary[]> {
  const rows = (await db('notebook_versions as v')
    .join('users as u', 'u.id', 'v.author_id')
    .where('v.notebook_id', id)
    .orderBy('v.n', 'desc')
    .select('v.n', 'v.title', 'v.message', 'v.created_at', 'u.name as author_name')) as Array<{
    n: number;
    title: string;
    message: string;
    created_at: string;
    author_name: string;
  }>;
  return rows.map((r) => ({ n: r.n, title: r.title, message: r.message, createdAt: r.created_at, authorName: r.author_name }));
}

export async function getVersion(db: Knex, id: number, n: number): Promise<NotebookVersion> {
  const row = (await db('notebook_versions as v')
    .join('users as u', 'u.id', 'v.author_id')
    .where({ 'v.notebook_id': id, 'v.n': n })
    .first('v.n', 'v.title', 'v.blocks', 'v.message', 'v.created_at', 'u.name as author_name')) as
    | { n: number; title: string; blocks: string; message: string; created_at: string; author_name: string }
    | undefined;
  if (!row) throw notFound(`Version ${n} of notebook ${id}`);
  return {
    n: row.n,
    title: row.title,
    blocks: parseBlocks(row.blocks),
    message: row.message,
    createdAt: row.created_at,
    authorName: row.author_name,
  };
}

/** Restoring never rewrites history: it saves the old version's title and blocks as a new version. */
export async function restoreVersion(db: Knex, input: { id: number; userId: number; version: number }): Promise<Notebook> {
  const old = await getVersion(db, input.id, input.version);
  const row = await getNotebookRow(db, input.id);
  return saveNotebook(db, {
    id: input.id,
    userId: input.userId,
    blocks: old.blocks,
    title: old.title,
    baseVersion: row.current_version,
    message: `Restored version ${input.version}`,
    auditAction: 'notebook.restore',
    auditDetails: { restoredFrom: input.version },
  });
}

/** A copy starts a fresh history in the target group; its first version says where it came from. */
export async function copyNotebook(
  db: Knex,
  input: { id: number; userId: number; targetGroupId: number; title?: string },
): Promise<Notebook> {
  const source = await getNotebook(db, input.id);
  const group = await db('groups').where({ id: source.groupId }).first('name');
  const groupName = (group?.name as string | undefined) ?? `group ${source.groupId}`;
  return createNotebook(db, {
    groupId: input.targetGroupId,
    userId: input.userId,
    title: input.title ?? source.title,
    blocks: source.blocks,
    message: `Copied from "${source.title}" version ${source.version} in ${groupName}`,
    auditAction: 'notebook.copy',
    auditDetails: { fromNotebook: source.id, fromVersion: source.version, fromGroup: source.groupId },
  });
}

export async function deleteNotebook(db: Knex, input: { id: number; userId: number }): Promise<void> {
  await db.transaction(async (trx) => {
    const row = await trx<NotebookRow>('notebooks').where({ id: input.id }).first();
    if (!row) throw notFound('Notebook');
    // Runs keep their provenance (notebook id and version) even after the notebook is gone.
    await trx('notebook_versions').where({ notebook_id: input.id }).delete();
    await trx('notebooks').where({ id: input.id }).delete();
    await audit(trx, {
      userId: input.userId,
      action: 'notebook.delete',
      target: `notebook:${input.id}`,
      details: { groupId: row.group_id, title: row.title, versions: row.current_version },
    });
  });
}

/**
 * The latest run of each block of a notebook, in the same shape the runs API answers, so the page
 * can show stored results without re-running. With `blockIds`, only those blocks (a deleted block's
 * old runs stay in the run history but not on the page). The `runs` table belongs to the sandbox
 * part; a database without it simply has no runs to show.
 */
export async function lastRunsByBlock(db: Knex, notebookId: number, blockIds?: readonly string[]): Promise<Record<string, Run>> {
  if (!(await db.schema.hasTable('runs'))) return {};
  if (blockIds && blockIds.length === 0) return {};
  const latest = (await db('runs')
    .where('notebook_id', notebookId)
    .modify((q) => (blockIds ? q.whereIn('block_id', blockIds) : q.whereNotNull('block_id')))
    .groupBy('block_id')
    .select('block_id', db.raw('max(id) as id'))) as Array<{ block_id: string; id: number }>;
  const out: Record<string, Run> = {};
  for (const { block_id, id } of latest) {
    const run = await getRun(db, id);
    if (run) out[block_id] = run;
  }
  return out;
}
