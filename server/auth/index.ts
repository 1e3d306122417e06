export { authorize, groupFromParam, groupRoleOf, depsOf, type GroupOf } from './authorize';
export { requireUser, requireAdmin, optionalUser, currentUser, loadSessionUser } from './requireUser';
export { hashPassword, verifyPassword } from './password';
export { issueSession, clearSession, readSession, SESSION_COOKIE } from './session';
export { newLinkToken, hashToken } from './tokens';
export { ROLE_RANK, roleAtLeast, type GroupRole, type SessionUser, type SiteRole } from './types';
