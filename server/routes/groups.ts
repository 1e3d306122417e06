import { Router } from 'express';
import { CreateGroupBody, GroupInvitationBody, MemberRoleBody, TransferBody } from '../../shared/schemas/groups';
import { authorize, groupFromParam } from '../auth/authorize';
import { currentUser, requireUser } from '../auth/requireUser';
import { roleAtLeast } from '../auth/types';
import type { AppDeps } from '../deps';
import { AppError } from '../http/errors';
import { intParam, parseBody } from '../http/validate';
import { createGroup, getGroup, listGroupsOf, listMembers, removeMember, setMemberRole, transferOwnership } from '../services/groups';
import { createInvitation } from '../services/invitations';

export function groupsRouter(deps: AppDeps): Router {
  const r = Router();
  const { db } = deps;
  const inGroup = groupFromParam('groupId');

  r.get('/groups', requireUser, async (req, res) => {
    res.json({ groups: await listGroupsOf(db, currentUser(req).id) });
  });

  r.post('/groups', requireUser, async (req, res) => {
    const body = parseBody(CreateGroupBody, req);
    res.status(201).json({ group: await createGroup(db, currentUser(req), body.name) });
  });

  r.get('/groups/:groupId', authorize('viewer', inGroup), async (req, res) => {
    const group = await getGroup(db, req.groupId!);
    res.json({ group: { ...group, role: req.groupRole!, members: await listMembers(db, req.groupId!) } });
  });

  r.get('/groups/:groupId/members', authorize('viewer', inGroup), async (req, res) => {
    res.json({ members: await listMembers(db, req.groupId!) });
  });

  r.post('/groups/:groupId/invitations', authorize('owner', inGroup), async (req, res) => {
    const body = parseBody(GroupInvitationBody, req);
    const user = currentUser(req);
    const invitation = await createInvitation(deps, {
      email: body.email,
      siteRole: 'member',
      groupId: req.groupId!,
      groupRole: body.role,
      invitedBy: { id: user.id, name: user.name },
    });
    res.status(201).json({ invitation });
  });

  r.patch('/groups/:groupId/members/:userId', authorize('owner', inGroup), async (req, res) => {
    const userId = intParam(req, 'userId');
    const body = parseBody(MemberRoleBody, req);
    res.json({ member: await setMemberRole(db, currentUser(req).id, req.groupId!, userId, body.role) });
  });

  // Owners remove anyone; any member may remove themselves (leave the group).
  r.delete('/groups/:groupId/members/:userId', authorize('viewer', inGroup), async (req, res) => {
    const userId = intParam(req, 'userId');
    const me = currentUser(req);
    if (userId !== me.id && !roleAtLeast(req.groupRole, 'owner')) {
      throw new AppError(403, 'forbidden', `Removing a member needs the owner role in the group; you are ${req.groupRole}.`);
    }
    await removeMember(db, me.id, req.groupId!, userId);
    res.status(204).end();
  });

  r.post('/groups/:groupId/transfer', authorize('owner', inGroup), async (req, res) => {
    const body = parseBody(TransferBody, req);
    res.json({ members: await transferOwnership(db, currentUser(req).id, req.groupId!, body.userId) });
  });

  return r;
}
