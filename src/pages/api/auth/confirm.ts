import { z } from 'zod';
import { route, json } from '../../../server/http';
import { confirmSignUp, MIN_PASSWORD } from '../../../server/accounts';
import { setSessionCookie } from '../../../server/auth/session';
import { clientIp } from '../../../server/request';
import { takeAttempt } from '../../../server/throttle';

/** The address's owner, holding the e-mailed link, chooses the password here. */
const Body = z.object({
  token: z.string().min(10).max(200),
  name: z.string().trim().min(1, 'Enter your name.').max(120).optional(),
  workspaceName: z.string().trim().min(2, 'Enter the distillery name.').max(120).optional(),
  password: z.string().min(MIN_PASSWORD, `Use at least ${MIN_PASSWORD} characters.`).max(1000),
});

/** Following the e-mailed link opens a page; its form posts here (a GET never changes anything). */
export const POST = route({ auth: 'public', body: Body }, async ({ req, body }) => {
  // Each confirmation hashes a password (argon2): bounded per address.
  await takeAttempt('confirm', [`ip:${clientIp(req)}`]);
  const { session } = await confirmSignUp(
    body.token,
    { name: body.name, workspaceName: body.workspaceName, password: body.password },
    { ip: clientIp(req), userAgent: req.request.headers.get('user-agent') },
  );
  setSessionCookie(req.cookies, session.token);
  // A new distillery lands on its getting-started checklist.
  return json({ ok: true, redirect: '/setup' });
});
