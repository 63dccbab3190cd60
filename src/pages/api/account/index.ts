import { z } from 'zod';
import { json } from '../../../server/http';
import { userRoute, updateName, listSessions } from '../../../server/accounts';

/** The signed-in person's own profile and sessions. */
export const GET = userRoute({}, async ({ ctx, user, sessionId }) => {
  const sessions = await listSessions(user.id, sessionId);
  return json({ user, memberships: ctx.locals.memberships, sessions });
});

export const PATCH = userRoute({ body: z.object({ name: z.string().trim().min(1, 'Enter your name.').max(120) }) }, async ({ user, body }) => {
  await updateName(user.id, body.name);
  return json({ ok: true, message: 'Name saved.' });
});
