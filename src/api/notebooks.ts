/** Typed calls for notebooks and their versions; shapes come from shared/schemas/notebooks.ts. */
import { http, query } from './http';
import type {
  Block,
  CreateNotebookBody,
  ListNotebooksResponse,
  ListVersionsResponse,
  NotebookDetailResponse,
  NotebookResponse,
  SaveNotebookBody,
  VersionResponse,
} from '../../shared/schemas/notebooks';

export type NotebookSort = 'updated' | 'title' | 'owner';

export function listNotebooks(groupId: number, opts: { q?: string; sort?: NotebookSort; order?: 'asc' | 'desc' } = {}) {
  return http.get<ListNotebooksResponse>(`/api/groups/${groupId}/notebooks${query(opts)}`);
}

export function createNotebook(groupId: number, body: CreateNotebookBody) {
  return http.post<NotebookResponse>(`/api/groups/${groupId}/notebooks`, body);
}

export function getNotebook(id: number) {
  return http.get<NotebookDetailResponse>(`/api/notebooks/${id}`);
}

export function saveNotebook(id: number, body: SaveNotebookBody) {
  return http.put<NotebookResponse>(`/api/notebooks/${id}`, body);
}

export function listVersions(id: number) {
  return http.get<ListVersionsResponse>(`/api/notebooks/${id}/versions`);
}

export function getVersion(id: number, n: number) {
  return http.get<VersionResponse>(`/api/notebooks/${id}/versions/${n}`);
}

export function restoreVersion(id: number, version: number) {
  return http.post<NotebookResponse>(`/api/notebooks/${id}/restore`, { version });
}

export function copyNotebook(id: number, groupId: number, title?: string) {
  return http.post<NotebookResponse>(`/api/notebooks/${id}/copy`, title ? { groupId, title } : { groupId });
}

export type { Block };
