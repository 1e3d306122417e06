import { http } from './http';
import type { InvitationInfo, InvitationInfoResponse, MeResponse, SessionUser, SignInResponse, SiteRole } from '../../shared/schemas/auth';

export type User = SessionUser;
export type Invitation = InvitationInfo;
export type { SiteRole };

export const authApi = {
  signIn: (email: string, password: string) => http.post<SignInResponse>('/api/auth/sign-in', { email, password }),
  signOut: () => http.post<unknown>('/api/auth/sign-out'),
  me: () => http.get<MeResponse>('/api/auth/me'),
  requestReset: (email: string) => http.post<unknown>('/api/auth/password-reset/request', { email }),
  /** Also signs the user in (the server sets the session cookie). */
  completeReset: (token: string, password: string) =>
    http.post<SignInResponse>('/api/auth/password-reset/complete', { token, password }),
  invitation: (token: string) => http.get<InvitationInfoResponse>(`/api/invitations/${encodeURIComponent(token)}`),
  /** `name` only for a new account; an existing account confirms with its current password. */
  acceptInvitation: (token: string, body: { name?: string; password: string }) =>
    http.post<SignInResponse>(`/api/invitations/${encodeURIComponent(token)}/accept`, body),
};
