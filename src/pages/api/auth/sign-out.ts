import { lucia, clearSessionCookie } from '../../../server/auth/session';
import { route, json } from '../../../server/http';

/** Public (a session that has already ended may still sign out): a form gets 303 to sign-in, JSON gets 200. */
export const POST = route({ auth: 'public' }, async ({ req }) => {
  if (req.locals.sessionId) await lucia().invalidateSession(req.locals.sessionId);
  clearSessionCookie(req.cookies);
  const wantsJson = (req.request.headers.get('accept') ?? '').includes('application/json');
  // The board is cached by the browser for revalidation (private, no-cache): on a shared
  // tablet, signing out empties this site's HTTP cache too.
  const clear = { 'clear-site-data': '"cache"' };
  return wantsJson ? json({ ok: true }, 200, clear) : new Response(null, { status: 303, headers: { location: '/sign-in?signed_out=1', ...clear } });
});
