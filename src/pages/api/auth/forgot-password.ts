import { z } from 'zod';
import { route, json } from '../../../server/http';
import { requestPasswordReset } from '../../../server/accounts';
import { clientIp } from '../../../server/request';
import { takeAttempt } from '../../../server/throttle';

const Body = z.object({ email: z.string().trim().max(254).email('Enter a valid e-mail.') });

/**
 * Same answer, and the same time, whether or not the address has an account: the lookup, the
 * token and the mail are done after the answer is sent, so nothing in the response depends on them.
 */
export const POST = route({ auth: 'public', body: Body }, async ({ req, body }) => {
  const ip = clientIp(req);
  await takeAttempt('forgot_password', [`email:${body.email.trim().toLowerCase()}`, `ip:${ip}`]);
  void requestPasswordReset({ email: body.email, ip }).catch((err) => {
    console.error('[plateau] password reset request failed:', err instanceof Error ? err.message : String(err));
  });
  return json({ ok: true, message: 'If that address has a Plateau account, a link to choose a new password is on its way. It works for 30 minutes.' }, 202);
});
