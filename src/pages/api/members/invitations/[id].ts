import { route, json, idParam } from '../../../../server/http';
import { revokeInvitation } from '../../../../server/members';
import { clientIp } from '../../../../server/request';

export const DELETE = route({ action: 'members.manage' }, async ({ ctx, auth, params }) => {
  await revokeInvitation(auth, idParam(params.id), clientIp(ctx));
  return json({ ok: true, message: 'Invitation withdrawn.' });
});
