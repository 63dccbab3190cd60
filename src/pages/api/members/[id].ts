import { z } from 'zod';
import { route, json, idParam } from '../../../server/http';
import { changeRole, removeMember } from '../../../server/members';
import { ROLES } from '../../../lib/vocabulary';

/** [id] is the person's user id; the membership looked up is always this workspace's. */
export const PATCH = route({ auth: 'members.manage', body: z.object({ role: z.enum(ROLES, 'Choose a role.') }) }, async ({ ctx, body, params }) => {
  await changeRole(ctx, idParam(params.id), body.role);
  return json({ ok: true, message: 'Role changed.' });
});

export const DELETE = route({ auth: 'members.manage' }, async ({ ctx, params }) => {
  await removeMember(ctx, idParam(params.id));
  return json({ ok: true, message: 'Removed from the distillery.' });
});
