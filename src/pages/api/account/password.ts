import { z } from 'zod';
import { route, json } from '../../../server/http';
import { changePassword, MIN_PASSWORD } from '../../../server/accounts';
import { takeAttempt, forgive, refund } from '../../../server/throttle';

const Body = z.object({
  currentPassword: z.string().min(1, 'Enter your current password.').max(1000),
  newPassword: z.string().min(MIN_PASSWORD, `Use at least ${MIN_PASSWORD} characters.`).max(1000),
});

/** Change the password; every other session of this person ends. */
export const POST = route({ auth: 'user', body: Body }, async ({ me, body }) => {
  // Re-entering the current password is a guess like a sign-in: counted first, forgiven on success.
  await takeAttempt('password_change', [`user:${me.userId}`, `ip:${me.ip}`]);
  const r = await changePassword(me, body.currentPassword, body.newPassword);
  await forgive('password_change', `user:${me.userId}`);
  await refund('password_change', [`ip:${me.ip}`]);
  return json({
    ok: true,
    endedSessions: r.endedSessions,
    message: `Password changed. ${r.endedSessions === 1 ? '1 other session was' : `${r.endedSessions} other sessions were`} signed out.`,
  });
});
