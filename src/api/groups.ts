import { http } from './http';
import type { GroupRole } from '../../shared/schemas/auth';
import type {
  GroupDetailResponse,
  GroupListResponse,
  GroupSummary,
  InvitationCreated,
  Member,
  MemberListResponse,
} from '../../shared/schemas/groups';

export type Group = GroupSummary;
export type { GroupRole, Member };
export const GROUP_ROLES: GroupRole[] = ['owner', 'editor', 'viewer'];

const g = (id: number) => `/api/groups/${id}`;

export const groupsApi = {
  list: () => http.get<GroupListResponse>('/api/groups'),
  create: (name: string) => http.post<{ group: GroupSummary }>('/api/groups', { name }),
  get: (id: number) => http.get<GroupDetailResponse>(g(id)),
  members: (id: number) => http.get<MemberListResponse>(`${g(id)}/members`),
  invite: (id: number, email: string, role: GroupRole) => http.post<InvitationCreated>(`${g(id)}/invitations`, { email, role }),
  setRole: (id: number, userId: number, role: GroupRole) => http.patch<unknown>(`${g(id)}/members/${userId}`, { role }),
  remove: (id: number, userId: number) => http.del<unknown>(`${g(id)}/members/${userId}`),
  transfer: (id: number, userId: number) => http.post<unknown>(`${g(id)}/transfer`, { userId }),
};
