/**
 * API shapes of notebooks and their versions. The server parses every body and query with these;
 * the client imports the inferred types, so both ends agree on one definition.
 */
import { z } from 'zod';
import type { Run } from './runs';

/** Caps chosen so one notebook stays a comfortable single SQLite row (common practice, not a hard limit of SQLite). */
export const NOTEBOOK_LIMITS = {
  maxBlocks: 200,
  maxBlockSourceChars: 100_000,
  maxTitleChars: 200,
  maxMessageChars: 500,
  maxBlockIdChars: 64,
} as const;

export const blockKinds = ['script', 'note'] as const;
export const BlockKind = z.enum(blockKinds);
export type BlockKind = z.infer<typeof BlockKind>;

export const Block = z.object({
  id: z
    .string()
    .min(1, 'block id must not be empty')
    .max(NOTEBOOK_LIMITS.maxBlockIdChars, `block id must be at most ${NOTEBOOK_LIMITS.maxBlockIdChars} characters`)
    .regex(/^[A-Za-z0-9_-]+$/, 'block id may contain only letters, digits, "-" and "_"'),
  kind: BlockKind,
  source: z
    .string()
    .max(NOTEBOOK_LIMITS.maxBlockSourceChars, `block source must be at most ${NOTEBOOK_LIMITS.maxBlockSourceChars} characters`),
});
export type Block = z.infer<typeof Block>;

/** Blocks in order; ids must be unique so runs can be attached to a block across versions. */
export const Blocks = z
  .array(Block)
  .max(NOTEBOOK_LIMITS.maxBlocks, `a notebook may hold at most ${NOTEBOOK_LIMITS.maxBlocks} blocks`)
  .superRefine((blocks, ctx) => {
    const seen = new Set<string>();
    blocks.forEach((b, i) => {
      if (seen.has(b.id)) {
        ctx.addIssue({ code: 'custom', message: `block id "${b.id}" is used twice`, path: [i, 'id'] });
      }
      seen.add(b.id);
    });
  });

export const NotebookTitle = z
  .string()
  .trim()
  .min(1, 'title must not be empty')
  .max(NOTEBOOK_LIMITS.maxTitleChars, `title must be at most ${NOTEBOOK_LIMITS.maxTitleChars} characters`);

const VersionMessage = z
  .string()
  .trim()
  .max(NOTEBOOK_LIMITS.maxMessageChars, `message must be at most ${NOTEBOOK_LIMITS.maxMessageChars} characters`);

const PositiveInt = z.coerce.number().int().positive();

// ---- requests -----------------------------------------------------------------------------

export const notebookSorts = ['updated', 'title', 'owner'] as const;

export const ListNotebooksQuery = z.object({
  q: z.string().trim().max(200).optional(),
  sort: z.enum(notebookSorts).default('updated'),
  order: z.enum(['asc', 'desc']).optional(),
});
export type ListNotebooksQuery = z.infer<typeof ListNotebooksQuery>;

export const CreateNotebookBody = z.object({
  title: NotebookTitle,
  blocks: Blocks.optional(),
});
export type CreateNotebookBody = z.infer<typeof CreateNotebookBody>;

export const SaveNotebookBody = z.object({
  blocks: Blocks,
  baseVersion: z.number().int().positive(),
  message: VersionMessage.optional(),
  title: NotebookTitle.optional(),
});
export type SaveNotebookBody = z.infer<typeof SaveNotebookBody>;

export const RestoreNotebookBody = z.object({ version: z.number().int().positive() });
export type RestoreNotebookBody = z.infer<typeof RestoreNotebookBody>;

export const CopyNotebookBody = z.object({ groupId: z.number().int().positive(), title: NotebookTitle.optional() });
export type CopyNotebookBody = z.infer<typeof CopyNotebookBody>;

export const NotebookIdParams = z.object({ id: PositiveInt });
export const NotebookVersionParams = z.object({ id: PositiveInt, n: PositiveInt });
export const GroupIdParams = z.object({ groupId: PositiveInt });

// ---- responses ----------------------------------------------------------------------------

export interface NotebookListItem {
  id: number;
  title: string;
  ownerId: number;
  ownerName: string;
  version: number;
  updatedAt: string;
  updatedByName: string;
}

export interface Notebook {
  id: number;
  groupId: number;
  title: string;
  version: number;
  blocks: Block[];
  ownerId: number;
  ownerName: string;
  createdAt: string;
  updatedAt: string;
}

/** The last run of one block: the stored run as the runs API returns it (outputs included). */
export type BlockRunSummary = Run;

export interface NotebookVersionSummary {
  n: number;
  title: string;
  message: string;
  createdAt: string;
  authorName: string;
}

export interface NotebookVersion extends NotebookVersionSummary {
  blocks: Block[];
}

export interface ListNotebooksResponse { notebooks: NotebookListItem[] }
export interface NotebookResponse { notebook: Notebook }
export interface NotebookDetailResponse {
  notebook: Notebook;
  /** The latest run of each block that has one, keyed by block id (outputs included). */
  lastRuns: Record<string, BlockRunSummary>;
  canEdit: boolean;
}
export interface ListVersionsResponse { versions: NotebookVersionSummary[] }
export interface VersionResponse { version: NotebookVersion }

/** Body of the 409 answer to a save on a stale base version. */
export interface StaleVersionError {
  error: { code: 'stale_version'; message: string; currentVersion: number };
}

/** File format of examples/notebooks/*.json. */
export const NotebookExample = z.object({
  title: NotebookTitle,
  /** E-mail of the demo member who owns the seeded notebook. */
  owner: z.email().optional(),
  /** Message of the seeded first version. */
  message: VersionMessage.optional(),
  blocks: Blocks,
});
export type NotebookExample = z.infer<typeof NotebookExample>;
