import { z } from 'zod';
import { publicRoute, json } from '../../../server/http';
import { confirmSignUp } from '../../../server/accounts';
import { setSessionCookie } from '../../../server/auth/session';
import { clientIp } from '../../../server/request';

const Body = z.object({ token: z.string().min(10).max(200) });

/** Following the e-mailed link opens a page; its button posts here (a GET never changes anything). */
export const POST = publicRoute({ body: Body }, async ({ ctx, body }) => {
  const { session } = await confirmSignUp(body.token, { ip: clientIp(ctx), userAgent: ctx.request.headers.get('user-agent') });
  setSessionCookie(ctx.cookies, session.id, ctx.url.protocol === 'https:');
  return json({ ok: true, redirect: '/settings' });
});
