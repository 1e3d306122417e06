import type { Knex } from 'knex';
import type { GroupRole, SessionUser, SiteRole } from '../auth/types';

export interface UserRow {
  id: number;
  email: string;
  name: string;
  password_hash: string;
  role: SiteRole;
  disabled: number | boolean;
  session_version: number;
  created_at: string;
}

export function normalizeEmail(email: string): string {
  return email.trim().toLowerCase();
}

export async function findUserByEmail(db: Knex | Knex.Transaction, email: string): Promise<UserRow | undefined> {
  return (await db('users').where({ email: normalizeEmail(email) }).first()) as UserRow | undefined;
}

export async function findUserById(db: Knex | Knex.Transaction, id: number): Promise<UserRow | undefined> {
  return (await db('users').where({ id }).first()) as UserRow | undefined;
}

export function toSessionUser(u: Pick<UserRow, 'id' | 'email' | 'name' | 'role'>): SessionUser {
  return { id: u.id, email: u.email, name: u.name, role: u.role };
}

export interface AdminUserView {
  id: number;
  email: string;
  name: string;
  role: SiteRole;
  disabled: boolean;
  createdAt: string;
  groups: { id: number; name: string; role: GroupRole }[];
}

export async function listUsersForAdmin(db: Knex, onlyId?: number): Promise<AdminUserView[]> {
  const users = (await db('users')
    .modify((q) => {
      if (onlyId !== undefined) q.where({ id: onlyId });
    })
    .orderBy('id')
    .select('id', 'email', 'name', 'role', 'disabled', 'created_at')) as Omit<UserRow, 'password_hash' | 'session_version'>[];
  const memberships = (await db('memberships as m')
    .join('groups as g', 'g.id', 'm.group_id')
    .modify((q) => {
      if (onlyId !== undefined) q.where('m.user_id', onlyId);
    })
    .orderBy('g.name')
    .select('m.user_id', 'g.id', 'g.name', 'm.role')) as { user_id: number; id: number; name: string; role: GroupRole }[];
  return users.map((u) => ({
    id: u.id,
    email: u.email,
    name: u.name,
    role: u.role,
    disabled: Boolean(u.disabled),
    createdAt: u.created_at,
    groups: memberships.filter((m) => m.user_id === u.id).map((m) => ({ id: m.id, name: m.name, role: m.role })),
  }));
}
