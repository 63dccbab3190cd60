import { z } from 'zod';
import { json } from '../../../server/http';
import { userRoute, changePassword, MIN_PASSWORD } from '../../../server/accounts';

const Body = z.object({
  currentPassword: z.string().min(1, 'Enter your current password.').max(1000),
  newPassword: z.string().min(MIN_PASSWORD, `Use at least ${MIN_PASSWORD} characters.`).max(1000),
});

/** Change the password; every other session of this person ends. */
export const POST = userRoute({ body: Body }, async ({ user, sessionId, body }) => {
  const r = await changePassword(user.id, sessionId, body.currentPassword, body.newPassword);
  return json({ ok: true, endedSessions: r.endedSessions, message: `Password changed. ${r.endedSessions === 1 ? '1 other session was' : `${r.endedSessions} other sessions were`} signed out.` });
});
