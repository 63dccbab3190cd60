import { z } from 'zod';
import { route, json } from '../../../../server/http';
import { invite } from '../../../../server/members';
import { ROLES } from '../../../../db/schema';
import { clientIp } from '../../../../server/request';

const Body = z.object({ email: z.string().trim().max(254).email('Enter a valid e-mail.'), role: z.enum(ROLES, 'Choose a role.') });

export const POST = route({ action: 'members.manage', body: Body }, async ({ ctx, auth, body }) => {
  const r = await invite(auth, body, clientIp(ctx));
  return json({ ok: true, invitationId: r.invitationId, message: `Invitation sent to ${body.email.trim().toLowerCase()}.` }, 201);
});
