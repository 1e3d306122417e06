import { z } from 'zod';

/**
 * Datasets: uploaded measurement tables a group's scripts read by name with `dataset('name')`.
 * The three measurement kinds are the ones the kernel's χ² likelihoods take; `table` is any numeric table.
 */

export const DATASET_KINDS = ['distance_modulus', 'hubble', 'fsigma8', 'table'] as const;
export const DatasetKind = z.enum(DATASET_KINDS);
export type DatasetKind = z.infer<typeof DatasetKind>;

/** The columns each measurement kind must have (matched case-insensitively, units in brackets allowed). */
export const REQUIRED_COLUMNS: Record<DatasetKind, readonly string[]> = {
  distance_modulus: ['z', 'mu', 'sigma'],
  hubble: ['z', 'H', 'sigma'],
  fsigma8: ['z', 'fsigma8', 'sigma'],
  table: [],
};

/** Largest upload accepted, for the data file and for the covariance file each. */
export const DATASET_MAX_BYTES = 5 * 1024 * 1024;

/** Names are used as string literals in scripts, so keep them slug-like and unambiguous. */
export const DatasetName = z
  .string()
  .trim()
  .min(1, 'name is required')
  .max(80, 'name must be at most 80 characters')
  .regex(/^[a-z0-9][a-z0-9._-]*$/, 'name may contain only lower-case letters, digits, ".", "_" and "-", and must start with a letter or digit');

/** The text fields of the multipart upload (the files travel as `file` and `covariance`). */
export const DatasetUploadFields = z.object({
  name: DatasetName,
  kind: DatasetKind,
  description: z.string().trim().max(2000, 'description must be at most 2000 characters').optional(),
});
export type DatasetUploadFields = z.infer<typeof DatasetUploadFields>;

export const DatasetColumn = z.object({ name: z.string(), unit: z.string().optional() });
export type DatasetColumn = z.infer<typeof DatasetColumn>;

export const DatasetSummary = z.object({
  id: z.number().int(),
  name: z.string(),
  kind: DatasetKind,
  version: z.number().int(),
  rowCount: z.number().int(),
  description: z.string(),
  hasCovariance: z.boolean(),
  createdAt: z.string(),
  createdBy: z.object({ id: z.number().int().nullable(), name: z.string().nullable() }),
});
export type DatasetSummary = z.infer<typeof DatasetSummary>;

export const DatasetDetail = z.object({
  id: z.number().int(),
  groupId: z.number().int(),
  name: z.string(),
  kind: DatasetKind,
  version: z.number().int(),
  latestVersion: z.number().int(),
  description: z.string(),
  columns: z.array(DatasetColumn),
  rows: z.array(z.array(z.number())),
  rowCount: z.number().int(),
  hasCovariance: z.boolean(),
  covariance: z.array(z.array(z.number())).optional(),
  createdAt: z.string(),
  createdBy: z.object({ id: z.number().int().nullable(), name: z.string().nullable() }),
});
export type DatasetDetail = z.infer<typeof DatasetDetail>;

export const DatasetVersionSummary = z.object({
  version: z.number().int(),
  kind: DatasetKind,
  rowCount: z.number().int(),
  description: z.string(),
  hasCovariance: z.boolean(),
  createdAt: z.string(),
  createdBy: z.object({ id: z.number().int().nullable(), name: z.string().nullable() }),
  copiedFrom: z.object({ datasetId: z.number().int(), version: z.number().int() }).nullable(),
});
export type DatasetVersionSummary = z.infer<typeof DatasetVersionSummary>;

export const DatasetGetQuery = z.object({
  version: z.coerce.number().int('version must be a whole number').positive('version must be ≥ 1').optional(),
  covariance: z.enum(['0', '1', 'true', 'false']).optional(),
});
export type DatasetGetQuery = z.infer<typeof DatasetGetQuery>;

export const DatasetCopyBody = z.object({
  groupId: z.number().int().positive(),
  /** Name in the target group; the source name when left out. */
  name: DatasetName.optional(),
  /** Version to copy; the latest when left out. */
  version: z.number().int().positive().optional(),
});
export type DatasetCopyBody = z.infer<typeof DatasetCopyBody>;

export const DatasetIdParams = z.object({ id: z.coerce.number().int().positive() });

export type DatasetListResponse = { datasets: DatasetSummary[] };
export type DatasetResponse = { dataset: DatasetDetail };
export type DatasetVersionsResponse = { versions: DatasetVersionSummary[] };
