import type { Knex } from 'knex';
import { burnPasswordCheck, hashPassword, verifyPassword } from '../auth/password';
import { hashToken, newLinkToken } from '../auth/tokens';
import type { AppDeps } from '../deps';
import { isoIn, nowIso } from '../db/time';
import { AppError } from '../http/errors';
import { log } from '../http/log';
import { audit } from './audit';
import { findUserByEmail, findUserById, type UserRow } from './users';

/** The same answer for an unknown e-mail, a wrong password and a disabled account. */
export function badCredentials(): AppError {
  return new AppError(401, 'bad_credentials', 'E-mail or password is not right.');
}

/** The user whose e-mail and password match and whose account is enabled, else 401. */
export async function checkCredentials(db: Knex, email: string, password: string): Promise<UserRow> {
  const user = await findUserByEmail(db, email);
  if (!user) {
    await burnPasswordCheck(password);
    throw badCredentials();
  }
  const ok = await verifyPassword(user.password_hash, password);
  if (!ok || user.disabled) throw badCredentials();
  return user;
}

export const RESET_PATH = '/reset-password/';

/**
 * Mails a single-use reset link when the address has an enabled account. It does the work after
 * answering so that the response time does not tell whether the account exists.
 */
export function requestPasswordReset(deps: AppDeps, email: string, ip?: string): Promise<void> {
  return (async () => {
    const user = await findUserByEmail(deps.db, email);
    if (!user || user.disabled) {
      await audit(deps.db, { userId: null, action: 'auth.password_reset.request_unknown', target: null, details: { ip: ip ?? null } });
      return;
    }
    const { token, hash } = newLinkToken();
    const expiresAt = isoIn(deps.config.passwordResetTtlSeconds);
    await deps.db.transaction(async (trx) => {
      // One live link at a time: asking again voids the older ones.
      await trx('password_resets').where({ user_id: user.id }).whereNull('used_at').update({ used_at: nowIso() });
      await trx('password_resets').insert({ user_id: user.id, token_hash: hash, created_at: nowIso(), expires_at: expiresAt });
      await audit(trx, { userId: user.id, action: 'auth.password_reset.request', target: `user:${user.id}`, details: { ip: ip ?? null } });
    });
    const link = `${deps.config.appOrigin}${RESET_PATH}${token}`;
    const minutes = Math.round(deps.config.passwordResetTtlSeconds / 60);
    await deps.mailer.send({
      to: user.email,
      subject: 'Reset your Comoving password',
      text:
        `Hello ${user.name},\n\nSomeone (we hope you) asked to reset the password of your Comoving account.\n` +
        `Open this link to choose a new one; it works once and for ${minutes} minutes:\n\n${link}\n\n` +
        `If you did not ask for this, ignore this message; your password stays as it is.\n`,
    });
  })().catch((err: unknown) => {
    log('error', 'password reset mail failed', { error: err instanceof Error ? err.message : String(err) });
  });
}

function invalidLink(): AppError {
  return new AppError(400, 'invalid_token', 'This link is not valid any more: it was used, replaced or has expired.', { field: 'token' });
}

/** Sets the new password if the token is live; ends every session of the account. */
export async function completePasswordReset(deps: AppDeps, token: string, password: string): Promise<UserRow> {
  const hash = hashToken(token);
  const password_hash = await hashPassword(password);
  return deps.db.transaction(async (trx) => {
    const row = (await trx('password_resets').where({ token_hash: hash }).first()) as
      | { id: number; user_id: number; expires_at: string; used_at: string | null }
      | undefined;
    if (!row || row.used_at || row.expires_at <= nowIso()) throw invalidLink();
    const user = await findUserById(trx, row.user_id);
    if (!user || user.disabled) throw invalidLink();
    // The update is conditional so that two racing uses of one token cannot both succeed.
    const used = await trx('password_resets').where({ id: row.id }).whereNull('used_at').update({ used_at: nowIso() });
    if (used !== 1) throw invalidLink();
    await trx('users').where({ id: user.id }).update({ password_hash, session_version: user.session_version + 1 });
    await audit(trx, { userId: user.id, action: 'auth.password_reset.complete', target: `user:${user.id}` });
    return { ...user, password_hash, session_version: user.session_version + 1 };
  });
}
