import { http } from './http';
import type { SiteRole } from '../../shared/schemas/auth';
import type { AdminUser, AdminUserListResponse, AdminUserResponse, OutboxMessage, OutboxResponse } from '../../shared/schemas/admin';
import type { GroupLimitOverrides, GroupLimitsResponse, LimitsResponse, UpdateLimits } from '../../shared/schemas/limits';

export type { AdminUser, OutboxMessage, LimitsResponse, GroupLimitsResponse };

/**
 * Usage rows are rendered generically (the columns are whatever the server reports), so a new
 * measure on the server shows up without a client change.
 */
export type UsageCell = string | number | boolean | null;
export type UsageRow = Record<string, UsageCell>;
export interface UsageResponse {
  byGroup: UsageRow[];
  byUser: UsageRow[];
  failuresByLimit: UsageRow[] | Record<string, number>;
  slowestRecipes: UsageRow[];
  [k: string]: unknown;
}

export const adminApi = {
  users: () => http.get<AdminUserListResponse>('/api/admin/users'),
  updateUser: (id: number, patch: { role?: SiteRole; disabled?: boolean }) => http.patch<AdminUserResponse>(`/api/admin/users/${id}`, patch),
  invite: (email: string, role: SiteRole) => http.post<unknown>('/api/admin/invitations', { email, role }),
  outbox: () => http.get<OutboxResponse>('/api/admin/outbox'),
  limits: () => http.get<LimitsResponse>('/api/admin/limits'),
  saveLimits: (patch: UpdateLimits) => http.put<LimitsResponse>('/api/admin/limits', patch),
  groupLimits: (groupId: number) => http.get<GroupLimitsResponse>(`/api/admin/groups/${groupId}/limits`),
  saveGroupLimits: (groupId: number, patch: GroupLimitOverrides) =>
    http.put<GroupLimitsResponse>(`/api/admin/groups/${groupId}/limits`, patch),
  usage: () => http.get<UsageResponse>('/api/admin/usage'),
};
