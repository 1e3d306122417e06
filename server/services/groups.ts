import type { Knex } from 'knex';
import type { GroupRole, SessionUser } from '../auth/types';
import { nowIso } from '../db/time';
import { AppError, notFound } from '../http/errors';
import { audit } from './audit';

export interface MemberView {
  userId: number;
  email: string;
  name: string;
  role: GroupRole;
  joinedAt: string;
}

/** The caller's groups and role in each, by name. */
export async function listGroupsOf(db: Knex, userId: number): Promise<{ id: number; name: string; role: GroupRole }[]> {
  return (await db('memberships as m')
    .join('groups as g', 'g.id', 'm.group_id')
    .where('m.user_id', userId)
    .orderBy('g.name')
    .select('g.id', 'g.name', 'm.role')) as { id: number; name: string; role: GroupRole }[];
}

export async function createGroup(db: Knex, user: SessionUser, name: string): Promise<{ id: number; name: string; role: GroupRole }> {
  return db.transaction(async (trx) => {
    const now = nowIso();
    const [row] = (await trx('groups').insert({ name, created_at: now }).returning('id')) as { id: number }[];
    await trx('memberships').insert({ user_id: user.id, group_id: row!.id, role: 'owner', created_at: now });
    await audit(trx, { userId: user.id, action: 'group.create', target: `group:${row!.id}`, details: { name } });
    return { id: row!.id, name, role: 'owner' as const };
  });
}

export async function listMembers(db: Knex | Knex.Transaction, groupId: number): Promise<MemberView[]> {
  const rows = (await db('memberships as m')
    .join('users as u', 'u.id', 'm.user_id')
    .where('m.group_id', groupId)
    .orderByRaw("case m.role when 'owner' then 1 when 'editor' then 2 else 3 end")
    .orderBy('u.name')
    .select('u.id', 'u.email', 'u.name', 'm.role', 'm.created_at')) as { id: number; email: string; name: string; role: GroupRole; created_at: string }[];
  return rows.map((r) => ({ userId: r.id, email: r.email, name: r.name, role: r.role, joinedAt: r.created_at }));
}

export async function getGroup(db: Knex, groupId: number): Promise<{ id: number; name: string; createdAt: string }> {
  const g = (await db('groups').where({ id: groupId }).first('id', 'name', 'created_at')) as { id: number; name: string; created_at: string } | undefined;
  if (!g) throw notFound('Group');
  return { id: g.id, name: g.name, createdAt: g.created_at };
}

async function membershipOrThrow(trx: Knex.Transaction, groupId: number, userId: number): Promise<GroupRole> {
  const m = (await trx('memberships').where({ group_id: groupId, user_id: userId }).first('role')) as { role: GroupRole } | undefined;
  if (!m) throw new AppError(404, 'not_found', 'That user is not a member of this group.', { field: 'userId' });
  return m.role;
}

async function ownerCount(trx: Knex.Transaction, groupId: number): Promise<number> {
  const r = (await trx('memberships').where({ group_id: groupId, role: 'owner' }).count({ n: '*' }).first()) as { n: number } | undefined;
  return Number(r?.n ?? 0);
}

function lastOwner(): AppError {
  return new AppError(409, 'last_owner', 'A group must keep at least one owner: make someone else owner first.');
}

export async function setMemberRole(db: Knex, actorId: number, groupId: number, userId: number, role: GroupRole): Promise<MemberView> {
  return db.transaction(async (trx) => {
    const before = await membershipOrThrow(trx, groupId, userId);
    if (before === 'owner' && role !== 'owner' && (await ownerCount(trx, groupId)) <= 1) throw lastOwner();
    if (before !== role) {
      await trx('memberships').where({ group_id: groupId, user_id: userId }).update({ role });
      await audit(trx, { userId: actorId, action: 'group.member.role', target: `group:${groupId}`, details: { userId, from: before, to: role } });
    }
    return (await listMembers(trx, groupId)).find((m) => m.userId === userId)!;
  });
}

export async function removeMember(db: Knex, actorId: number, groupId: number, userId: number): Promise<void> {
  await db.transaction(async (trx) => {
    const before = await membershipOrThrow(trx, groupId, userId);
    if (before === 'owner' && (await ownerCount(trx, groupId)) <= 1) throw lastOwner();
    await trx('memberships').where({ group_id: groupId, user_id: userId }).delete();
    await audit(trx, {
      userId: actorId,
      action: actorId === userId ? 'group.member.leave' : 'group.member.remove',
      target: `group:${groupId}`,
      details: { userId, role: before },
    });
  });
}

/** The target becomes owner; the caller, if a member, becomes editor. */
export async function transferOwnership(db: Knex, actorId: number, groupId: number, userId: number): Promise<MemberView[]> {
  return db.transaction(async (trx) => {
    if (userId === actorId) throw new AppError(400, 'invalid_input', 'userId: hand ownership to another member', { field: 'userId' });
    await membershipOrThrow(trx, groupId, userId);
    await trx('memberships').where({ group_id: groupId, user_id: userId }).update({ role: 'owner' });
    const actorRole = (await trx('memberships').where({ group_id: groupId, user_id: actorId }).first('role')) as { role: GroupRole } | undefined;
    if (actorRole) await trx('memberships').where({ group_id: groupId, user_id: actorId }).update({ role: 'editor' });
    await audit(trx, { userId: actorId, action: 'group.transfer', target: `group:${groupId}`, details: { to: userId, previousOwnerNowEditor: Boolean(actorRole) } });
    return listMembers(trx, groupId);
  });
}
