import { z } from 'zod';
import { Email, GroupRole } from './auth';

export const GroupName = z.string().trim().min(1, { message: 'is required' }).max(200, { message: 'must be at most 200 characters' });

export const GroupSummary = z.object({ id: z.number().int(), name: z.string(), role: GroupRole });
export type GroupSummary = z.infer<typeof GroupSummary>;
export const GroupListResponse = z.object({ groups: z.array(GroupSummary) });
export type GroupListResponse = z.infer<typeof GroupListResponse>;

export const Member = z.object({
  userId: z.number().int(),
  email: z.string(),
  name: z.string(),
  role: GroupRole,
  joinedAt: z.string(),
});
export type Member = z.infer<typeof Member>;

export const GroupDetail = z.object({
  id: z.number().int(),
  name: z.string(),
  createdAt: z.string(),
  /** The caller's role (site admins who are not members see 'owner'). */
  role: GroupRole,
  members: z.array(Member),
});
export type GroupDetail = z.infer<typeof GroupDetail>;
export const GroupDetailResponse = z.object({ group: GroupDetail });
export type GroupDetailResponse = z.infer<typeof GroupDetailResponse>;
export const MemberListResponse = z.object({ members: z.array(Member) });
export type MemberListResponse = z.infer<typeof MemberListResponse>;

export const CreateGroupBody = z.object({ name: GroupName });
export type CreateGroupBody = z.infer<typeof CreateGroupBody>;

export const GroupInvitationBody = z.object({ email: Email, role: GroupRole });
export type GroupInvitationBody = z.infer<typeof GroupInvitationBody>;

export const InvitationCreated = z.object({
  invitation: z.object({
    id: z.number().int(),
    email: z.string(),
    siteRole: z.enum(['admin', 'member']),
    groupId: z.number().int().nullable(),
    groupRole: GroupRole.nullable(),
    expiresAt: z.string(),
  }),
});
export type InvitationCreated = z.infer<typeof InvitationCreated>;

export const MemberRoleBody = z.object({ role: GroupRole });
export type MemberRoleBody = z.infer<typeof MemberRoleBody>;

export const TransferBody = z.object({ userId: z.number({ message: 'must be a number' }).int().positive() });
export type TransferBody = z.infer<typeof TransferBody>;
