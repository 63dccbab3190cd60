import { route, json } from '../../../server/http';
import { signOutOtherSessions } from '../../../server/accounts';

/** End every session of this person except the one making the request. */
export const POST = route({ auth: 'user' }, async ({ me }) => {
  const n = await signOutOtherSessions(me);
  return json({ ok: true, endedSessions: n, message: `${n === 1 ? '1 other session' : `${n} other sessions`} signed out.` });
});
