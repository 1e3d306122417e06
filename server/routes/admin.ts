import { Router } from 'express';
import { AdminInvitationBody, AdminUserPatch, AuditQuery } from '../../shared/schemas/admin';
import { currentUser, requireAdmin } from '../auth/requireUser';
import type { AppDeps } from '../deps';
import { intParam, parseBody, parseQuery } from '../http/validate';
import { updateUserByAdmin } from '../services/adminUsers';
import { listAudit } from '../services/audit';
import { createInvitation } from '../services/invitations';
import { outboxMessages } from '../services/outbox';
import { listUsersForAdmin } from '../services/users';

export function adminRouter(deps: AppDeps): Router {
  const r = Router();
  const { db } = deps;
  r.use('/admin', requireAdmin);

  r.get('/admin/users', async (_req, res) => {
    res.json({ users: await listUsersForAdmin(db) });
  });

  r.patch('/admin/users/:id', async (req, res) => {
    const id = intParam(req, 'id');
    const body = parseBody(AdminUserPatch, req);
    res.json({ user: await updateUserByAdmin(db, currentUser(req).id, id, body) });
  });

  r.post('/admin/invitations', async (req, res) => {
    const body = parseBody(AdminInvitationBody, req);
    const user = currentUser(req);
    const invitation = await createInvitation(deps, {
      email: body.email,
      siteRole: body.role,
      groupId: body.groupId,
      groupRole: body.groupRole,
      invitedBy: { id: user.id, name: user.name },
    });
    res.status(201).json({ invitation });
  });

  r.get('/admin/outbox', async (_req, res) => {
    res.json({ messages: await outboxMessages(db) });
  });

  r.get('/admin/audit', async (req, res) => {
    const q = parseQuery(AuditQuery, req);
    res.json(await listAudit(db, q));
  });

  return r;
}
