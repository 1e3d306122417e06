import type { Knex } from 'knex';
import { hashPassword, verifyPassword } from '../auth/password';
import { hashToken, newLinkToken } from '../auth/tokens';
import type { GroupRole, SiteRole } from '../auth/types';
import type { AppDeps } from '../deps';
import { isoIn, nowIso } from '../db/time';
import { AppError, badRequest, conflict, notFound } from '../http/errors';
import { audit } from './audit';
import { findUserByEmail, findUserById, normalizeEmail, type UserRow } from './users';

export const INVITATION_PATH = '/invite/';

interface InvitationRow {
  id: number;
  token_hash: string;
  email: string;
  site_role: SiteRole;
  group_id: number | null;
  group_role: GroupRole | null;
  invited_by: number | null;
  created_at: string;
  expires_at: string;
  accepted_at: string | null;
  accepted_user_id: number | null;
}

export interface CreatedInvitation {
  id: number;
  email: string;
  siteRole: SiteRole;
  groupId: number | null;
  groupRole: GroupRole | null;
  expiresAt: string;
}

export interface InviteInput {
  email: string;
  siteRole: SiteRole;
  groupId?: number;
  groupRole?: GroupRole;
  invitedBy: { id: number; name: string };
}

/**
 * Stores a single-use invitation (hash only) and mails its link. A group invitation to someone
 * already in the group is refused; an earlier open invitation for the same address and group is
 * replaced, so that only the newest link works.
 */
export async function createInvitation(deps: AppDeps, input: InviteInput): Promise<CreatedInvitation> {
  const email = normalizeEmail(input.email);
  const { token, hash } = newLinkToken();
  const expiresAt = isoIn(deps.config.invitationTtlSeconds);
  const created = await deps.db.transaction(async (trx) => {
    let groupName: string | null = null;
    if (input.groupId !== undefined) {
      const g = (await trx('groups').where({ id: input.groupId }).first('id', 'name')) as { id: number; name: string } | undefined;
      if (!g) throw new AppError(404, 'not_found', 'Group not found.', { field: 'groupId' });
      groupName = g.name;
      const existing = await findUserByEmail(trx, email);
      if (existing) {
        const m = await trx('memberships').where({ user_id: existing.id, group_id: g.id }).first('role');
        if (m) throw conflict(`${email} is already a member of this group.`, { field: 'email' });
      }
    }
    await trx('invitations')
      .where({ email, group_id: input.groupId ?? null })
      .whereNull('accepted_at')
      .update({ expires_at: nowIso() });
    const [row] = (await trx('invitations')
      .insert({
        token_hash: hash,
        email,
        site_role: input.siteRole,
        group_id: input.groupId ?? null,
        group_role: input.groupRole ?? null,
        invited_by: input.invitedBy.id,
        created_at: nowIso(),
        expires_at: expiresAt,
      })
      .returning('id')) as { id: number }[];
    await audit(trx, {
      userId: input.invitedBy.id,
      action: 'invitation.create',
      target: input.groupId !== undefined ? `group:${input.groupId}` : `invitation:${row!.id}`,
      details: { invitationId: row!.id, email, siteRole: input.siteRole, groupRole: input.groupRole ?? null },
    });
    return { id: row!.id, groupName };
  });
  const link = `${deps.config.appOrigin}${INVITATION_PATH}${token}`;
  const days = Math.max(1, Math.round(deps.config.invitationTtlSeconds / 86400));
  const what = created.groupName
    ? `to join the group "${created.groupName}" on Comoving as ${input.groupRole}`
    : `to Comoving${input.siteRole === 'admin' ? ' as a site admin' : ''}`;
  await deps.mailer.send({
    to: email,
    subject: created.groupName ? `Invitation to ${created.groupName} on Comoving` : 'Invitation to Comoving',
    text:
      `Hello,\n\n${input.invitedBy.name} has invited you ${what}.\n\n` +
      `Open this link to accept; it works once and for ${days} day${days === 1 ? '' : 's'}:\n\n${link}\n\n` +
      `If you did not expect this, ignore this message.\n`,
  });
  return { id: created.id, email, siteRole: input.siteRole, groupId: input.groupId ?? null, groupRole: input.groupRole ?? null, expiresAt };
}

