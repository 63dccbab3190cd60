import { z } from 'zod';
import { route, json, idParam } from '../../../server/http';
import { changeRole, removeMember } from '../../../server/members';
import { ROLES } from '../../../db/schema';
import { clientIp } from '../../../server/request';

/** [id] is the person's user id; the membership looked up is always this workspace's. */
export const PATCH = route({ action: 'members.manage', body: z.object({ role: z.enum(ROLES, 'Choose a role.') }) }, async ({ ctx, auth, body, params }) => {
  await changeRole(auth, idParam(params.id), body.role, clientIp(ctx));
  return json({ ok: true, message: 'Role changed.' });
});

export const DELETE = route({ action: 'members.manage' }, async ({ ctx, auth, params }) => {
  await removeMember(auth, idParam(params.id), clientIp(ctx));
  return json({ ok: true, message: 'Removed from the distillery.' });
});
