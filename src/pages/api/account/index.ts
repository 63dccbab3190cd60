import { z } from 'zod';
import { route, json } from '../../../server/http';
import { updateName, listSessions } from '../../../server/accounts';

/** The signed-in person's own profile and sessions. */
export const GET = route({ auth: 'user' }, async ({ req, me }) => {
  const sessions = await listSessions(me);
  return json({ user: { id: me.userId, email: me.email, name: me.name }, memberships: req.locals.memberships, sessions });
});

export const PATCH = route({ auth: 'user', body: z.object({ name: z.string().trim().min(1, 'Enter your name.').max(120) }) }, async ({ me, body }) => {
  await updateName(me, body.name);
  return json({ ok: true, message: 'Name saved.' });
});
