/** Typed calls for runs: start one (the answer arrives when it has finished), cancel, list, fetch. */
import { http, query, request } from './http';
import type { CreateRun, Run, RunListResponse, RunResponse, RunStatus, RunSummary } from '../../shared/schemas/runs';

export type { Run, RunStatus, RunSummary };

export function startRun(body: CreateRun, signal?: AbortSignal) {
  return request<RunResponse>('POST', '/api/runs', body, signal ? { signal } : {});
}

export function cancelRun(id: number) {
  return http.post<Partial<RunResponse>>(`/api/runs/${id}/cancel`);
}

export function getRun(id: number) {
  return http.get<RunResponse>(`/api/runs/${id}`);
}

export function listRuns(opts: { groupId?: number; notebookId?: number; blockId?: string; recipeId?: number; page?: number; pageSize?: number }) {
  return http.get<RunListResponse>(`/api/runs${query(opts)}`);
}
