import type { Knex } from 'knex';
import type { SiteRole } from '../auth/types';
import { AppError, notFound } from '../http/errors';
import { audit } from './audit';
import { findUserById, listUsersForAdmin, type AdminUserView } from './users';

/**
 * Changes a user's site role or disabled flag. An admin cannot demote or disable themselves, and
 * the last enabled admin stays: the site must never be left without one.
 */
export async function updateUserByAdmin(db: Knex, actorId: number, userId: number, patch: { role?: SiteRole; disabled?: boolean }): Promise<AdminUserView> {
  await db.transaction(async (trx) => {
    const user = await findUserById(trx, userId);
    if (!user) throw notFound('User');
    const losesAdmin = user.role === 'admin' && !user.disabled && (patch.role === 'member' || patch.disabled === true);
    if (losesAdmin && userId === actorId) {
      throw new AppError(409, 'self_lockout', 'You cannot remove your own admin role or disable your own account.', { field: patch.role === 'member' ? 'role' : 'disabled' });
    }
    if (losesAdmin) {
      const r = (await trx('users').where({ role: 'admin', disabled: false }).count({ n: '*' }).first()) as { n: number } | undefined;
      if (Number(r?.n ?? 0) <= 1) throw new AppError(409, 'last_admin', 'The site must keep at least one enabled admin.');
    }
    const changes: Record<string, unknown> = {};
    if (patch.role !== undefined && patch.role !== user.role) changes.role = patch.role;
    if (patch.disabled !== undefined && patch.disabled !== Boolean(user.disabled)) changes.disabled = patch.disabled;
    if (Object.keys(changes).length === 0) return;
    // Disabling ends the user's sessions at once, not at cookie expiry.
    if (changes.disabled === true) changes.session_version = user.session_version + 1;
    await trx('users').where({ id: userId }).update(changes);
    await audit(trx, {
      userId: actorId,
      action: 'user.update',
      target: `user:${userId}`,
      details: { ...(changes.role !== undefined ? { role: { from: user.role, to: changes.role } } : {}), ...(changes.disabled !== undefined ? { disabled: changes.disabled } : {}) },
    });
  });
  return (await listUsersForAdmin(db, userId))[0]!;
}
