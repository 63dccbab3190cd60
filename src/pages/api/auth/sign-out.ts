import type { APIRoute } from 'astro';
import { lucia, clearSessionCookie } from '../../../server/auth/session';
import { errorResponse, json } from '../../../server/http';

export const POST: APIRoute = async (ctx) => {
  try {
    if (ctx.locals.sessionId) await lucia().invalidateSession(ctx.locals.sessionId);
    clearSessionCookie(ctx.cookies, ctx.url.protocol === 'https:');
    const wantsJson = (ctx.request.headers.get('accept') ?? '').includes('application/json');
    return wantsJson ? json({ ok: true }) : ctx.redirect('/sign-in?signed_out=1', 303);
  } catch (err) {
    return errorResponse(err);
  }
};
