/** Typed calls for sweeps; shapes from shared/schemas/sweeps.ts. */
import { http } from './http';
import type { CreateSweep, SweepAxis, SweepProgress, SweepResults, SweepStatus, SweepSummary } from '../../shared/schemas/sweeps';
import type { ParamDeclaration } from '../../shared/schemas/recipes';

export type { SweepAxis, SweepProgress, SweepResults, SweepStatus, SweepSummary };

/** What the new-sweep form sends; the server fills language/fixed/notify defaults. */
export type NewSweep = Omit<CreateSweep, 'language' | 'fixed' | 'notify'> & Partial<Pick<CreateSweep, 'language' | 'fixed' | 'notify'>>;

export function createSweep(body: NewSweep) {
  return http.post<{ sweep: SweepSummary }>('/api/sweeps', body);
}

export function getSweep(id: number) {
  return http.get<{ sweep: SweepSummary }>(`/api/sweeps/${id}`);
}

export function sweepResults(id: number) {
  return http.get<SweepResults>(`/api/sweeps/${id}/results?format=json`);
}

/** For links and downloads: the same results as a file. */
export function sweepResultsUrl(id: number, format: 'csv' | 'json') {
  return `/api/sweeps/${id}/results?format=${format}`;
}

/** The Server-Sent Events stream of a sweep's progress (`progress`, then one `end`). */
export function sweepEventsUrl(id: number) {
  return `/api/sweeps/${id}/events`;
}

export function cancelSweep(id: number) {
  return http.post<{ sweep: SweepSummary }>(`/api/sweeps/${id}/cancel`);
}

export function listSweeps(groupId: number) {
  return http.get<{ sweeps: SweepSummary[] }>(`/api/groups/${groupId}/sweeps`);
}

export function sweepLimit(groupId: number) {
  return http.get<{ sweepPoints: number }>(`/api/groups/${groupId}/sweep-limit`);
}

export function scriptDeclarations(source: string, language: 'ts' | 'js' = 'ts') {
  return http.post<{ params: ParamDeclaration[] }>('/api/sweeps/declarations', { source, language });
}
