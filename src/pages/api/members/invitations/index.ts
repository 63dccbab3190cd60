import { z } from 'zod';
import { route, json } from '../../../../server/http';
import { invite } from '../../../../server/members';
import { ROLES } from '../../../../lib/vocabulary';

const Body = z.object({ email: z.string().trim().max(254).email('Enter a valid e-mail.'), role: z.enum(ROLES, 'Choose a role.') });

export const POST = route({ auth: 'members.manage', body: Body }, async ({ ctx, body }) => {
  const r = await invite(ctx, body);
  return json({ ok: true, invitationId: r.invitationId, message: `Invitation sent to ${body.email.trim().toLowerCase()}.` }, 201);
});
