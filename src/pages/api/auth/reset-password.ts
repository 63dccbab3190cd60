import { z } from 'zod';
import { route, json } from '../../../server/http';
import { resetPassword, MIN_PASSWORD } from '../../../server/accounts';
import { clearSessionCookie } from '../../../server/auth/session';
import { clientIp } from '../../../server/request';
import { takeAttempt } from '../../../server/throttle';

const Body = z.object({
  token: z.string().min(10).max(200),
  password: z.string().min(MIN_PASSWORD, `Use at least ${MIN_PASSWORD} characters.`).max(1000),
});

/** Single use; every session of the person ends, including this browser's. */
export const POST = route({ auth: 'public', body: Body }, async ({ req, body }) => {
  await takeAttempt('reset_password', [`ip:${clientIp(req)}`]);
  await resetPassword(body.token, body.password, { ip: clientIp(req) });
  clearSessionCookie(req.cookies);
  return json({ ok: true, message: 'Your password is changed and every device is signed out. Sign in with the new password.', redirect: '/sign-in' });
});
