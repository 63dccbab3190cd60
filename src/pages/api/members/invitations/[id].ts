import { route, json, idParam } from '../../../../server/http';
import { revokeInvitation } from '../../../../server/members';

export const DELETE = route({ auth: 'members.manage' }, async ({ ctx, params }) => {
  await revokeInvitation(ctx, idParam(params.id));
  return json({ ok: true, message: 'Invitation withdrawn.' });
});