function invalidInvitation(): AppError {
  return new AppError(404, 'invalid_token', 'This invitation is not valid any more: it was used, replaced or has expired.', { field: 'token' });
}

async function liveInvitation(db: Knex | Knex.Transaction, token: string): Promise<InvitationRow> {
  const row = (await db('invitations').where({ token_hash: hashToken(token) }).first()) as InvitationRow | undefined;
  if (!row || row.accepted_at || row.expires_at <= nowIso()) throw invalidInvitation();
  return row;
}

export async function describeInvitation(db: Knex, token: string) {
  const inv = await liveInvitation(db, token);
  const group = inv.group_id ? ((await db('groups').where({ id: inv.group_id }).first('id', 'name')) as { id: number; name: string } | undefined) : undefined;
  const inviter = inv.invited_by ? await findUserById(db, inv.invited_by) : undefined;
  const existing = await findUserByEmail(db, inv.email);
  return {
    email: inv.email,
    siteRole: inv.site_role,
    group: group ? { id: group.id, name: group.name } : null,
    groupRole: inv.group_role,
    invitedBy: inviter?.name ?? null,
    expiresAt: inv.expires_at,
    existingAccount: Boolean(existing),
  };
}

/**
 * Accepts an invitation: makes the account (name + new password) or, for an address that has one,
 * checks its current password; then adds the membership. Single use.
 */
export async function acceptInvitation(deps: AppDeps, token: string, body: { name?: string; password: string }): Promise<UserRow> {
  const peek = await liveInvitation(deps.db, token);
  const existingBefore = await findUserByEmail(deps.db, peek.email);
  let newHash: string | undefined;
  if (existingBefore) {
    if (existingBefore.disabled || !(await verifyPassword(existingBefore.password_hash, body.password))) {
      throw new AppError(401, 'bad_credentials', 'This address already has an account: give its current password to accept.', { field: 'password' });
    }
  } else {
    if (!body.name) throw badRequest('name: is required', 'name');
    if (body.password.length < 10) throw badRequest('password: must be at least 10 characters', 'password');
    newHash = await hashPassword(body.password);
  }
  return deps.db.transaction(async (trx) => {
    const inv = await liveInvitation(trx, token);
    const used = await trx('invitations').where({ id: inv.id }).whereNull('accepted_at').update({ accepted_at: nowIso() });
    if (used !== 1) throw invalidInvitation();
    let user = await findUserByEmail(trx, inv.email);
    if (!user) {
      if (!newHash) throw conflict('The account changed while accepting; try again.');
      const [row] = (await trx('users')
        .insert({ email: inv.email, name: body.name, password_hash: newHash, role: inv.site_role, created_at: nowIso() })
        .returning('id')) as { id: number }[];
      user = (await findUserById(trx, row!.id))!;
      await audit(trx, { userId: user.id, action: 'user.create', target: `user:${user.id}`, details: { via: 'invitation', invitationId: inv.id, role: inv.site_role } });
    } else if (inv.site_role === 'admin' && user.role !== 'admin') {
      await trx('users').where({ id: user.id }).update({ role: 'admin' });
      user = { ...user, role: 'admin' };
    }
    if (inv.group_id !== null && inv.group_role !== null) {
      const group = await trx('groups').where({ id: inv.group_id }).first('id');
      if (!group) throw notFound('Group');
      const m = await trx('memberships').where({ user_id: user.id, group_id: inv.group_id }).first('role');
      if (!m) await trx('memberships').insert({ user_id: user.id, group_id: inv.group_id, role: inv.group_role, created_at: nowIso() });
    }
    await trx('invitations').where({ id: inv.id }).update({ accepted_user_id: user.id });
    await audit(trx, {
      userId: user.id,
      action: 'invitation.accept',
      target: inv.group_id !== null ? `group:${inv.group_id}` : `invitation:${inv.id}`,
      details: { invitationId: inv.id, groupRole: inv.group_role, siteRole: inv.site_role },
    });
    return user;
  });
}
