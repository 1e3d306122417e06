import { z } from 'zod';
import { Email, GroupRole, SiteRole } from './auth';

export const AdminUser = z.object({
  id: z.number().int(),
  email: z.string(),
  name: z.string(),
  role: SiteRole,
  disabled: z.boolean(),
  createdAt: z.string(),
  groups: z.array(z.object({ id: z.number().int(), name: z.string(), role: GroupRole })),
});
export type AdminUser = z.infer<typeof AdminUser>;
export const AdminUserListResponse = z.object({ users: z.array(AdminUser) });
export type AdminUserListResponse = z.infer<typeof AdminUserListResponse>;
export const AdminUserResponse = z.object({ user: AdminUser });
export type AdminUserResponse = z.infer<typeof AdminUserResponse>;

export const AdminUserPatch = z
  .object({ role: SiteRole.optional(), disabled: z.boolean({ message: 'must be true or false' }).optional() })
  .refine((v) => v.role !== undefined || v.disabled !== undefined, { message: 'give role or disabled', path: ['role'] });
export type AdminUserPatch = z.infer<typeof AdminUserPatch>;

export const AdminInvitationBody = z
  .object({
    email: Email,
    role: SiteRole,
    groupId: z.number({ message: 'must be a number' }).int().positive().optional(),
    groupRole: GroupRole.optional(),
  })
  .refine((v) => (v.groupId === undefined) === (v.groupRole === undefined), {
    message: 'groupId and groupRole go together',
    path: ['groupRole'],
  });
export type AdminInvitationBody = z.infer<typeof AdminInvitationBody>;

export const OutboxMessage = z.object({
  id: z.number().int(),
  to: z.string(),
  from: z.string(),
  subject: z.string(),
  text: z.string(),
  createdAt: z.string(),
});
export type OutboxMessage = z.infer<typeof OutboxMessage>;
export const OutboxResponse = z.object({ messages: z.array(OutboxMessage) });
export type OutboxResponse = z.infer<typeof OutboxResponse>;

/** Page numbers start at 1. */
export const AuditQuery = z.object({
  page: z.coerce.number({ message: 'must be a number' }).int().min(1).default(1),
  pageSize: z.coerce.number({ message: 'must be a number' }).int().min(1).max(200).default(50),
  action: z.string().max(100).optional(),
  userId: z.coerce.number().int().positive().optional(),
});
export type AuditQuery = z.infer<typeof AuditQuery>;

export const AuditEntry = z.object({
  id: z.number().int(),
  at: z.string(),
  userId: z.number().int().nullable(),
  userEmail: z.string().nullable(),
  action: z.string(),
  target: z.string().nullable(),
  details: z.unknown(),
});
export type AuditEntry = z.infer<typeof AuditEntry>;
export const AuditPage = z.object({
  entries: z.array(AuditEntry),
  page: z.number().int(),
  pageSize: z.number().int(),
  total: z.number().int(),
});
export type AuditPage = z.infer<typeof AuditPage>;
