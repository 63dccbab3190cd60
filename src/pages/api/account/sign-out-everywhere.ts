import { json } from '../../../server/http';
import { userRoute, signOutOtherSessions } from '../../../server/accounts';

/** End every session of this person except the one making the request. */
export const POST = userRoute({}, async ({ user, sessionId }) => {
  const n = await signOutOtherSessions(user.id, sessionId);
  return json({ ok: true, endedSessions: n, message: `${n === 1 ? '1 other session' : `${n} other sessions`} signed out.` });
});
