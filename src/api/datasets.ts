import { http, request } from './http';
import type {
  DatasetColumn,
  DatasetDetail,
  DatasetKind,
  DatasetListResponse,
  DatasetResponse,
  DatasetSummary,
  DatasetVersionSummary,
  DatasetVersionsResponse,
} from '../../shared/schemas/datasets';

export type { DatasetColumn, DatasetDetail, DatasetKind, DatasetSummary, DatasetVersionSummary };

export interface UploadInput {
  name: string;
  kind: DatasetKind;
  description?: string;
  file: File;
  covariance?: File | null;
}

export const datasetsApi = {
  list: (groupId: number) => http.get<DatasetListResponse>(`/api/groups/${groupId}/datasets`),
  get: (id: number, version?: number) => http.get<DatasetResponse>(`/api/datasets/${id}${version ? `?version=${version}` : ''}`),
  versions: (id: number) => http.get<DatasetVersionsResponse>(`/api/datasets/${id}/versions`),
  csvUrl: (id: number, version?: number) => `/api/datasets/${id}/csv${version ? `?version=${version}` : ''}`,
  /** Into another group the caller edits; 409 `name_taken` (field name) when the name is in use there. */
  copy: (id: number, body: { groupId: number; name?: string; version?: number }) => http.post<DatasetResponse>(`/api/datasets/${id}/copy`, body),
  remove: (id: number) => http.del<unknown>(`/api/datasets/${id}`),
  upload: (groupId: number, input: UploadInput) => {
    const form = new FormData();
    form.set('name', input.name);
    form.set('kind', input.kind);
    if (input.description) form.set('description', input.description);
    form.set('file', input.file);
    if (input.covariance) form.set('covariance', input.covariance);
    return request<{ dataset: DatasetSummary }>('POST', `/api/groups/${groupId}/datasets`, form);
  },
};
