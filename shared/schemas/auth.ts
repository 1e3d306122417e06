import { z } from 'zod';

export const SiteRole = z.enum(['admin', 'member']);
export type SiteRole = z.infer<typeof SiteRole>;

export const GroupRole = z.enum(['owner', 'editor', 'viewer']);
export type GroupRole = z.infer<typeof GroupRole>;

export const Email = z
  .string()
  .trim()
  .toLowerCase()
  .pipe(z.email({ message: 'must be an e-mail address' }).max(320));

/** A new password: long enough to resist guessing, short enough to hash quickly. */
export const NewPassword = z
  .string({ message: 'is required' })
  .min(10, { message: 'must be at least 10 characters' })
  .max(200, { message: 'must be at most 200 characters' });

export const PersonName = z.string().trim().min(1, { message: 'is required' }).max(200);

export const SessionUser = z.object({
  id: z.number().int(),
  email: z.string(),
  name: z.string(),
  role: SiteRole,
});
export type SessionUser = z.infer<typeof SessionUser>;

export const SignInBody = z.object({
  email: Email,
  password: z.string({ message: 'is required' }).min(1, { message: 'is required' }).max(200),
});
export type SignInBody = z.infer<typeof SignInBody>;

export const SignInResponse = z.object({ user: SessionUser });
export type SignInResponse = z.infer<typeof SignInResponse>;
export const MeResponse = SignInResponse;
export type MeResponse = SignInResponse;

export const PasswordResetRequestBody = z.object({ email: Email });
export type PasswordResetRequestBody = z.infer<typeof PasswordResetRequestBody>;

export const PasswordResetCompleteBody = z.object({
  token: z.string().min(20, { message: 'is not a valid link token' }).max(200),
  password: NewPassword,
});
export type PasswordResetCompleteBody = z.infer<typeof PasswordResetCompleteBody>;

/** What the invitation page shows before the invitee sets a password. */
export const InvitationInfo = z.object({
  email: z.string(),
  siteRole: SiteRole,
  group: z.object({ id: z.number().int(), name: z.string() }).nullable(),
  groupRole: GroupRole.nullable(),
  invitedBy: z.string().nullable(),
  expiresAt: z.string(),
  /** True when the address already has an account: accepting then needs its current password, not a name. */
  existingAccount: z.boolean(),
});
export type InvitationInfo = z.infer<typeof InvitationInfo>;
export const InvitationInfoResponse = z.object({ invitation: InvitationInfo });
export type InvitationInfoResponse = z.infer<typeof InvitationInfoResponse>;

/** name is required for a new account; for an existing account the password is its current one. */
export const InvitationAcceptBody = z.object({
  name: PersonName.optional(),
  password: z.string({ message: 'is required' }).min(1, { message: 'is required' }).max(200),
});
export type InvitationAcceptBody = z.infer<typeof InvitationAcceptBody>;
