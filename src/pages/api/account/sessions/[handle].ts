import { json } from '../../../../server/http';
import { userRoute, endSessionByHandle } from '../../../../server/accounts';

/** Sign out one of your own sessions (by its public handle, never its secret id). */
export const DELETE = userRoute({}, async ({ user, params }) => {
  await endSessionByHandle(user.id, String(params.handle ?? ''));
  return json({ ok: true, message: 'Session signed out.' });
});
