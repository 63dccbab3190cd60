import type { APIRoute } from 'astro';
import { z } from 'zod';
import { signIn } from '../../../server/accounts';
import { setSessionCookie } from '../../../server/auth/session';
import { errorResponse, json, jsonError, zodFields, HttpError, readBody } from '../../../server/http';
import { clientIp } from '../../../server/request';
import { safeNextPath } from '../../../lib/web';
import { env } from '../../../config';

const Body = z.object({
  email: z.string().trim().min(3, 'Enter your e-mail.').max(254).email('Enter a valid e-mail.'),
  password: z.string().min(1, 'Enter your password.').max(1000),
  next: z.string().max(500).optional(),
});

/** Accepts JSON (islands, tests) or a plain form post (the sign-in page works without JS). */
export const POST: APIRoute = async (ctx) => {
  const isForm = /application\/x-www-form-urlencoded|multipart\/form-data/.test(ctx.request.headers.get('content-type') ?? '');
  try {
    const { raw } = await readBody(ctx.request);
    const parsed = Body.safeParse(raw);
    if (!parsed.success) {
      if (isForm) return ctx.redirect('/sign-in?error=invalid', 303);
      return jsonError(400, 'invalid', 'Check the highlighted fields.', zodFields(parsed.error));
    }
    const { session } = await signIn({ ...parsed.data, ip: clientIp(ctx), userAgent: ctx.request.headers.get('user-agent') });
    setSessionCookie(ctx.cookies, session.token);
    const next = safeNextPath(parsed.data.next, env().PUBLIC_URL);
    return isForm ? ctx.redirect(next, 303) : json({ ok: true, next });
  } catch (err) {
    if (err instanceof HttpError && isForm) {
      if (err.status === 429) return ctx.redirect(`/sign-in?error=throttled&wait=${err.extra?.retryAfter ?? 60}`, 303);
      if (err.status === 400) return ctx.redirect('/sign-in?error=credentials', 303);
    }
    if (err instanceof HttpError && err.status === 429) {
      return jsonError(429, 'throttled', err.message, undefined, { 'retry-after': String(err.extra?.retryAfter ?? 60) });
    }
    return errorResponse(err);
  }
};
