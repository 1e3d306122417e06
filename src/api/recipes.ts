/** Typed calls for recipes, their versions, runs and copies; shapes from shared/schemas/recipes.ts. */
import { http } from './http';
import type {
  ParamDeclaration,
  RecipeCreateBody,
  RecipeListResponse,
  RecipeResponse,
  RecipeRunBody,
  RecipeUpdateBody,
  RecipeVersionResponse,
  RecipeVersionsResponse,
  RecipeDetail,
  RecipeSummary,
  RecipeVersionSummary,
  RecipeVersionDetail,
} from '../../shared/schemas/recipes';
import type { RunResponse, Run } from '../../shared/schemas/runs';

export type { ParamDeclaration, RecipeDetail, RecipeSummary, RecipeVersionSummary, RecipeVersionDetail, Run };

/** What the create form sends; the server fills the defaults (description '', language 'ts'). */
export type NewRecipe = Pick<RecipeCreateBody, 'name' | 'source'> & Partial<Pick<RecipeCreateBody, 'description' | 'language'>>;

export function listRecipes(groupId: number) {
  return http.get<RecipeListResponse>(`/api/groups/${groupId}/recipes`);
}

export function createRecipe(groupId: number, body: NewRecipe) {
  return http.post<RecipeResponse>(`/api/groups/${groupId}/recipes`, body);
}

export function getRecipe(id: number) {
  return http.get<RecipeResponse>(`/api/recipes/${id}`);
}

export function saveRecipe(id: number, body: RecipeUpdateBody) {
  return http.put<RecipeResponse>(`/api/recipes/${id}`, body);
}

export function listRecipeVersions(id: number) {
  return http.get<RecipeVersionsResponse>(`/api/recipes/${id}/versions`);
}

export function getRecipeVersion(id: number, n: number) {
  return http.get<RecipeVersionResponse>(`/api/recipes/${id}/versions/${n}`);
}

export function restoreRecipe(id: number, version: number) {
  return http.post<RecipeResponse>(`/api/recipes/${id}/restore`, { version });
}

export function runRecipe(id: number, body: Partial<RecipeRunBody> & Pick<RecipeRunBody, 'inputs'>) {
  return http.post<RunResponse>(`/api/recipes/${id}/run`, body);
}

export function copyRecipe(id: number, groupId: number, name?: string) {
  return http.post<RecipeResponse>(`/api/recipes/${id}/copy`, name ? { groupId, name } : { groupId });
}
