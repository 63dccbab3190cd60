import { z } from 'zod';
import { route, json } from '../../../server/http';
import { acceptInvitation } from '../../../server/members';
import { MIN_PASSWORD } from '../../../server/accounts';
import { setSessionCookie } from '../../../server/auth/session';
import { getDb } from '../../../db/client';
import { sessions } from '../../../db/schema';
import { eq } from 'drizzle-orm';
import { clientIp } from '../../../server/request';
import { takeAttempt } from '../../../server/throttle';

const Body = z.object({
  token: z.string().min(10).max(200),
  name: z.string().trim().min(1, 'Enter your name.').max(120).optional(),
  password: z.string().min(MIN_PASSWORD, `Use at least ${MIN_PASSWORD} characters.`).max(1000).optional(),
});

/** Existing account: must be signed in as the invited address. New address: name + password here. */
export const POST = route({ auth: 'public', body: Body }, async ({ req, body }) => {
  await takeAttempt('accept_invitation', [`ip:${clientIp(req)}`]);
  const r = await acceptInvitation(body.token, {
    signedInUserId: req.locals.user?.id ?? null,
    name: body.name,
    password: body.password,
    ip: clientIp(req),
    userAgent: req.request.headers.get('user-agent'),
  });
  if (r.newSession) setSessionCookie(req.cookies, r.newSession.token);
  else if (req.locals.sessionId) await getDb().update(sessions).set({ workspaceId: r.workspaceId }).where(eq(sessions.id, req.locals.sessionId));
  return json({ ok: true, workspaceId: r.workspaceId, redirect: '/' });
});
