export type { GroupRole, SessionUser, SiteRole } from '../../shared/schemas/auth';
import type { GroupRole } from '../../shared/schemas/auth';

/** viewer < editor < owner */
export const ROLE_RANK: Record<GroupRole, number> = { viewer: 1, editor: 2, owner: 3 };

export function roleAtLeast(role: GroupRole | undefined, min: GroupRole): boolean {
  return role !== undefined && ROLE_RANK[role] >= ROLE_RANK[min];
}
