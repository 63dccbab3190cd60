import { route, json } from '../../../../server/http';
import { endSessionByHandle } from '../../../../server/accounts';

/** Sign out one of your own sessions (by its public handle, never its secret id). */
export const DELETE = route({ auth: 'user' }, async ({ me, params }) => {
  await endSessionByHandle(me, String(params.handle ?? ''));
  return json({ ok: true, message: 'Session signed out.' });
});
