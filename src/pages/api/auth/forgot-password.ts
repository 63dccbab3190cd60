import { z } from 'zod';
import { publicRoute, json } from '../../../server/http';
import { requestPasswordReset } from '../../../server/accounts';
import { clientIp } from '../../../server/request';

const Body = z.object({ email: z.string().trim().max(254).email('Enter a valid e-mail.') });

/** Same answer whether or not the address has an account. */
export const POST = publicRoute({ body: Body }, async ({ ctx, body }) => {
  await requestPasswordReset({ email: body.email, ip: clientIp(ctx) });
  return json({ ok: true, message: 'If that address has a Plateau account, a link to choose a new password is on its way. It works for 30 minutes.' }, 202);
});
