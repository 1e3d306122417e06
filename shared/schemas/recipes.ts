import { z } from 'zod';
import { ParamDeclarationSchema } from './outputs';

/**
 * Recipes: saved scripts whose inputs are declared in the source with
 * `param(name, {default, min, max, unit?, label?})`. The declarations are read from the source when a
 * version is saved (literal arguments only) and stored with that version, so the form and the input
 * checks never need to run the script.
 */

export const RecipeName = z
  .string()
  .trim()
  .min(1, 'name is required')
  .max(80, 'name must be at most 80 characters')
  .regex(/^[a-z0-9][a-z0-9-]*$/, 'name must be slug-like: lower-case letters, digits and "-", starting with a letter or digit');

export const RecipeLanguage = z.enum(['ts', 'js']);
export type RecipeLanguage = z.infer<typeof RecipeLanguage>;

/**
 * A declaration as read statically from a saved source: what a run reports for `param()` (its
 * `default` is required, because a run that leaves the input out takes it), plus where it sits.
 */
export const ParamDeclaration = ParamDeclarationSchema.extend({
  /** Where the declaration sits in the source (1-based), for error messages and the editor. */
  line: z.number().int(),
  column: z.number().int(),
});
export type ParamDeclaration = z.infer<typeof ParamDeclaration>;

const Source = z.string().min(1, 'source is required').max(200_000, 'source must be at most 200 000 characters');
const Description = z.string().trim().max(2000, 'description must be at most 2000 characters');

export const RecipeCreateBody = z.object({
  name: RecipeName,
  description: Description.default(''),
  source: Source,
  language: RecipeLanguage.default('ts'),
});
export type RecipeCreateBody = z.infer<typeof RecipeCreateBody>;

export const RecipeUpdateBody = z.object({
  source: Source,
  description: Description.optional(),
  language: RecipeLanguage.optional(),
  /** The version the edit started from; a newer latest version means someone saved in between. */
  baseVersion: z.number().int().positive(),
  message: z.string().trim().max(500, 'message must be at most 500 characters').optional(),
});
export type RecipeUpdateBody = z.infer<typeof RecipeUpdateBody>;

export const RecipeRestoreBody = z.object({
  version: z.number().int().positive(),
  message: z.string().trim().max(500).optional(),
});
export type RecipeRestoreBody = z.infer<typeof RecipeRestoreBody>;

export const RecipeRunBody = z.object({
  inputs: z.record(z.string(), z.number().refine(Number.isFinite, 'inputs must be finite numbers')).default({}),
  /** Run an older version; the latest when left out. */
  version: z.number().int().positive().optional(),
  seed: z.number().int().nonnegative().optional(),
});
export type RecipeRunBody = z.infer<typeof RecipeRunBody>;

export const RecipeCopyBody = z.object({
  groupId: z.number().int().positive(),
  name: RecipeName.optional(),
  version: z.number().int().positive().optional(),
});
export type RecipeCopyBody = z.infer<typeof RecipeCopyBody>;

export const RecipeIdParams = z.object({ id: z.coerce.number().int().positive() });
export const RecipeVersionParams = z.object({
  id: z.coerce.number().int().positive(),
  n: z.coerce.number().int().positive(),
});

export const RecipeSummary = z.object({
  id: z.number().int(),
  name: z.string(),
  description: z.string(),
  language: RecipeLanguage,
  version: z.number().int(),
  params: z.array(ParamDeclaration),
  updatedAt: z.string(),
  updatedByName: z.string().nullable(),
});
export type RecipeSummary = z.infer<typeof RecipeSummary>;

export const RecipeDetail = z.object({
  id: z.number().int(),
  groupId: z.number().int(),
  name: z.string(),
  description: z.string(),
  language: RecipeLanguage,
  version: z.number().int(),
  latestVersion: z.number().int(),
  source: z.string(),
  params: z.array(ParamDeclaration),
  updatedAt: z.string(),
  updatedByName: z.string().nullable(),
});
export type RecipeDetail = z.infer<typeof RecipeDetail>;

export const RecipeVersionSummary = z.object({
  version: z.number().int(),
  description: z.string(),
  message: z.string().nullable(),
  params: z.array(ParamDeclaration),
  createdAt: z.string(),
  createdByName: z.string().nullable(),
  restoredFrom: z.number().int().nullable(),
  copiedFrom: z.object({ recipeId: z.number().int(), version: z.number().int() }).nullable(),
});
export type RecipeVersionSummary = z.infer<typeof RecipeVersionSummary>;

export const RecipeVersionDetail = RecipeVersionSummary.extend({
  source: z.string(),
  language: RecipeLanguage,
});
export type RecipeVersionDetail = z.infer<typeof RecipeVersionDetail>;

export type RecipeListResponse = { recipes: RecipeSummary[] };
export type RecipeResponse = { recipe: RecipeDetail };
export type RecipeVersionsResponse = { versions: RecipeVersionSummary[] };
export type RecipeVersionResponse = { version: RecipeVersionDetail };
