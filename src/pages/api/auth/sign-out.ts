import type { APIRoute } from 'astro';
import { lucia, clearSessionCookie } from '../../../server/auth/session';
import { errorResponse, json } from '../../../server/http';

export const POST: APIRoute = async (ctx) => {
  try {
    if (ctx.locals.sessionId) await lucia().invalidateSession(ctx.locals.sessionId);
    clearSessionCookie(ctx.cookies);
    const wantsJson = (ctx.request.headers.get('accept') ?? '').includes('application/json');
    // The board is cached by the browser for revalidation (private, no-cache): on a shared
    // tablet, signing out empties this site's HTTP cache too.
    const clear = { 'clear-site-data': '"cache"' };
    return wantsJson ? json({ ok: true }, 200, clear) : new Response(null, { status: 303, headers: { location: '/sign-in?signed_out=1', ...clear } });
  } catch (err) {
    return errorResponse(err);
  }
};
