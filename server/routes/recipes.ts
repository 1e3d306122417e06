/**
 * Recipe routes: parse, authorize through the one role middleware, call the service. Viewers read and
 * run; editors save, restore and copy in.
 */
import { Router, type Request } from 'express';
import type { AppDeps } from '../deps';
import { authorize, groupFromParam } from '../auth/authorize';
import { parseBody, parseParams } from '../http/validate';
import {
  RecipeCopyBody,
  RecipeCreateBody,
  RecipeIdParams,
  RecipeRestoreBody,
  RecipeRunBody,
  RecipeUpdateBody,
  RecipeVersionParams,
  type RecipeListResponse,
  type RecipeResponse,
  type RecipeVersionResponse,
  type RecipeVersionsResponse,
} from '../../shared/schemas/recipes';
import * as recipes from '../services/recipes';
import { executeRun } from '../services/runs';

export function recipesRouter(deps: AppDeps): Router {
  const { db } = deps;
  const router = Router();

  // A malformed id means "no such recipe" to authorize (404), never a database error.
  const recipeOf = (req: Request) => recipes.recipeGroupId(db, Number(req.params.id));

  router.get('/groups/:groupId/recipes', authorize('viewer', groupFromParam('groupId')), async (req, res) => {
    const body: RecipeListResponse = { recipes: await recipes.listRecipes(db, req.groupId!) };
    res.json(body);
  });

  router.post('/groups/:groupId/recipes', authorize('editor', groupFromParam('groupId')), async (req, res) => {
    const input = parseBody(RecipeCreateBody, req);
    const body: RecipeResponse = { recipe: await recipes.createRecipe(db, { groupId: req.groupId!, userId: req.user!.id, ...input }) };
    res.status(201).json(body);
  });

  router.get('/recipes/:id', authorize('viewer', recipeOf), async (req, res) => {
    const { id } = parseParams(RecipeIdParams, req);
    const body: RecipeResponse = { recipe: await recipes.getRecipe(db, id) };
    res.json(body);
  });

  router.put('/recipes/:id', authorize('editor', recipeOf), async (req, res) => {
    const { id } = parseParams(RecipeIdParams, req);
    const input = parseBody(RecipeUpdateBody, req);
    const body: RecipeResponse = { recipe: await recipes.saveRecipe(db, { id, userId: req.user!.id, ...input }) };
    res.json(body);
  });

  router.get('/recipes/:id/versions', authorize('viewer', recipeOf), async (req, res) => {
    const { id } = parseParams(RecipeIdParams, req);
    const body: RecipeVersionsResponse = { versions: await recipes.listVersions(db, id) };
    res.json(body);
  });

  router.get('/recipes/:id/versions/:n', authorize('viewer', recipeOf), async (req, res) => {
    const { id, n } = parseParams(RecipeVersionParams, req);
    const body: RecipeVersionResponse = { version: await recipes.getVersion(db, id, n) };
    res.json(body);
  });

  router.post('/recipes/:id/restore', authorize('editor', recipeOf), async (req, res) => {
    const { id } = parseParams(RecipeIdParams, req);
    const input = parseBody(RecipeRestoreBody, req);
    const body: RecipeResponse = { recipe: await recipes.restoreRecipe(db, { id, userId: req.user!.id, ...input }) };
    res.json(body);
  });

  router.post('/recipes/:id/run', authorize('viewer', recipeOf), async (req, res) => {
    const { id } = parseParams(RecipeIdParams, req);
    const input = parseBody(RecipeRunBody, req);
    const prepared = await recipes.prepareRun(db, id, input.inputs, input.version);
    const run = await executeRun(deps, {
      userId: req.user!.id,
      groupId: prepared.groupId,
      source: prepared.source,
      language: prepared.language,
      params: prepared.params,
      seed: input.seed,
      recipeId: id,
      recipeVersion: prepared.version,
    });
    res.status(201).json({ run });
  });

  // Two groups are involved: the caller writes into the target (editor+) and reads the source (viewer+),
  // both through the same middleware; the source check runs last so req.groupId ends as the source group.
  router.post(
    '/recipes/:id/copy',
    authorize('editor', (req) => parseBody(RecipeCopyBody, req).groupId),
    authorize('viewer', recipeOf),
    async (req, res) => {
      const { id } = parseParams(RecipeIdParams, req);
      const input = parseBody(RecipeCopyBody, req);
      const body: RecipeResponse = {
        recipe: await recipes.copyRecipe(db, { id, userId: req.user!.id, targetGroupId: input.groupId, name: input.name, version: input.version }),
      };
      res.status(201).json(body);
    },
  );

  return router;
}
